// Test helper: the classic degree-length reduction of exact arcs and its least-squares fit,
// solved with ml-matrix (an outside solver, not src/geodesy's QR). Not a test file.
import { Matrix, solve } from 'ml-matrix';
import type { DegreeCoefficients } from '../../src/geodesy/index.ts';

export interface ArcRow { fromLatitudeDeg: number; toLatitudeDeg: number; arcM: number }

/** Rows y = s/Δφ (m per degree) at x = sin²(mid latitude), fitted with 2 or 3 terms and optional weights. */
export function fitDegreeModel(rows: readonly ArcRow[], terms: 2 | 3, weights?: readonly number[]): DegreeCoefficients {
  const sw = rows.map((_, i) => Math.sqrt(weights?.[i] ?? 1));
  const design = rows.map((r, i) => {
    const x = Math.sin(((r.fromLatitudeDeg + r.toLatitudeDeg) / 2) * (Math.PI / 180)) ** 2;
    return (terms === 2 ? [1, x] : [1, x, x * x]).map((v) => v * sw[i]);
  });
  const y = rows.map((r, i) => (r.arcM / (r.toLatitudeDeg - r.fromLatitudeDeg)) * sw[i]);
  const beta = solve(new Matrix(design), Matrix.columnVector(y), true).to1DArray();
  return terms === 2 ? { c: beta[0], m: beta[1] } : { c: beta[0], m: beta[1], k: beta[2] };
}

export function midLatitudes(rows: readonly ArcRow[]): number[] {
  return rows.map((r) => (r.fromLatitudeDeg + r.toLatitudeDeg) / 2);
}
