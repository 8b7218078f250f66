// `arcfield plan CAMPAIGN.json --from DEG --to DEG --step DEG [--at DEG …] [--no-repeats] [--json]`
// Ranks candidate next stations (and one more repeat at each station, and re-measuring each arc)
// by the standard error of 1/f each would leave, best first. The assumptions behind a candidate
// are printed with the table (src/campaign/plan-next-station.ts; DEVELOPERS.md "Planner").
import { ValidationError, type Problem } from '../errors.ts';
import { loadCampaignFile } from '../io/campaign-file.ts';
import { planCampaign, type CampaignPlan } from '../campaign/plan-next-station.ts';
import { InputError } from '../errors.ts';
import { parseCommandArgs, reportProblems } from './cli-args.ts';

export const PLAN_HELP = `usage: arcfield plan CAMPAIGN.json --from DEG --to DEG --step DEG [options]

Rank where one more day of work shrinks the standard error of 1/f (and of a) most: candidate new
stations at the latitudes from --from to --to in steps of --step (and/or typed with --at), one more
latitude repeat at each observed station, and re-measuring each arc. Best first.

options:
  --from DEG, --to DEG, --step DEG   candidate latitudes, decimal degrees (north positive)
  --at DEG              a candidate latitude (repeatable; with or without a range)
  --top N               print only the N best candidates (default all)
  --no-repeats          rank new stations only
  --json                {"candidates": [{"latitudeDeg", "inverseFlatteningStd", "semiMajorAxisStdM", …}], …}
  -h, --help

A new station is assumed joined by one arc from the observed station nearest in latitude, with the
campaign's median relative distance sigma and median station standard error; standard errors are
a-priori, from least squares of the arcs with their full covariance (shared stations correlated).
Exit codes: 0 ranked, 2 bad input (every problem listed), 1 internal failure.
`;

function degrees(problems: Problem[], option: string, value: string | undefined): number | undefined {
  if (value === undefined) return undefined;
  const v = Number(value.trim());
  if (value.trim() === '' || !Number.isFinite(v)) {
    problems.push({ field: `--${option}`, value, reason: 'a number of decimal degrees, e.g. 42.5' });
    return undefined;
  }
  return v;
}

function formatPlan(plan: CampaignPlan, top: number | undefined): string {
  const rows = top === undefined ? plan.candidates : plan.candidates.slice(0, top);
  const lines: string[] = [];
  lines.push(`figure used for the design: a = ${plan.figure.semiMajorAxisM.toFixed(1)} m, 1/f = ${plan.figure.inverseFlattening.toFixed(3)} (${plan.figure.source})`);
  lines.push(plan.current
    ? `now: σ(1/f) = ${plan.current.inverseFlatteningStd.toFixed(4)}, σ(a) = ${plan.current.semiMajorAxisStdM.toFixed(2)} m`
    : 'now: the campaign cannot determine a figure yet');
  lines.push('');
  const head = ['rank', 'candidate', 'σ(1/f) after', 'gain', 'σ(a) after (m)'];
  const body = rows.map((c, i) => [String(i + 1), c.label, c.inverseFlatteningStd.toFixed(4),
    c.inverseFlatteningGain === null ? '—' : c.inverseFlatteningGain.toFixed(4), c.semiMajorAxisStdM.toFixed(2)]);
  const width = head.map((h, j) => Math.max(h.length, ...body.map((r) => r[j].length)));
  const line = (r: string[]): string => r.map((cell, j) => (j === 1 ? cell.padEnd(width[j]) : cell.padStart(width[j]))).join('  ');
  lines.push(line(head));
  for (const r of body) lines.push(line(r));
  if (plan.skipped.length > 0) {
    lines.push('');
    for (const s of plan.skipped) lines.push(`skipped ${s.latitudeDeg}°: ${s.reason}`);
  }
  lines.push('');
  lines.push('assumptions:');
  for (const t of plan.assumptions.text) lines.push(`  - ${t}`);
  return lines.join('\n') + '\n';
}

export async function run(args: readonly string[]): Promise<number> {
  try {
    return await runPlan(args);
  } catch (err) {
    if (err instanceof ValidationError) return reportProblems(err);
    if (err instanceof InputError) return reportProblems(new ValidationError([{ field: `--${err.field}`, value: err.value, reason: err.reason }], 'arcfield plan'));
    throw err;
  }
}

async function runPlan(args: readonly string[]): Promise<number> {
  const parsed = parseCommandArgs('plan', args, {
    from: { type: 'string' },
    to: { type: 'string' },
    step: { type: 'string' },
    at: { type: 'string', multiple: true },
    top: { type: 'string' },
    'no-repeats': { type: 'boolean' },
    json: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (parsed.values.help === true) {
    process.stdout.write(PLAN_HELP);
    return 0;
  }
  const values = parsed.values as Record<string, string | boolean | string[] | undefined>;
  const str = (k: string): string | undefined => (typeof values[k] === 'string' ? values[k] : undefined);
  const problems: Problem[] = [];
  const from = degrees(problems, 'from', str('from'));
  const to = degrees(problems, 'to', str('to'));
  const step = degrees(problems, 'step', str('step'));
  const at = (Array.isArray(values.at) ? values.at : []).map((v) => degrees(problems, 'at', v)).filter((v): v is number => v !== undefined);
  const rangeGiven = [str('from'), str('to'), str('step')].filter((v) => v !== undefined).length;
  if (rangeGiven > 0 && rangeGiven < 3) problems.push({ field: '--from/--to/--step', value: [str('from'), str('to'), str('step')].map((v) => v ?? '(missing)').join(' '), reason: 'give all three of --from, --to and --step' });
  if (rangeGiven === 0 && at.length === 0 && !(Array.isArray(values.at) && values.at.length > 0)) problems.push({ field: '--from/--to/--step', value: undefined, reason: 'give a range of candidate latitudes (or --at DEG)' });
  let top: number | undefined;
  if (str('top') !== undefined) {
    top = Number(str('top'));
    if (!Number.isInteger(top) || top < 1) problems.push({ field: '--top', value: str('top'), reason: 'a whole number of at least 1' });
  }
  if (parsed.positionals.length !== 1) {
    problems.push({ field: 'CAMPAIGN.json', value: parsed.positionals.join(' '), reason: parsed.positionals.length === 0 ? 'name one campaign file' : 'name exactly one campaign file' });
  }
  if (problems.length > 0) throw new ValidationError(problems, 'arcfield plan');
  const file = await loadCampaignFile(parsed.positionals[0]);
  const plan = planCampaign(file, {
    latitudesDeg: at,
    ...(from !== undefined && to !== undefined && step !== undefined ? { range: { fromDeg: from, toDeg: to, stepDeg: step } } : {}),
    includeRepeats: values['no-repeats'] !== true,
  });
  if (values.json === true) {
    const candidates = top === undefined ? plan.candidates : plan.candidates.slice(0, top);
    process.stdout.write(JSON.stringify({ ...plan, candidates }, null, 2) + '\n');
  } else {
    process.stdout.write(formatPlan(plan, top));
  }
  return 0;
}
