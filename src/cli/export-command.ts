// `arcfield export CAMPAIGN.json --to csv|geojson|campaign [--table NAME] [-o PATH]`
// csv: one table (--table) to stdout or -o FILE; without --table, every table into the folder
// -o DIR as DIR/<table>.csv (a folder, because one CSV file holds one table — RFC 4180).
// geojson: the stations with their adjusted latitudes (RFC 7946). campaign: the campaign file
// itself, validated and written in its canonical form (the exact round trip of DEVELOPERS.md).
// Files are written whole through a temporary file and a rename.
import { mkdir } from 'node:fs/promises';
import { join } from 'node:path';
import { ValidationError, type Problem } from '../errors.ts';
import type { CampaignFile } from '../campaign/records.ts';
import { campaignFileText, loadCampaignFile } from '../io/campaign-file.ts';
import { recordTableCsv } from '../io/record-csv.ts';
import { RECORD_TABLE_IDS, isRecordTableId } from '../io/record-tables.ts';
import { RESULT_TABLE_IDS, isResultTableId, resultTableCsv } from '../io/result-tables.ts';
import { stationsGeoJsonText } from '../io/stations-geojson.ts';
import { writeFileAtomic } from '../io/write-file-atomic.ts';
import { solveCampaign } from '../campaign/index.ts';
import type { CampaignResult } from '../campaign/result.ts';
import { parseCommandArgs, pickChoice, reportProblems } from './cli-args.ts';

const TARGETS = ['csv', 'geojson', 'campaign'] as const;
const ALL_TABLES = [...RECORD_TABLE_IDS, ...RESULT_TABLE_IDS];

export const EXPORT_HELP = `usage: arcfield export CAMPAIGN.json --to csv|geojson|campaign [options]

Write a campaign's data in an open format.

  --to csv        CSV (RFC 4180, UTF-8, CRLF, units in the column names, times in UTC with Z).
                  With --table NAME: that one table, to stdout or to -o FILE.
                  Without --table: every table into the folder -o DIR, as DIR/NAME.csv.
                  record tables (re-importable with arcfield import): ${RECORD_TABLE_IDS.join(', ')}
                  result tables (from the campaign's fit):           ${RESULT_TABLE_IDS.join(', ')}
  --to geojson    the stations as a GeoJSON FeatureCollection (RFC 7946): a Point per station at
                  [longitude, latitude] with the adjusted latitude; summaries and flags as properties.
  --to campaign   the campaign file itself, validated, in canonical form.

options:
  --table NAME          one CSV table (see above)
  -o, --output PATH     file (or folder for every CSV table); stdout when left out
  -h, --help

The result tables and the GeoJSON use the fit the file's settings ask for (as arcfield fit does).
Exit codes: 0 written, 2 bad input (every problem listed), 1 internal failure.
`;

export async function run(args: readonly string[]): Promise<number> {
  try {
    return await runExport(args);
  } catch (err) {
    if (err instanceof ValidationError) return reportProblems(err);
    throw err;
  }
}

async function emit(text: string, output: string | undefined): Promise<void> {
  if (output === undefined) process.stdout.write(text);
  else await writeFileAtomic(output, text);
}

/** The fit the file's settings ask for — the same options `arcfield fit` uses without flags. */
function solveForExport(file: CampaignFile): CampaignResult {
  return solveCampaign(file, {
    model: file.settings?.model,
    estimator: file.settings?.estimator,
    weighting: file.settings?.weighting,
    suspectThreshold: file.settings?.suspectThreshold,
  });
}

function tableCsv(file: CampaignFile, table: string, cache: { solved?: CampaignResult }): string {
  if (isRecordTableId(table)) return recordTableCsv(file, table);
  if (!isResultTableId(table)) throw new RangeError(`unknown table ${table}`);
  cache.solved ??= solveForExport(file);
  return resultTableCsv(cache.solved, table);
}

async function runExport(args: readonly string[]): Promise<number> {
  const parsed = parseCommandArgs('export', args, {
    to: { type: 'string' },
    table: { type: 'string' },
    output: { type: 'string', short: 'o' },
    help: { type: 'boolean', short: 'h' },
  });
  if (parsed.values.help === true) {
    process.stdout.write(EXPORT_HELP);
    return 0;
  }
  const problems: Problem[] = [];
  const to = pickChoice(problems, 'to', parsed.values.to, TARGETS);
  if (parsed.values.to === undefined) problems.push({ field: '--to', value: undefined, reason: `name the format: ${TARGETS.join(', ')}` });
  const table = typeof parsed.values.table === 'string' ? parsed.values.table : undefined;
  const output = typeof parsed.values.output === 'string' ? parsed.values.output : undefined;
  if (table !== undefined && !(ALL_TABLES as readonly string[]).includes(table)) problems.push({ field: '--table', value: table, reason: `must be one of ${ALL_TABLES.join(', ')}` });
  if (table !== undefined && to !== undefined && to !== 'csv') problems.push({ field: '--table', value: table, reason: 'only with --to csv' });
  if (to === 'csv' && table === undefined && output === undefined) {
    problems.push({ field: '--table', value: undefined, reason: 'name one table for stdout, or give -o DIR to write every table into a folder' });
  }
  if (parsed.positionals.length !== 1) {
    problems.push({ field: 'CAMPAIGN.json', value: parsed.positionals.join(' '), reason: parsed.positionals.length === 0 ? 'name one campaign file' : 'name exactly one campaign file' });
  }
  if (problems.length > 0 || to === undefined) throw new ValidationError(problems, 'arcfield export');

  const file = await loadCampaignFile(parsed.positionals[0]);
  const cache: { solved?: CampaignResult } = {};
  if (to === 'campaign') {
    await emit(campaignFileText(file), output);
  } else if (to === 'geojson') {
    await emit(stationsGeoJsonText(file, solveForExport(file).stations), output);
  } else if (table !== undefined) {
    await emit(tableCsv(file, table, cache), output);
  } else if (output !== undefined) {
    await mkdir(output, { recursive: true });
    for (const t of ALL_TABLES) await writeFileAtomic(join(output, `${t}.csv`), tableCsv(file, t, cache));
    process.stdout.write(`${ALL_TABLES.length} tables written to ${output}: ${ALL_TABLES.map((t) => `${t}.csv`).join(', ')}\n`);
  }
  return 0;
}
