// Per-row forms of the least-absolute-deviations preprocessing, written out for p = 2 and p = 3
// (the degree models: c + m·sin²φ, and with the x² term). Why: the generic `for j < p` loops,
// nested for a quadratic form, cost 40–80 ns a row in V8 at p = 3 (loop control, a bounds check
// per load, no unrolling for an unknown trip count), the straight-line forms ~5–10 ns; at
// n = 10⁶ the subsample's ~2·10⁴ rows pass through several of them. Each form computes the same
// products summed in the same order as the generic loop (0 + x = x exactly), so results are
// bit-for-bit those of the loop. Small functions: V8 inlines them into the calling loop.

/** Σⱼ A[o + j]·v[j], summed left to right. */
export function dotRow(A: Float64Array, o: number, v: Float64Array, p: number): number {
  if (p === 3) return A[o] * v[0] + A[o + 1] * v[1] + A[o + 2] * v[2];
  if (p === 2) return A[o] * v[0] + A[o + 1] * v[1];
  let f = 0;
  for (let j = 0; j < p; j++) f += A[o + j] * v[j];
  return f;
}

/** aQaᵀ for the row a = A[o .. o + p) and a p×p row-major Q: Σⱼ aⱼ·(Σₖ Qⱼₖaₖ), summed left to right. */
export function quadRow(A: Float64Array, o: number, Q: Float64Array, p: number): number {
  if (p === 3) {
    const a0 = A[o], a1 = A[o + 1], a2 = A[o + 2];
    return a0 * (Q[0] * a0 + Q[1] * a1 + Q[2] * a2) + a1 * (Q[3] * a0 + Q[4] * a1 + Q[5] * a2) + a2 * (Q[6] * a0 + Q[7] * a1 + Q[8] * a2);
  }
  if (p === 2) {
    const a0 = A[o], a1 = A[o + 1];
    return a0 * (Q[0] * a0 + Q[1] * a1) + a1 * (Q[2] * a0 + Q[3] * a1);
  }
  let s = 0;
  for (let j = 0; j < p; j++) {
    let t = 0;
    for (let k = 0; k < p; k++) t += Q[j * p + k] * A[o + k];
    s += A[o + j] * t;
  }
  return s;
}
