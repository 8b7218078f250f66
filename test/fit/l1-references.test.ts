// Exact least absolute deviations checked from outside the code under test: brute force over
// every pair of rows (for p = 2 some optimal L1 line passes through two readings — an LP vertex),
// over every triple for p = 3, and the R quantreg (method "br") and scipy HiGHS optima saved by
// scripts/gen-fit-fixtures.sh in test/fixtures/fit/least-absolute.json.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fitLeastAbsolute } from '../../src/fit/least-absolute.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { loadProblem, readJson } from './fixtures.ts';

function solveSmall(A: number[][], b: number[]): number[] | null {
  const m = b.length;
  const M = A.map((r, i) => [...r, b[i]]);
  for (let c = 0; c < m; c++) {
    let piv = c;
    for (let r = c + 1; r < m; r++) if (Math.abs(M[r][c]) > Math.abs(M[piv][c])) piv = r;
    if (Math.abs(M[piv][c]) < 1e-12) return null;
    [M[c], M[piv]] = [M[piv], M[c]];
    for (let r = 0; r < m; r++) {
      if (r === c) continue;
      const f = M[r][c] / M[c][c];
      for (let k = c; k <= m; k++) M[r][k] -= f * M[c][k];
    }
  }
  return M.map((r, i) => r[m] / r[i]);
}

/** Brute force: the smallest Σ√wᵢ|rᵢ| over every fit interpolating p rows. */
function bruteForce(pr: LinearProblem): number {
  const { n, p, X, y } = pr;
  const sw = (i: number) => (pr.weights ? Math.sqrt(pr.weights[i]) : 1);
  let best = Infinity;
  const pick = (start: number, chosen: number[]): void => {
    if (chosen.length === p) {
      const beta = solveSmall(chosen.map((i) => Array.from({ length: p }, (_, j) => X[i * p + j])), chosen.map((i) => y[i]));
      if (!beta) return;
      let s = 0;
      for (let i = 0; i < n; i++) {
        let f = 0;
        for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
        s += sw(i) * Math.abs(y[i] - f);
      }
      best = Math.min(best, s);
      return;
    }
    for (let i = start; i < n; i++) pick(i + 1, [...chosen, i]);
  };
  pick(0, []);
  return best;
}

function seededProblem(seed: number, n: number, p: number, weighted: boolean): LinearProblem {
  let s = seed >>> 0 || 1;
  const rnd = () => { s = (Math.imul(s, 1664525) + 1013904223) >>> 0; return s / 2 ** 32; };
  const X = new Float64Array(n * p), y = new Float64Array(n), w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = Math.sin((rnd() * 70 * Math.PI) / 180) ** 2;
    for (let j = 0; j < p; j++) X[i * p + j] = x ** j;
    y[i] = 110574 + 1120 * x + (rnd() - 0.5) * 20 + (rnd() < 0.1 ? (rnd() - 0.5) * 400 : 0);
    w[i] = 0.25 + rnd() * 4;
  }
  return weighted ? { n, p, X, y, weights: w } : { n, p, X, y };
}

describe('fitLeastAbsolute against brute force over interpolating fits (LP vertex property)', () => {
  it('equals the best interpolating fit, p = 2 and 3, seeded', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 2 ** 31 }), fc.integer({ min: 2, max: 3 }), fc.integer({ min: 4, max: 25 }), fc.boolean(), (seed, p, n, weighted) => {
      const pr = seededProblem(seed, n, p, weighted);
      const fit = fitLeastAbsolute(pr);
      expect(fit.status).toBe('ok');
      within(fit.objective, bruteForce(pr), 1e-10, 'm', `L1 objective (seed ${seed}, p ${p}, n ${n})`, { relative: true, source: 'brute force over all p-row interpolants' });
    }), { seed: 20261202, numRuns: 60, verbose: true });
  });
});

describe('fitLeastAbsolute against R quantreg "br" and scipy HiGHS (test/fixtures/fit/least-absolute.json)', () => {
  const file = readJson<{ cases: { dataset: string; highs: { objective: number } | null; quantreg: { objective: number } | null }[] }>('least-absolute.json');
  for (const c of file.cases) {
    it(`${c.dataset}: objective equals the LP optimum to 1e-9 relative`, () => {
      const fit = fitLeastAbsolute(loadProblem(c.dataset));
      const refs = [c.highs?.objective, c.quantreg?.objective].filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
      if (refs.length === 0) return;
      const best = Math.min(...refs);
      expect(fit.status).toBe('ok');
      within(fit.objective, best, 1e-9, 'm', 'L1 objective', { relative: true, source: 'R quantreg rq(method="br") / scipy linprog highs' });
    });
  }
});
