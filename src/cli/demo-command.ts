// `arcfield demo [-o PATH] [--force]`: the invented demo campaign (src/campaign/demo.ts) — to stdout,
// or validated and written atomically to PATH. An existing PATH is kept unless --force.
import { access } from 'node:fs/promises';
import { ValidationError } from '../errors.ts';
import { demoCampaign, validateCampaign } from '../campaign/index.ts';
import { campaignFileText, saveCampaignFile } from '../io/campaign-file.ts';
import { parseCommandArgs, reportProblems } from './cli-args.ts';

export const DEMO_HELP = `usage: arcfield demo [-o PATH] [--force]

Write the demo campaign: an invented meridian survey (stations K01…K12, 8°–62° N) generated from
the WGS 84 ellipsoid with seeded noise and three planted blunders. Then try:
  arcfield demo -o demo.json && arcfield fit demo.json

options:
  -o, --output PATH   write the file there (default: print it on stdout)
  --force             replace PATH if it exists
  -h, --help
`;

const exists = async (path: string): Promise<boolean> => access(path).then(() => true, () => false);

export async function run(args: readonly string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseCommandArgs('demo', args, {
      output: { type: 'string', short: 'o' },
      force: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    });
  } catch (err) {
    if (err instanceof ValidationError) return reportProblems(err);
    throw err;
  }
  if (parsed.values.help === true) {
    process.stdout.write(DEMO_HELP);
    return 0;
  }
  if (parsed.positionals.length > 0) {
    return reportProblems(new ValidationError([{ field: '(arguments)', value: parsed.positionals.join(' '), reason: 'demo takes no file name; use -o PATH' }], 'arcfield demo'));
  }
  const file = validateCampaign(demoCampaign(), 'demo campaign');
  const output = parsed.values.output;
  if (typeof output !== 'string') {
    process.stdout.write(campaignFileText(file));
    return 0;
  }
  if (parsed.values.force !== true && (await exists(output))) {
    return reportProblems(new ValidationError([{ field: '--output', value: output, reason: 'file exists; add --force to replace it' }], 'arcfield demo'));
  }
  try {
    await saveCampaignFile(output, file);
  } catch (err) {
    process.stderr.write(`arcfield demo: could not write ${output}: ${err instanceof Error ? err.message : String(err)}\n`);
    return 1;
  }
  process.stderr.write(`wrote ${output} (${file.stations.length} stations, ${file.latitudeReadings.length} latitude readings, ${file.arcReadings.length} arcs)\n`);
  return 0;
}
