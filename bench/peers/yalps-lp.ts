// Peer: exact minimax (L∞) and L1 fits with the npm LP library yalps (dense-tableau simplex),
// posed in dual form, which keeps the tableau to a few rows:
//
//   L∞ dual:  max Σ yᵢ(λᵢ − μᵢ)  s.t.  Σ (λᵢ − μᵢ) xᵢ = 0,  Σ (λᵢ + μᵢ) = 1,  λ, μ ≥ 0
//             (p + 1 equality rows, 2n columns; the optimum equals the primal minimax value).
//   L1 dual:  max Σ yᵢ dᵢ  s.t.  Σ dᵢ xᵢ = 0, −1 ≤ dᵢ ≤ 1, written with aᵢ = dᵢ + 1 ∈ [0, 2];
//             yalps has no column bounds, so each aᵢ ≤ 2 is a row: the dense tableau is n × n,
//             which is why this route stops at small n (the peer refuses above --max-tableau-mb).
//
// yalps returns only primal values, so the coefficients come from complementary slackness:
// for L∞ each positive λᵢ (μᵢ) pins rᵢ = +t (−t), giving p + 1 equations in (β, t); for L1 each
// aᵢ strictly inside (0, 2) pins rᵢ = 0. The orchestrator recomputes the objective from β on the
// full data, so a wrong recovery can only make this peer look worse, never better.
//
// Usage: node --import tsx bench/peers/yalps-lp.ts --data FILE --problem linf|l1 --budget S
//        --max-repeats K --min-sample S [--max-tableau-mb M]
import { readFileSync } from 'node:fs';
import { solve, type Coefficients, type Model, type Solution } from 'yalps';
import { readDataset } from '../harness/dataset-file.ts';
import { numberArg, parseKeyValueArgs } from '../harness/cli-args.ts';
import { smallLeastSquares } from '../harness/small-solve.ts';
import { timeCall } from '../harness/timing.ts';
import { designMatrix } from '../generate.ts';

const OBJECTIVE = -1;
/** yalps' own zero (its default precision): values at or below it are reported as absent. */
const YALPS_PRECISION = 1e-8;
/** Generous: the L∞ dual needs a few hundred pivots here, the L1 dual about n. */
const MAX_PIVOTS = 10_000_000;

/** Column coefficients generated on demand: 2n small objects instead of 2n·(p+2) pair arrays. */
class LinfColumn implements Iterable<readonly [number, number]> {
  constructor(private readonly X: Float64Array, private readonly y: Float64Array, private readonly p: number,
    private readonly row: number, private readonly sign: 1 | -1) {}
  *[Symbol.iterator](): Iterator<readonly [number, number]> {
    yield [OBJECTIVE, this.sign * this.y[this.row]];
    for (let j = 0; j < this.p; j++) yield [j, this.sign * this.X[this.row * this.p + j]];
    yield [this.p, 1];
  }
}

class L1Column implements Iterable<readonly [number, number]> {
  constructor(private readonly X: Float64Array, private readonly y: Float64Array, private readonly p: number,
    private readonly row: number) {}
  *[Symbol.iterator](): Iterator<readonly [number, number]> {
    yield [OBJECTIVE, this.y[this.row]];
    for (let j = 0; j < this.p; j++) yield [j, this.X[this.row * this.p + j]];
    yield [this.p + this.row, 1];
  }
}

interface Recovered {
  solution: Solution<number>;
  coefficients: Float64Array | null;
  note: string;
}

function solveLinf(X: Float64Array, y: Float64Array, n: number, p: number): Recovered {
  const variables: [number, Coefficients<number>][] = [];
  for (let i = 0; i < n; i++) {
    variables.push([2 * i, new LinfColumn(X, y, p, i, 1)]);
    variables.push([2 * i + 1, new LinfColumn(X, y, p, i, -1)]);
  }
  const constraints: [number, { equal: number }][] = [];
  for (let j = 0; j < p; j++) constraints.push([j, { equal: 0 }]);
  constraints.push([p, { equal: 1 }]);
  const model: Model<number, number> = { direction: 'maximize', objective: OBJECTIVE, constraints, variables };
  const solution = solve(model, { maxPivots: MAX_PIVOTS });
  if (solution.status !== 'optimal') return { solution, coefficients: null, note: `yalps status ${solution.status}` };
  const support = solution.variables.map(([key]) => key);
  const m = support.length;
  const A = new Float64Array(m * (p + 1));
  const b = new Float64Array(m);
  support.forEach((key, r) => {
    const i = key >> 1;
    const s = key % 2 === 0 ? 1 : -1; // λ active: rᵢ = +t; μ active: rᵢ = −t
    for (let j = 0; j < p; j++) A[r * (p + 1) + j] = X[i * p + j];
    A[r * (p + 1) + p] = s;
    b[r] = y[i];
  });
  const z = smallLeastSquares(A, b, m, p + 1);
  return { solution, coefficients: z ? z.subarray(0, p) : null, note: `support of ${m} rows (p + 1 = ${p + 1})` };
}

