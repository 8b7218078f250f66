// `arcfield report CAMPAIGN.json -o report.html [options]`
// Writes the printable campaign report: one self-contained HTML file (inline CSS and SVG) that
// prints cleanly to PDF from a browser. Progress goes to stderr; the file is written whole
// through a temporary file and a rename.
import { ValidationError, InputError, type Problem } from '../errors.ts';
import { loadCampaignFile } from '../io/campaign-file.ts';
import { buildReportData, REPORT_BOOTSTRAP_REPLICATES } from '../io/report-data.ts';
import { campaignReportHtml } from '../io/report-html.ts';
import { writeFileAtomic } from '../io/write-file-atomic.ts';
import { DEFAULT_BOOTSTRAP_SEED } from '../campaign/bootstrap.ts';
import { DEFAULT_TARGET_SIGMA_ARCSEC } from '../campaign/sufficiency.ts';
import { parseCommandArgs, reportProblems } from './cli-args.ts';

export const REPORT_HELP = `usage: arcfield report CAMPAIGN.json -o report.html [options]

Write the campaign report: job summary, the figure with its uncertainties (delta method, seeded
bootstrap, full arc covariance), the five estimators side by side, the comparison with the reference
ellipsoids, charts, flagged and excluded readings, reliability, where to observe next, cautions and
the data. One self-contained HTML file; print it to PDF from any browser.

options:
  -o, --output FILE      the HTML file to write (stdout when left out)
  --replicates N         bootstrap replicates per estimator (default ${REPORT_BOOTSTRAP_REPLICATES})
  --seed N               bootstrap seed (default ${DEFAULT_BOOTSTRAP_SEED}); the same seed gives the same report
  --from DEG --to DEG --step DEG   planner candidates (default: the campaign's span ±5°, 1° step)
  --target-sigma ARCSEC  station sufficiency target (default ${DEFAULT_TARGET_SIGMA_ARCSEC}″)
  -h, --help
Exit codes: 0 written, 2 bad input (every problem listed), 1 internal failure.
`;

function numberOption(problems: Problem[], name: string, value: string | boolean | undefined, check: (v: number) => boolean, reason: string): number | undefined {
  if (typeof value !== 'string') return undefined;
  const v = Number(value.trim());
  if (value.trim() === '' || !Number.isFinite(v) || !check(v)) {
    problems.push({ field: `--${name}`, value, reason });
    return undefined;
  }
  return v;
}

export async function run(args: readonly string[]): Promise<number> {
  try {
    return await runReport(args);
  } catch (err) {
    if (err instanceof ValidationError) return reportProblems(err);
    if (err instanceof InputError) return reportProblems(new ValidationError([{ field: `--${err.field}`, value: err.value, reason: err.reason }], 'arcfield report'));
    throw err;
  }
}

async function runReport(args: readonly string[]): Promise<number> {
  const parsed = parseCommandArgs('report', args, {
    output: { type: 'string', short: 'o' },
    replicates: { type: 'string' },
    seed: { type: 'string' },
    from: { type: 'string' },
    to: { type: 'string' },
    step: { type: 'string' },
    'target-sigma': { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  });
  const v = parsed.values;
  if (v.help === true) {
    process.stdout.write(REPORT_HELP);
    return 0;
  }
  const problems: Problem[] = [];
  const replicates = numberOption(problems, 'replicates', v.replicates, (x) => Number.isInteger(x) && x >= 2 && x <= 100000, 'a whole number from 2 to 100000');
  const seed = numberOption(problems, 'seed', v.seed, (x) => Number.isInteger(x) && x >= 0 && x <= 0xffffffff, 'a whole number from 0 to 4294967295');
  const lat = (x: number): boolean => Math.abs(x) <= 90;
  const from = numberOption(problems, 'from', v.from, lat, 'a latitude in decimal degrees within [-90, 90]');
  const to = numberOption(problems, 'to', v.to, lat, 'a latitude in decimal degrees within [-90, 90]');
  const step = numberOption(problems, 'step', v.step, (x) => x > 0, 'a positive number of degrees');
  const given = [v.from, v.to, v.step].filter((x) => x !== undefined).length;
  if (given > 0 && given < 3) problems.push({ field: '--from/--to/--step', value: [v.from, v.to, v.step].map((x) => (typeof x === 'string' ? x : '(missing)')).join(' '), reason: 'give all three of --from, --to and --step' });
  const target = numberOption(problems, 'target-sigma', v['target-sigma'], (x) => x > 0, 'a positive number of arcseconds');
  if (parsed.positionals.length !== 1) {
    problems.push({ field: 'CAMPAIGN.json', value: parsed.positionals.join(' '), reason: parsed.positionals.length === 0 ? 'name one campaign file' : 'name exactly one campaign file' });
  }
  if (problems.length > 0) throw new ValidationError(problems, 'arcfield report');
  const file = await loadCampaignFile(parsed.positionals[0]);
  let lastStage = '';
  const data = buildReportData(file, {
    generatedAt: new Date().toISOString().replace(/\.\d{3}Z$/, 'Z'),
    replicates, seed, targetSigmaArcsec: target,
    ...(from !== undefined && to !== undefined && step !== undefined ? { planRange: { fromDeg: from, toDeg: to, stepDeg: step } } : {}),
    onProgress: (stage) => {
      if (stage !== lastStage) process.stderr.write(`report: ${stage}…\n`);
      lastStage = stage;
    },
  });
  const html = campaignReportHtml(data);
  const output = typeof v.output === 'string' ? v.output : undefined;
  if (output === undefined) process.stdout.write(html);
  else {
    await writeFileAtomic(output, html);
    process.stderr.write(`report written to ${output} (${Math.round(html.length / 1024)} KiB)\n`);
  }
  return 0;
}
