// A result field computed when first read, then kept.
//
// Why: a refit on every save needs the coefficients and the flags at once; some outputs (the
// M-estimators' covariance, the L1 fit's MAD scale) cost a pass over the data that most callers
// never read. MASS (summary.rlm) and statsmodels (cached properties such as RLMResults.bcov) defer
// the same quantities. The field is an own, enumerable accessor, so spreading, JSON and
// structuredClone (a copy sent to a worker) all see the value; assigning replaces it.
// The compute function reads the problem's arrays when first called: a caller that mutates X or y
// before the first read gets the new data's value (the app and the CLI build a fresh problem per solve).

/** Defines `target[key]` as computed by `compute` on first read and cached (writable). */
export function defineCachedField<T extends object, K extends keyof T>(target: T, key: K, compute: () => T[K]): void {
  let ready = false;
  let value: T[K] | undefined;
  Object.defineProperty(target, key, {
    enumerable: true,
    configurable: true,
    get: (): T[K] => {
      if (!ready) {
        value = compute();
        ready = true;
      }
      return value as T[K];
    },
    set: (v: T[K]) => {
      value = v;
      ready = true;
    },
  });
}
