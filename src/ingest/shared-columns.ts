/**
 * Columns on shared memory. The readers put the columns a series frame is made of (dates,
 * values, source lines) and the text codes on SharedArrayBuffers, so the check workers
 * (src/checks/parallel.ts) and the snapshot's writer (src/store/background-write.ts) see the
 * very same rows through views instead of receiving copies.
 * A SharedArrayBuffer is zero-filled like an ArrayBuffer and read and written the same way.
 */

export type SharedColumn = Int32Array | Float64Array;

export function sharedInt32Array(length: number): Int32Array {
  return new Int32Array(new SharedArrayBuffer(length * Int32Array.BYTES_PER_ELEMENT));
}

export function sharedFloat64Array(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * Float64Array.BYTES_PER_ELEMENT));
}

/** An empty array of the same type as `array`, `length` long, on shared memory. */
export function sharedLike<T extends SharedColumn>(array: T, length: number): T {
  return (array instanceof Float64Array ? sharedFloat64Array(length) : sharedInt32Array(length)) as T;
}

export function isShared(array: ArrayBufferView): boolean {
  return array.buffer instanceof SharedArrayBuffer;
}

/**
 * The array itself when it is already on shared memory, else a copy on shared memory.
 * (`slice` would not do: it always answers an ordinary ArrayBuffer.)
 */
export function onSharedMemory<T extends SharedColumn>(array: T): T {
  if (isShared(array)) return array;
  const copy = sharedLike(array, array.length);
  copy.set(array);
  return copy;
}

/** The first `length` entries as a shared copy of their own. */
export function sharedPrefix<T extends SharedColumn>(array: T, length: number): T {
  const copy = sharedLike(array, length);
  copy.set(array.subarray(0, length));
  return copy;
}
