// `arcfield import FILE.csv --table TABLE --into CAMPAIGN.json [options]`
// Reads one CSV table, checks every row with the record schema and the merged campaign with the
// cross-record checks, and only when there is no problem at all writes the whole campaign file
// through a temporary file and a rename (write-file-atomic.ts). Any problem: every one is listed
// (row, column, value, reason), exit 2, and the campaign file is not touched.
import { readFile, stat } from 'node:fs/promises';
import { basename } from 'node:path';
import { v7 as uuidv7 } from 'uuid';
import { ValidationError, type Problem } from '../errors.ts';
import { CAMPAIGN_FILE_FORMAT, CAMPAIGN_FILE_VERSION, type CampaignFile } from '../campaign/records.ts';
import { campaignFileText, loadCampaignFile } from '../io/campaign-file.ts';
import { importCsvTable } from '../io/csv-import.ts';
import { RECORD_TABLES, RECORD_TABLE_IDS, isRecordTableId } from '../io/record-tables.ts';
import { writeFileAtomic } from '../io/write-file-atomic.ts';
import { parseCommandArgs, reportProblems } from './cli-args.ts';

function tableHelp(): string {
  return RECORD_TABLE_IDS.map((id) => `  ${id}:\n` + RECORD_TABLES[id].columns
    .map((c) => `      ${c.name.padEnd(24)}${c.required ? 'required  ' : 'optional  '}${c.description}`).join('\n')).join('\n');
}

export const IMPORT_HELP = `usage: arcfield import FILE.csv --table TABLE --into CAMPAIGN.json [options]

Add the rows of one CSV table (RFC 4180, UTF-8, one header row) to a campaign file. Every row is
checked; if any row or column is wrong, every problem is listed and the campaign file is left as it was.

options:
  --table ${RECORD_TABLE_IDS.join('|')}
  --into CAMPAIGN.json   the campaign file to add to (written whole, through a temporary file)
  --map OURS=THEIRS      read our column OURS from the file's column THEIRS (repeat for each column)
  --ignore HEADER        leave the file's column HEADER out on purpose (repeatable)
  --replace              replace the whole table instead of appending to it
  --add-stations         create a bare station for each unknown station code
  --generate-ids         give each row a new UUIDv7 id when the file has no id column
  --new NAME             create CAMPAIGN.json (it must not exist) as a new, empty campaign named NAME
  --dry-run              check everything and report, but write nothing
  -h, --help

Cells: numbers with a decimal point and no thousands separators or units (units are in the column
names); times as ISO 8601 with Z or an offset; an empty cell is a missing value.

columns of each table (matched by name, case ignored, unless mapped):
${tableHelp()}

Exit codes: 0 imported, 2 bad input (every problem listed, nothing written), 1 internal failure.
`;

function parseMappings(values: readonly string[], problems: Problem[]): Record<string, string> {
  const mapping: Record<string, string> = {};
  for (const v of values) {
    const eq = v.indexOf('=');
    if (eq <= 0 || eq === v.length - 1) {
      problems.push({ field: '--map', value: v, reason: 'expected OURS=THEIRS, e.g. distance_m="Distance (m)"' });
      continue;
    }
    const ours = v.slice(0, eq).trim();
    if (Object.hasOwn(mapping, ours)) problems.push({ field: '--map', value: v, reason: `column ${ours} is mapped twice` });
    mapping[ours] = v.slice(eq + 1);
  }
  return mapping;
}

async function exists(path: string): Promise<boolean> {
  try {
    await stat(path);
    return true;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return false;
    throw err;
  }
}

export async function run(args: readonly string[]): Promise<number> {
  try {
    return await runImport(args);
  } catch (err) {
    if (err instanceof ValidationError) return reportProblems(err);
    throw err;
  }
}

async function runImport(args: readonly string[]): Promise<number> {
  const parsed = parseCommandArgs('import', args, {
    table: { type: 'string' },
    into: { type: 'string' },
    map: { type: 'string', multiple: true },
    ignore: { type: 'string', multiple: true },
    replace: { type: 'boolean' },
    'add-stations': { type: 'boolean' },
    'generate-ids': { type: 'boolean' },
    new: { type: 'string' },
    'dry-run': { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (parsed.values.help === true) {
    process.stdout.write(IMPORT_HELP);
    return 0;
  }
  const values = parsed.values as Record<string, string | boolean | string[] | undefined>;
  const problems: Problem[] = [];
  const table = typeof values.table === 'string' ? values.table : undefined;
  if (table === undefined) problems.push({ field: '--table', value: undefined, reason: `name the table: ${RECORD_TABLE_IDS.join(', ')}` });
  else if (!isRecordTableId(table)) problems.push({ field: '--table', value: table, reason: `must be one of ${RECORD_TABLE_IDS.join(', ')}` });
  const into = typeof values.into === 'string' ? values.into : undefined;
  if (into === undefined) problems.push({ field: '--into', value: undefined, reason: 'name the campaign file to import into' });
  if (parsed.positionals.length !== 1) {
    problems.push({ field: 'FILE.csv', value: parsed.positionals.join(' '), reason: parsed.positionals.length === 0 ? 'name one CSV file' : 'name exactly one CSV file' });
  }
  const mapping = parseMappings(Array.isArray(values.map) ? values.map : [], problems);
  const ignore = Array.isArray(values.ignore) ? values.ignore : [];
  const newName = typeof values.new === 'string' ? values.new : undefined;
  if (problems.length > 0 || table === undefined || !isRecordTableId(table) || into === undefined) {
    throw new ValidationError(problems, 'arcfield import');
  }

  const csvPath = parsed.positionals[0];
  let campaign: CampaignFile;
  if (newName !== undefined) {
    if (await exists(into)) throw new ValidationError([{ field: '--new', value: into, reason: 'the campaign file already exists; leave out --new to add to it' }], 'arcfield import');
    campaign = { format: CAMPAIGN_FILE_FORMAT, version: CAMPAIGN_FILE_VERSION, name: newName, stations: [], latitudeReadings: [], arcReadings: [] };
  } else {
    campaign = await loadCampaignFile(into);
  }
  let text: string;
  try {
    text = await readFile(csvPath, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    throw new ValidationError([{ field: '(file)', value: csvPath, reason: code === 'ENOENT' ? 'no such file' : `cannot be read (${code ?? String(err)})`, source: csvPath }], csvPath);
  }
  const result = importCsvTable(campaign, text, {
    table,
    mapping,
    ignore,
    mode: values.replace === true ? 'replace' : 'append',
    addMissingStations: values['add-stations'] === true,
    newId: values['generate-ids'] === true ? () => uuidv7() : undefined,
    source: basename(csvPath),
  });
  const verb = values.replace === true ? 'replaced the' : 'added to the';
  const stations = result.addedStations.length > 0 ? `; new stations ${result.addedStations.join(', ')}` : '';
  if (values['dry-run'] === true) {
    process.stdout.write(`dry run: ${result.imported} row${result.imported === 1 ? '' : 's'} would be ${values.replace === true ? 'the new' : 'added to the'} ${table} table of ${into}${stations}; nothing written\n`);
    return 0;
  }
  await writeFileAtomic(into, campaignFileText(result.file));
  process.stdout.write(`${result.imported} row${result.imported === 1 ? '' : 's'} ${verb} ${table} table of ${into}${stations}\n`);
  return 0;
}
