// Human-readable figures for the tables (the JSON keeps the raw numbers).

export function formatSeconds(s: number | null | undefined): string {
  if (s === null || s === undefined || !Number.isFinite(s)) return '—';
  if (s < 1e-3) return `${(s * 1e6).toPrecision(3)} µs`;
  if (s < 1) return `${(s * 1e3).toPrecision(3)} ms`;
  return `${s.toPrecision(3)} s`;
}

export function formatRatio(r: number | null | undefined): string {
  if (r === null || r === undefined || !Number.isFinite(r)) return '—';
  return r >= 100 ? `${Math.round(r)}×` : `${r.toPrecision(3)}×`;
}

const SUPERSCRIPT = '⁰¹²³⁴⁵⁶⁷⁸⁹';

/** 1000 → "10³", 1500 → "1500". */
export function formatSize(n: number): string {
  const e = Math.round(Math.log10(n));
  if (10 ** e !== n) return String(n);
  return `10${String(e).split('').map((d) => SUPERSCRIPT[Number(d)]).join('')}`;
}

export function formatGap(g: number | null | undefined): string {
  if (g === null || g === undefined || !Number.isFinite(g)) return '—';
  if (g === 0) return '0';
  return g.toExponential(1);
}
