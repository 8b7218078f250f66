// Quick timings of the exact estimators (least absolute deviations, minimax) on the benchmark
// data, beside the one-pass floor, in one process: `npx tsx bench/quick-exact.ts [--max-n N]`.
//
// For each n in 10⁴…10⁶ and p = 2, 3: the floor (bench/harness/floor-pass.ts), a cold fit, and a
// warm refit after one more reading (the previous solution as the start), each as the median and
// minimum of several calls after a warm-up call, in wall-clock milliseconds and in CPU
// milliseconds (process.cpuUsage; on a shared machine wall time also counts other processes).
// Every fit's `converged` flag is printed: the estimators certify their own optimum (dual
// certificate / dual lower bound); the comparison with the reference solvers' objectives is
// bench/'s job. Data: bench/generate.ts (seeded, invented).
import { fitLeastAbsolute } from '../src/fit/least-absolute.ts';
import { fitMinimax } from '../src/fit/minimax.ts';
import type { FitOptions, FitResult, LinearProblem } from '../src/fit/types.ts';
import { designMatrix, generateDataset } from './generate.ts';
import { onePassFloor } from './harness/floor-pass.ts';

const REPEATS = 7;
const sizes = [10_000, 100_000, 1_000_000];
const maxArg = process.argv.indexOf('--max-n');
const maxN = maxArg >= 0 ? Number(process.argv[maxArg + 1]) : Infinity;

interface Timed {
  wallMedian: number;
  wallMin: number;
  cpuMin: number;
  result: unknown;
}

/** Warm-up calls before timing (the optimising compiler needs several on small inputs). */
const WARMUP_CALLS = 5;
/** At least REPEATS timed calls, and more until this much wall time, so fast calls are not one noisy sample. */
const MIN_TOTAL_MS = 300;

function time(f: () => unknown): Timed {
  for (let k = 0; k < WARMUP_CALLS; k++) f();
  const wall: number[] = [];
  const cpu: number[] = [];
  let result: unknown;
  let total = 0;
  for (let k = 0; k < REPEATS || (total < MIN_TOTAL_MS && k < 2000); k++) {
    const c0 = process.cpuUsage();
    const t0 = process.hrtime.bigint();
    result = f();
    const t1 = process.hrtime.bigint();
    const c = process.cpuUsage(c0);
    wall.push(Number(t1 - t0) / 1e6);
    cpu.push((c.user + c.system) / 1000);
    total += wall[wall.length - 1];
  }
  wall.sort((a, b) => a - b);
  cpu.sort((a, b) => a - b);
  return { wallMedian: wall[wall.length >> 1], wallMin: wall[0], cpuMin: cpu[0], result };
}

function problemOf(n: number, p: 2 | 3): LinearProblem {
  const { x, y } = generateDataset({ n, p });
  return { n, p, X: designMatrix(x, p), y };
}

/** The problem without its last row: the state before "one more reading". */
function withoutLast(pr: LinearProblem): LinearProblem {
  return { n: pr.n - 1, p: pr.p, X: pr.X.subarray(0, (pr.n - 1) * pr.p), y: pr.y.subarray(0, pr.n - 1) };
}

const ms = (v: number): string => v.toFixed(v < 10 ? 2 : 1).padStart(8);
const rows: string[] = [];
rows.push(['estimator', 'p', 'n', 'floor', 'cold med', 'cold min', 'cold cpu', '×floor', 'warm med', 'warm/cold', 'iters c/w', 'exact'].map((h) => h.padStart(9)).join(' '));
for (const n of sizes.filter((s) => s <= maxN)) {
  for (const p of [2, 3] as const) {
    const pr = problemOf(n, p);
    const beta = p === 2 ? [110574, 1120] : [110574, 1120, 1.2];
    const floor = time(() => onePassFloor(pr.X, pr.y, p, beta));
    for (const [name, fit] of [['least-absolute', fitLeastAbsolute], ['minimax', fitMinimax]] as const) {
      const fitter: (problem: LinearProblem, options?: FitOptions) => FitResult = fit;
      const cold = time(() => fitter(pr));
      const previous = fitter(withoutLast(pr));
      const warm = time(() => fitter(pr, { warmStart: previous }));
      const c = cold.result as FitResult;
      const w = warm.result as FitResult;
      rows.push([
        name.padStart(9), String(p).padStart(9), String(n).padStart(9), ms(floor.wallMedian), ms(cold.wallMedian), ms(cold.wallMin), ms(cold.cpuMin),
        (cold.wallMin / floor.wallMin).toFixed(1).padStart(9), ms(warm.wallMedian), (warm.wallMin / cold.wallMin).toFixed(3).padStart(9),
        `${c.iterations}/${w.iterations}`.padStart(9), String(c.converged && w.converged).padStart(9),
      ].join(' '));
    }
  }
}
console.log(`times in ms (wall median / min, CPU min over ≥ ${REPEATS} calls and ≥ ${MIN_TOTAL_MS} ms after ${WARMUP_CALLS} warm-up calls); ×floor = cold min / floor min; warm/cold = warm min / cold min`);
console.log(rows.join('\n'));
