// Reusable scratch arrays for the fitters' temporary n-sized buffers.
//
// Why: on the machines measured here (bench/), a fresh 8 MB Float64Array costs 6–16 ms to
// allocate and touch (new zero pages, faulted in one by one), against 0.3 ms to rewrite one that
// is already mapped — more than a whole pass over 10⁶ readings. A buffer that never leaves a fit
// (a copy for a selection, a chunk of residuals) is therefore taken from here and reused by the
// next fit. JavaScript runs one fit at a time per thread (each worker has its own module copy);
// a slot is used by one function at a time and its contents are dead once that function returns.
// Arrays that are returned to the caller (residuals, weights) are never taken from here.
// Small buffers gain too: a typed array over 64 bytes lives outside V8's heap, and allocating one
// of a few hundred entries costs ~1–2 µs here (an ArrayBuffer, external-memory accounting, a
// finalizer for the GC), more than the fit session's refit spends on its arithmetic.

type Typed = Float64Array | Int32Array | Int8Array | Uint8Array;

const float64Slots = new Map<string, Float64Array>();
const int32Slots = new Map<string, Int32Array>();
const int8Slots = new Map<string, Int8Array>();
const uint8Slots = new Map<string, Uint8Array>();

function take<T extends Typed>(slots: Map<string, T>, make: (length: number) => T, slot: string, n: number): T {
  let buf = slots.get(slot);
  if (!buf || buf.length < n) {
    // Grow by half again, so a campaign that gains readings one by one does not reallocate each time.
    buf = make(Math.max(n, Math.ceil((buf?.length ?? 0) * 1.5)));
    slots.set(slot, buf);
  }
  return buf.length === n ? buf : (buf.subarray(0, n) as T);
}

/** A Float64Array view of length n from the named slot (contents unspecified), grown as needed. */
export function scratchFloat64(slot: string, n: number): Float64Array {
  return take(float64Slots, (k) => new Float64Array(k), slot, n);
}

/** As scratchFloat64, for Int32Array. */
export function scratchInt32(slot: string, n: number): Int32Array {
  return take(int32Slots, (k) => new Int32Array(k), slot, n);
}

/** As scratchFloat64, for Int8Array. */
export function scratchInt8(slot: string, n: number): Int8Array {
  return take(int8Slots, (k) => new Int8Array(k), slot, n);
}

/** As scratchFloat64, for Uint8Array. */
export function scratchUint8(slot: string, n: number): Uint8Array {
  return take(uint8Slots, (k) => new Uint8Array(k), slot, n);
}

/** Drops every slot (for tests that measure memory, and for a long-lived process that is done fitting). */
export function releaseScratch(): void {
  float64Slots.clear();
  int32Slots.clear();
  int8Slots.clear();
  uint8Slots.clear();
}
