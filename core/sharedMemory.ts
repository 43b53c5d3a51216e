/**
 * The values of `a` in a SharedArrayBuffer: `a` itself when it is there already, else a copy.
 * Posted to a worker thread, shared values are read in place instead of copied.
 * Example: worker.postMessage({ x: sharedCopy(x) }).
 */
export function sharedCopy<T extends Float64Array | Int32Array>(a: T): T {
  if (a.buffer instanceof SharedArrayBuffer) return a;
  const copy = new (a.constructor as new (b: SharedArrayBuffer) => T)(new SharedArrayBuffer(a.byteLength));
  copy.set(a);
  return copy;
}

/**
 * n doubles in a SharedArrayBuffer where there is one (Node; a browser page only when it is
 * cross-origin isolated), else in an ordinary buffer. For arrays that worker threads read
 * later (x in order, the order itself), so posting them copies nothing.
 */
export function sharedFloat64(n: number): Float64Array {
  return typeof SharedArrayBuffer === 'function' ? new Float64Array(new SharedArrayBuffer(8 * n)) : new Float64Array(n);
}

/** n 32-bit integers, shared where possible (sharedFloat64). */
export function sharedInt32(n: number): Int32Array {
  return typeof SharedArrayBuffer === 'function' ? new Int32Array(new SharedArrayBuffer(4 * n)) : new Int32Array(n);
}
