// Predicts a peer's time at a larger n from its own smaller-n runs, to skip runs that would exceed
// the cap instead of waiting for them. Power law t = a·nᵅ through the two largest measured sizes;
// the slope is floored at 1 because no method here is sublinear (a small-n slope below 1 only
// shows start-up costs). With one measured size the method's known growth order stands in for α.

export interface SizeTime {
  n: number;
  seconds: number;
}

export interface Prediction {
  seconds: number;
  exponent: number;
  basis: string;
}

export function predictSeconds(history: readonly SizeTime[], n: number, growth: number): Prediction | null {
  const known = [...history].filter((h) => h.seconds > 0 && h.n < n).sort((a, b) => a.n - b.n);
  if (known.length === 0) return null;
  const last = known[known.length - 1];
  if (known.length === 1) {
    return { seconds: last.seconds * (n / last.n) ** growth, exponent: growth, basis: `n = ${last.n} with growth order ${growth}` };
  }
  const prev = known[known.length - 2];
  const measured = Math.log(last.seconds / prev.seconds) / Math.log(last.n / prev.n);
  const exponent = Math.max(1, Number.isFinite(measured) ? measured : 1);
  return { seconds: last.seconds * (n / last.n) ** exponent, exponent, basis: `slope ${measured.toFixed(2)} from n = ${prev.n}, ${last.n}` };
}
