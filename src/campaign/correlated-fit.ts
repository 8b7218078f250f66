// solveCampaign's least squares under `propagated` weights: generalised least squares with the
// full covariance of the arcs, Σ = D_s + B·S_φ·Bᵀ, so that arcs sharing a station are correlated
// through its latitude error instead of being treated as independent (treating them as independent
// misstates σ(1/f) about 2× on a chain of arcs: test/campaign/correlated-solve.test.ts).
//
// Rigorous model: reliability-gls.ts (Gauss–Newton on the whitened problem), started from the
// independent-rows fit's (a, f), whose global search over f makes the start safe. Degree models:
// degree-gls.ts (linear, whitened by the Cholesky factor of the row covariance).
//
// Everything a crew sees is made consistent with that Σ: coefficients, covariance σ̂₀²(JᵀΣ⁻¹J)⁻¹,
// σ̂₀² = vᵀΣ⁻¹v/(n − p) and the χ² test on vᵀΣ⁻¹v, redundancy, Baarda's w and the MDB
// (gls-diagnostics.ts), and the standardized residuals: uᵢ = vᵢ/√(Q_vv)ᵢᵢ, the residual over
// its own a-priori standard deviation from the GLS residual covariance Q_vv = Σ − J Q Jᵀ (then
// divided by the robust scale of the u's, floored at 1, as for independent rows: residual-flags.ts).
// An arc that no other reading checks ((Q_vv)ᵢᵢ ≈ 0) gets z = 0 and stays out of that scale.
import type { PreparedArc } from './prepare-arcs.ts';
import type { ModelId } from './records.ts';
import type { ArcNetwork } from './reliability-network.ts';
import { fitCorrelatedArcs } from './reliability-gls.ts';
import { degreeRowCovariance, fitDegreeGls } from './degree-gls.ts';
import { glsDiagnostics, type GlsDiagnostics } from './gls-diagnostics.ts';
import { degreeFigure } from './figure-uncertainty.ts';
import {
  degreeCoefficients, degreeResidual, ellipsoidCoefficients, ellipsoidResidual, finiteOrNull, noFit,
  type ArcFitNumbers, type FitOutcome,
} from './fit-outcome.ts';

/** The GLS could not be formed (Σ not numerically positive definite); the caller keeps independent rows and says why. */
export interface GlsFallback { fallback: string }

const GLS_WORDS = 'generalised least squares with the full arc covariance (arcs that share a station are correlated through its latitude)';

function numbersFrom(network: ArcNetwork, d: GlsDiagnostics | null): Map<string, ArcFitNumbers> {
  const out = new Map<string, ArcFitNumbers>();
  network.arcs.forEach((arc, i) => {
    if (!d || !d.controlled[i]) {
      out.set(arc.id, { flagWeight: 0, inScale: false, ...(d ? { redundancy: finiteOrNull(d.redundancy[i]) ?? undefined } : {}) });
      return;
    }
    out.set(arc.id, {
      flagWeight: 1 / d.residualVariance[i], inScale: true,
      redundancy: d.redundancy[i], wTest: d.wTest[i], minimalDetectableBias: d.minimalDetectableBias[i],
    });
  });
  return out;
}

/** GLS of (a, f) from `start` (the independent-rows solution). */
export function glsEllipsoidOutcome(
  network: ArcNetwork, start: { semiMajorAxisM: number; flattening: number }, startIterations: number, startReason: string,
): FitOutcome | GlsFallback {
  const fit = fitCorrelatedArcs(network, { start });
  if (fit.status === 'not-positive-definite') return { fallback: `the ${fit.reason}` };
  if (fit.status === 'too-few-arcs' || fit.status === 'rank-deficient') return noFit(fit.status, fit.reason, 2);
  const figure = fit.figure;
  if (!figure || !fit.design || !fit.factor || !fit.covarianceApriori) return noFit('rank-deficient', fit.reason, 2);
  const d = fit.degreesOfFreedom > 0 ? glsDiagnostics(fit.design.J, 2, fit.covarianceApriori, fit.design.sigma, fit.factor, fit.residualsM) : null;
  const reason = `${GLS_WORDS}: ${fit.reason}, from the independent-rows fit (${startReason})`;
  return {
    status: fit.status === 'ok' ? 'ok' : 'not-converged',
    message: fit.status === 'ok' ? '' : `the generalised least squares did not converge: ${fit.reason}`,
    coefficients: ellipsoidCoefficients(figure), figure,
    residualOf: ellipsoidResidual(fit.semiMajorAxisM, fit.flattening),
    weightOf: (arc) => arc.geometry?.weightM ?? 1,
    arcNumbers: numbersFrom(network, d),
    quadraticForm: fit.quadraticForm,
    objective: fit.quadraticForm,
    iterations: startIterations + fit.iterations,
    converged: fit.converged,
    reason,
    p: 2,
    note: '',
  };
}

/** GLS of the degree model (c, m[, k]) with the full row covariance. */
export function glsDegreeOutcome(network: ArcNetwork, inFit: readonly PreparedArc[], model: Exclude<ModelId, 'ellipsoid'>): FitOutcome | GlsFallback {
  const p = model === 'degree2' ? 3 : 2;
  const rows = inFit.map((a) => a.geometry?.row).filter((r) => r !== undefined);
  const gls = fitDegreeGls(rows, model, degreeRowCovariance(network));
  if (!gls.ok) {
    if (gls.fit === null) return { fallback: `the degree rows' ${gls.reason}` };
    return noFit(gls.fit.status === 'too-few-rows' ? 'too-few-arcs' : 'rank-deficient', gls.reason, p);
  }
  const beta = Array.from(gls.fit.coefficients);
  const cov = gls.fit.covariance && gls.fit.covariance.every(Number.isFinite) ? gls.fit.covariance : null;
  const d = rows.length > p ? glsDiagnostics(gls.X, p, gls.cofactor, gls.sigma, gls.factor, gls.fit.residuals) : null;
  return {
    status: 'ok', message: '',
    coefficients: degreeCoefficients(model, beta, cov), figure: degreeFigure(beta, cov, rows),
    residualOf: degreeResidual(beta),
    weightOf: (arc) => arc.geometry?.row.weight ?? 1,
    arcNumbers: numbersFrom(network, d),
    quadraticForm: gls.quadraticForm,
    objective: gls.quadraticForm,
    iterations: 0, converged: true,
    reason: `${GLS_WORDS}: ${gls.fit.reason}`,
    p, note: '',
  };
}
