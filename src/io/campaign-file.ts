// Load, validate and save the campaign file (format "arcfield-campaign", version 1; schema in
// public/schema/campaign-v1.json). Loading refuses the whole file with every problem listed;
// saving validates first and writes through a temporary file renamed into place, so an existing
// file is never left half-written.
import { readFile, rename, rm, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { ValidationError } from '../errors.ts';
import type { CampaignFile } from '../campaign/records.ts';
import { validateCampaign } from '../campaign/validate-campaign.ts';

/** Line and column (1-based) of a character offset, for JSON syntax errors. */
function lineColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: offset - lineStart + 1 };
}

/** Parse campaign JSON text; a syntax error is a ValidationError naming the line and column. */
export function parseCampaignJson(text: string, source = 'campaign'): CampaignFile {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    const pos = /position (\d+)/.exec(message);
    const where = pos ? lineColumn(text, Number(pos[1])) : null;
    throw new ValidationError([{
      field: where ? `line ${where.line}, column ${where.column}` : '(document)',
      value: where ? text.slice(Number(pos?.[1]), Number(pos?.[1]) + 20) : text.slice(0, 40),
      reason: `not valid JSON: ${message}`,
      source,
    }], source);
  }
  return validateCampaign(raw, source);
}

export async function loadCampaignFile(path: string): Promise<CampaignFile> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : `cannot be read (${code ?? String(err)})`;
    throw new ValidationError([{ field: '(file)', value: path, reason, source: path }], path);
  }
  return parseCampaignJson(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text, path);
}

/** The file as written: two-space indented JSON with a final newline. */
export function campaignFileText(file: CampaignFile): string {
  return JSON.stringify(file, null, 2) + '\n';
}

/** Validate, then write atomically (temporary file in the same folder, then rename). */
export async function saveCampaignFile(path: string, file: unknown): Promise<CampaignFile> {
  const valid = validateCampaign(file, path);
  const temp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  try {
    await writeFile(temp, campaignFileText(valid), { encoding: 'utf8', flag: 'w' });
    await rename(temp, path);
  } catch (err) {
    await rm(temp, { force: true });
    throw err;
  }
  return valid;
}
