// The floor: one plain pass over the fitting data, Σ|yᵢ − xᵢᵀβ| for a fixed β, which every exact
// method must at least do once (an L1 or L∞ optimum cannot be certified without looking at every
// residual). Specialised for p = 2 and 3 with the coefficients in locals so the loop is as fast
// as plain JavaScript gets: the floor must not be flattering to the ratio "ours / floor".
export function onePassFloor(X: Float64Array, y: Float64Array, p: number, beta: ArrayLike<number>): number {
  const n = y.length;
  let s = 0;
  if (p === 2) {
    const b0 = beta[0];
    const b1 = beta[1];
    for (let i = 0; i < n; i++) s += Math.abs(y[i] - b0 * X[2 * i] - b1 * X[2 * i + 1]);
    return s;
  }
  if (p === 3) {
    const b0 = beta[0];
    const b1 = beta[1];
    const b2 = beta[2];
    for (let i = 0; i < n; i++) s += Math.abs(y[i] - b0 * X[3 * i] - b1 * X[3 * i + 1] - b2 * X[3 * i + 2]);
    return s;
  }
  for (let i = 0; i < n; i++) {
    let r = y[i];
    for (let j = 0; j < p; j++) r -= beta[j] * X[i * p + j];
    s += Math.abs(r);
  }
  return s;
}
