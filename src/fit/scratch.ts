// Reusable scratch arrays for the fitters' temporary n-sized buffers.
//
// Why: on the machines measured here (bench/), a fresh 8 MB Float64Array costs 6–16 ms to
// allocate and touch (new zero pages, faulted in one by one), against 0.3 ms to rewrite one that
// is already mapped — more than a whole pass over 10⁶ readings. A buffer that never leaves a fit
// (a copy for a selection, a chunk of residuals) is therefore taken from here and reused by the
// next fit. JavaScript runs one fit at a time per thread (each worker has its own module copy);
// a slot is used by one function at a time and its contents are dead once that function returns.
// Arrays that are returned to the caller (residuals, weights) are never taken from here.

const slots = new Map<string, Float64Array>();

/** A Float64Array view of length n from the named slot (contents unspecified), grown as needed. */
export function scratchFloat64(slot: string, n: number): Float64Array {
  let buf = slots.get(slot);
  if (!buf || buf.length < n) {
    // Grow by half again, so a campaign that gains readings one by one does not reallocate each time.
    buf = new Float64Array(Math.max(n, Math.ceil((buf?.length ?? 0) * 1.5)));
    slots.set(slot, buf);
  }
  return buf.length === n ? buf : buf.subarray(0, n);
}

/** Drops every slot (for tests that measure memory, and for a long-lived process that is done fitting). */
export function releaseScratch(): void {
  slots.clear();
}