function solveL1(X: Float64Array, y: Float64Array, n: number, p: number): Recovered {
  const variables: [number, Coefficients<number>][] = [];
  for (let i = 0; i < n; i++) variables.push([i, new L1Column(X, y, p, i)]);
  const constraints: [number, { equal?: number; max?: number }][] = [];
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += X[i * p + j];
    constraints.push([j, { equal: s }]);
  }
  for (let i = 0; i < n; i++) constraints.push([p + i, { max: 2 }]);
  const model: Model<number, number> = { direction: 'maximize', objective: OBJECTIVE, constraints, variables };
  const solution = solve(model, { maxPivots: MAX_PIVOTS });
  if (solution.status !== 'optimal') return { solution, coefficients: null, note: `yalps status ${solution.status}` };
  const inside = solution.variables.filter(([, v]) => v > YALPS_PRECISION && v < 2 - YALPS_PRECISION).map(([key]) => key);
  const m = inside.length;
  const A = new Float64Array(m * p);
  const b = new Float64Array(m);
  inside.forEach((i, r) => {
    for (let j = 0; j < p; j++) A[r * p + j] = X[i * p + j];
    b[r] = y[i];
  });
  const z = smallLeastSquares(A, b, m, p);
  return { solution, coefficients: z, note: `${m} interpolated rows (p = ${p})` };
}

function main(): void {
  const args = parseKeyValueArgs(process.argv.slice(2), ['data', 'problem', 'budget', 'max-repeats', 'min-sample']);
  const { header, x, y } = readDataset(args.get('data') ?? '');
  const { n, p } = header;
  const problem = args.get('problem');
  const version = (JSON.parse(readFileSync(new URL('../../node_modules/yalps/package.json', import.meta.url), 'utf8')) as { version: string }).version;
  const base = { n, p, versions: { node: process.versions.node, yalps: version } };
  if (problem !== 'linf' && problem !== 'l1') throw new Error(`--problem ${String(problem)}: expected linf or l1`);
  const estimator = problem === 'linf' ? 'minimax' : 'least-absolute';
  const peer = `yalps ${problem === 'linf' ? 'L∞' : 'L1'} dual`;
  // yalps' dense tableau: (rows + 1)·(columns + 1) float64.
  const tableauBytes = problem === 'linf' ? 8 * (2 * p + 3) * (2 * n + 1) : 8 * (2 * p + n + 1) * (n + 1);
  const capMb = numberArg(args, 'max-tableau-mb', 2048);
  if (tableauBytes > capMb * 2 ** 20) {
    process.stdout.write(JSON.stringify({ ...base, peer, estimator, status: `skipped (dense tableau ${(tableauBytes / 2 ** 30).toFixed(1)} GiB > cap ${(capMb / 1024).toFixed(1)} GiB)`, seconds: [], coefficients: [] }) + '\n');
    return;
  }
  const X = designMatrix(x, p);
  const run = problem === 'linf' ? () => solveLinf(X, y, n, p) : () => solveL1(X, y, n, p);
  let last: Recovered | undefined;
  const timing = timeCall(run, {
    budgetSeconds: numberArg(args, 'budget'),
    maxRepeats: numberArg(args, 'max-repeats'),
    minSampleSeconds: numberArg(args, 'min-sample'),
  }, (r) => { last = r; });
  const r = last;
  if (!r) throw new Error('yalps peer: no result recorded');
  process.stdout.write(JSON.stringify({
    ...base, peer, estimator,
    seconds: timing.samples, callsPerSample: timing.callsPerSample,
    coefficients: r.coefficients ? Array.from(r.coefficients) : [],
    // The L1 dual was posed in aᵢ = dᵢ + 1, which shifts its value by Σyᵢ.
    objective: problem === 'linf' ? r.solution.result : r.solution.result - y.reduce((a, v) => a + v, 0),
    status: r.coefficients ? 'ok' : `no coefficients (${r.note})`,
    settings: `solve(model, { maxPivots: ${MAX_PIVOTS} }), precision ${YALPS_PRECISION} (default); ${r.note}`,
  }) + '\n');
}

main();
