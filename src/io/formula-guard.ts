// Spreadsheet formula-injection guard for free-text CSV cells (OWASP "CSV Injection": a cell that
// starts with = + - @ TAB or CR may be run as a formula when the file is opened in a spreadsheet).
// The guard prefixes such a cell with an apostrophe, which spreadsheets show as plain text.
//
// It applies to free-text columns only: numeric columns are written from typed numbers and are
// never prefixed, so `-33.8688` stays a number (common practice; see DEVELOPERS.md "CSV").
//
// The guard is reversible, so our own export → import round trip is exact: a text that already
// starts with an apostrophe followed by a trigger character or another apostrophe gets one more
// apostrophe, and `unguardFormula` removes exactly one leading apostrophe in precisely those cases.
// A hand-made cell `'=1+1` therefore imports as `=1+1`, while `'hello` keeps its apostrophe.

const TRIGGERS = new Set(['=', '+', '-', '@', '\t', '\r']);
const APOSTROPHE = "'";

function needsEscape(text: string): boolean {
  if (text.length === 0) return false;
  if (TRIGGERS.has(text[0])) return true;
  return text[0] === APOSTROPHE && text.length > 1 && (TRIGGERS.has(text[1]) || text[1] === APOSTROPHE);
}

/** The text as it should be written to a free-text CSV cell. */
export function guardFormula(text: string): string {
  return needsEscape(text) ? APOSTROPHE + text : text;
}

/** Inverse of `guardFormula` (exact for every string: unguardFormula(guardFormula(s)) === s). */
export function unguardFormula(cell: string): string {
  return cell[0] === APOSTROPHE && needsEscape(cell.slice(1)) ? cell.slice(1) : cell;
}
