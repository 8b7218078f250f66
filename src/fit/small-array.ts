// Fresh small Float64Arrays carved from a shared chunk, for the p×p temporaries of the exact fits.
//
// Why: V8 keeps a typed array of at most 64 bytes inside its heap; from 65 bytes on (a 3×3 matrix
// is 72) it allocates a separate backing store, ~0.5–0.8 µs here against ~0.05 µs for 64 bytes
// (measured with Node 20). A fit session's refit makes a dozen p×p temporaries (LU factors,
// frames, inverses): as much time as its arithmetic. A view on a chunk costs what a small on-heap
// array costs. Each view is fresh and zeroed (a chunk is handed out once, front to back, never
// reused); a chunk is freed by the GC with its last view.
// Only for arrays that stay inside the fit layer: a view's `.buffer` is the whole chunk, so one
// sent to a worker (structuredClone) would copy 64 KiB.

const CHUNK_BYTES = 1 << 16;
/** Larger arrays are allocated as usual (they are rare, and their own cost dwarfs the allocation). */
const MAX_ELEMENTS = 256;
/** Up to this many bytes V8 already allocates on its heap (its typed_array_max_size_in_heap). */
const ON_HEAP_BYTES = 64;

let chunk = new ArrayBuffer(CHUNK_BYTES);
let used = 0;

/** As `new Float64Array(n)`: zero-filled, shared with nothing else. */
export function smallFloat64(n: number): Float64Array {
  const bytes = n * Float64Array.BYTES_PER_ELEMENT;
  if (n > MAX_ELEMENTS || bytes <= ON_HEAP_BYTES) return new Float64Array(n);
  if (used + bytes > CHUNK_BYTES) {
    chunk = new ArrayBuffer(CHUNK_BYTES);
    used = 0;
  }
  const view = new Float64Array(chunk, used, n);
  used += bytes;
  return view;
}

/** A fresh copy of a[0 … n) (as `Float64Array.from(a.subarray(0, n))`, without the iterator). */
export function smallCopy(a: Float64Array, n: number): Float64Array {
  const out = smallFloat64(n);
  out.set(a.length === n ? a : a.subarray(0, n));
  return out;
}
