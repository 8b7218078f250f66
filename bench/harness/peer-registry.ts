// Every reference tool the benchmark runs beside ours, in one table. A peer is timed and competes
// for "fastest peer"; a check is run for correctness only (a converged or rule-matched reference)
// and never counts as the fastest. Growth is the method's expected time order t ∝ nᵍ, used only to
// predict the first extrapolation to a larger n (after two sizes the measured slope is used).
import type { Estimator } from '../../src/fit/types.ts';

export type PeerRuntime = 'R' | 'python' | 'node';

export interface PeerSpec {
  id: string;
  label: string;
  estimator: Estimator;
  role: 'peer' | 'check';
  runtime: PeerRuntime;
  /** Path under bench/peers/. */
  script: string;
  args: string[];
  growth: number;
  /** R packages or Python modules the script needs (node peers: npm packages). */
  requires: string[];
}

const R = (id: string, label: string, estimator: Estimator, script: string, args: string[], growth: number, requires: string[], role: 'peer' | 'check' = 'peer'): PeerSpec =>
  ({ id, label, estimator, role, runtime: 'R', script, args, growth, requires: [...requires, 'jsonlite'] });
const PY = (id: string, label: string, estimator: Estimator, script: string, args: string[], growth: number, requires: string[]): PeerSpec =>
  ({ id, label, estimator, role: 'peer', runtime: 'python', script, args, growth, requires: ['numpy', ...requires] });

export const PEERS: readonly PeerSpec[] = [
  // least squares
  PY('numpy-lstsq', 'numpy lstsq', 'least-squares', 'numpy-lstsq.py', [], 1, []),
  R('r-lm-fit', 'R .lm.fit', 'least-squares', 'lm-fit.R', [], 1, []),
  // least absolute deviations
  R('quantreg-br', 'quantreg rq.fit br', 'least-absolute', 'quantreg-rq.R', ['--method', 'br'], 2, ['quantreg']),
  R('quantreg-fn', 'quantreg rq.fit fn', 'least-absolute', 'quantreg-rq.R', ['--method', 'fn'], 1, ['quantreg']),
  R('quantreg-pfn', 'quantreg rq.fit pfn', 'least-absolute', 'quantreg-rq.R', ['--method', 'pfn'], 1, ['quantreg']),
  PY('scipy-l1-highs-ds', 'scipy linprog highs-ds', 'least-absolute', 'scipy-linprog.py', ['--problem', 'l1', '--method', 'highs-ds'], 2, ['scipy']),
  PY('scipy-l1-highs-ipm', 'scipy linprog highs-ipm', 'least-absolute', 'scipy-linprog.py', ['--problem', 'l1', '--method', 'highs-ipm'], 1.2, ['scipy']),
  PY('scipy-l1-dual-highs-ds', 'scipy linprog highs-ds dual', 'least-absolute', 'scipy-linprog.py', ['--problem', 'l1', '--method', 'highs-ds', '--form', 'dual'], 1.5, ['scipy']),
  PY('statsmodels-quantreg', 'statsmodels QuantReg', 'least-absolute', 'statsmodels-fits.py', ['--model', 'quantreg'], 1, ['statsmodels']),
  { id: 'yalps-l1-dual', label: 'yalps L1 dual', estimator: 'least-absolute', role: 'peer', runtime: 'node', script: 'yalps-lp.ts', args: ['--problem', 'l1'], growth: 3, requires: ['yalps'] },
  // minimax
  PY('scipy-linf-highs-ds', 'scipy linprog highs-ds', 'minimax', 'scipy-linprog.py', ['--problem', 'linf', '--method', 'highs-ds'], 1.2, ['scipy']),
  PY('scipy-linf-highs-ipm', 'scipy linprog highs-ipm', 'minimax', 'scipy-linprog.py', ['--problem', 'linf', '--method', 'highs-ipm'], 1.2, ['scipy']),
  { id: 'yalps-linf-dual', label: 'yalps L∞ dual', estimator: 'minimax', role: 'peer', runtime: 'node', script: 'yalps-lp.ts', args: ['--problem', 'linf'], growth: 1.2, requires: ['yalps'] },
  // Huber
  R('mass-rlm-huber', 'MASS rlm huber', 'huber', 'mass-rlm.R', ['--psi', 'huber', '--acc', '1e-4', '--maxit', '20'], 1, ['MASS']),
  PY('statsmodels-rlm-huber', 'statsmodels RLM huber', 'huber', 'statsmodels-fits.py', ['--model', 'rlm-huber'], 1, ['statsmodels']),
  R('mass-rlm-huber-tight', 'MASS rlm huber, acc 1e-12', 'huber', 'mass-rlm.R', ['--psi', 'huber', '--acc', '1e-12', '--maxit', '1000'], 1, ['MASS'], 'check'),
  R('irls-fixed-huber', 'R IRLS fixed scale huber', 'huber', 'irls-fixed-scale.R', ['--psi', 'huber'], 1, ['MASS', 'quantreg'], 'check'),
  // Tukey biweight
  R('mass-rlm-bisquare', 'MASS rlm bisquare', 'tukey', 'mass-rlm.R', ['--psi', 'bisquare', '--acc', '1e-4', '--maxit', '20'], 1, ['MASS']),
  PY('statsmodels-rlm-bisquare', 'statsmodels RLM bisquare', 'tukey', 'statsmodels-fits.py', ['--model', 'rlm-bisquare'], 1, ['statsmodels']),
  R('mass-rlm-bisquare-tight', 'MASS rlm bisquare, acc 1e-12', 'tukey', 'mass-rlm.R', ['--psi', 'bisquare', '--acc', '1e-12', '--maxit', '1000'], 1, ['MASS'], 'check'),
  R('irls-fixed-bisquare', 'R IRLS fixed scale bisquare', 'tukey', 'irls-fixed-scale.R', ['--psi', 'bisquare'], 1, ['MASS', 'quantreg'], 'check'),
];

/**
 * Which result the exactness test uses. L1/L∞: the best objective among every peer and check that
 * finished. Least squares: numpy lstsq (SVD), else R .lm.fit. Huber/Tukey: the R IRLS with our
 * scale rule (MASS's own rule re-estimates the scale every iteration from a least-squares start,
 * which is a different estimator: its tight run is reported beside, not used for the verdict).
 */
export const COEFFICIENT_REFERENCE: Partial<Record<Estimator, readonly string[]>> = {
  'least-squares': ['numpy-lstsq', 'r-lm-fit'],
  huber: ['irls-fixed-huber'],
  tukey: ['irls-fixed-bisquare'],
};
