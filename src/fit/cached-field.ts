// A result field computed when first read, then kept.
//
// Why: a refit on every save needs the coefficients and the flags at once; some outputs (the
// M-estimators' covariance, the L1 fit's MAD scale) cost a pass over the data that most callers
// never read. MASS (summary.rlm) and statsmodels (cached properties such as RLMResults.bcov) defer
// the same quantities. The field is an own, enumerable accessor, so spreading, JSON and
// structuredClone (a copy sent to a worker) all see the value; assigning replaces it.
// The compute function reads the problem's arrays when first called: a caller that mutates X or y
// before the first read gets the new data's value (the app and the CLI build a fresh problem per solve).
//
// One getter/setter pair per field NAME, shared by every object, with the per-object state under
// a non-enumerable symbol: V8 gives objects whose accessors are the same functions one shared
// hidden class, where fresh closures per object made a new hidden class per result — measured on
// a fit session's refit-after-one-reading loop as a third of its time in garbage collection.

const STATE = Symbol('arcfield.cachedFields');

interface Slot {
  compute: (() => unknown) | null;
  value: unknown;
}

type Holder = { [STATE]?: Record<PropertyKey, Slot> };

const accessors = new Map<PropertyKey, PropertyDescriptor>();

function accessorFor(key: PropertyKey): PropertyDescriptor {
  let d = accessors.get(key);
  if (!d) {
    d = {
      enumerable: true,
      configurable: true,
      get(this: Holder): unknown {
        const slot = (this[STATE] as Record<PropertyKey, Slot>)[key];
        if (slot.compute) {
          const compute = slot.compute;
          slot.value = compute();
          slot.compute = null;
        }
        return slot.value;
      },
      set(this: Holder, v: unknown): void {
        const slot = (this[STATE] as Record<PropertyKey, Slot>)[key];
        slot.value = v;
        slot.compute = null;
      },
    };
    accessors.set(key, d);
  }
  return d;
}

/** Defines `target[key]` as computed by `compute` on first read and cached (writable). */
export function defineCachedField<T extends object, K extends keyof T>(target: T, key: K, compute: () => T[K]): void {
  const holder = target as Holder;
  let state = holder[STATE];
  if (!state) {
    state = {};
    Object.defineProperty(holder, STATE, { value: state, enumerable: false, configurable: true, writable: false });
  }
  state[key] = { compute, value: undefined };
  Object.defineProperty(target, key, accessorFor(key));
}
