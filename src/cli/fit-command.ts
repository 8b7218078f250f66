// `arcfield fit CAMPAIGN.json [--model …] [--estimator …] [--weighting …] [--json]`
// Loads and validates the campaign file, runs solveCampaign, and prints a readable summary (or the
// full result as JSON). Options on the command line override the file's `settings`, which override
// the engine defaults (ellipsoid, least-squares, propagated).
// Exit: 0 a figure (also when an iterative estimator stopped at its cap — a warning is printed),
// 2 bad input (the file, an option, or a campaign that cannot determine a figure), 1 internal failure.
import { InputError, ValidationError, type Problem } from '../errors.ts';
import { ESTIMATOR_IDS, MODEL_IDS, WEIGHTING_IDS, solveCampaign, type SolveOptions } from '../campaign/index.ts';
import { loadCampaignFile } from '../io/campaign-file.ts';
import { parseCommandArgs, pickChoice, reportProblems } from './cli-args.ts';
import { formatResultTable } from './result-table.ts';

export const FIT_HELP = `usage: arcfield fit CAMPAIGN.json [options]

Fit the figure of the Earth to a campaign file and list the suspect readings.

options:
  --model degree|degree2|ellipsoid
        ellipsoid (default): rigorous fit of a and f to the arcs with exact meridian distances;
        degree: y = c + m·sin²φ in metres per degree; degree2: adds k·sin⁴φ.
  --estimator least-squares|least-absolute|minimax|huber|tukey     (default least-squares)
  --weighting propagated|equal
        propagated (default): each arc weighted by its distance sigma and its stations' latitude
        sigmas carried through the reduction; equal: every arc the same weight.
  --json    print the full result as JSON on stdout
  -h, --help

The file's "settings" apply where an option is not given.
Exit codes: 0 figure computed, 2 bad input (every problem listed), 1 internal failure.
`;

export async function run(args: readonly string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseCommandArgs('fit', args, {
      model: { type: 'string' },
      estimator: { type: 'string' },
      weighting: { type: 'string' },
      json: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    });
  } catch (err) {
    if (err instanceof ValidationError) return reportProblems(err);
    throw err;
  }
  if (parsed.values.help === true) {
    process.stdout.write(FIT_HELP);
    return 0;
  }
  const problems: Problem[] = [];
  const model = pickChoice(problems, 'model', parsed.values.model, MODEL_IDS);
  const estimator = pickChoice(problems, 'estimator', parsed.values.estimator, ESTIMATOR_IDS);
  const weighting = pickChoice(problems, 'weighting', parsed.values.weighting, WEIGHTING_IDS);
  if (parsed.positionals.length !== 1) {
    problems.push({
      field: 'CAMPAIGN.json', value: parsed.positionals.join(' '),
      reason: parsed.positionals.length === 0 ? 'name one campaign file' : 'name exactly one campaign file',
    });
  }
  if (problems.length > 0) return reportProblems(new ValidationError(problems, 'arcfield fit'));

  const path = parsed.positionals[0];
  let file;
  try {
    file = await loadCampaignFile(path);
  } catch (err) {
    if (err instanceof ValidationError) return reportProblems(err);
    throw err;
  }
  const options: SolveOptions = {
    model: model ?? file.settings?.model,
    estimator: estimator ?? file.settings?.estimator,
    weighting: weighting ?? file.settings?.weighting,
    suspectThreshold: file.settings?.suspectThreshold,
  };
  let result;
  try {
    result = solveCampaign(file, options);
  } catch (err) {
    // An option value the engine refuses (the file passed the schema): bad input, named.
    if (err instanceof InputError) return reportProblems(new ValidationError([{ field: err.field, value: err.value, reason: err.reason, source: path }], path));
    throw err;
  }
  if (parsed.values.json === true) process.stdout.write(JSON.stringify(result, null, 2) + '\n');
  else process.stdout.write(formatResultTable(file, result));

  if (result.status === 'not-converged') {
    process.stderr.write(`arcfield fit: warning: ${result.statusMessage}\n`);
    return 0;
  }
  if (result.status !== 'ok') {
    process.stderr.write(`arcfield fit: ${path}: no figure: ${result.statusMessage}\n`);
    return 2;
  }
  return 0;
}
