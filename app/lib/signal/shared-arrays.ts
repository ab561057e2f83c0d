/**
 * Where the signal arrays' memory comes from: ordinary ArrayBuffers, or SharedArrayBuffers once
 * a second thread may read them (the CLI's block helper, block-helper.ts), so the log's time,
 * angle and filtered speeds reach the helper without a copy. The same values either way; the
 * ingest columns, the low-pass and the crank angle allocate through here. Unitless.
 */
let shared = false;

/** Allocate in shared memory from now on (true) or in ordinary memory again (false). */
export function allocateShared(on: boolean): void {
  shared = on;
}

/** A zeroed Float64Array of n values, in shared memory when that is on. */
export function float64Array(n: number): Float64Array {
  return shared ? new Float64Array(new SharedArrayBuffer(n * 8)) : new Float64Array(n);
}

/** Whether every array lives in shared memory (a helper thread can read it as it is). */
export function allShared(...arrays: Float64Array[]): boolean {
  return arrays.every((a) => a.buffer instanceof SharedArrayBuffer);
}
