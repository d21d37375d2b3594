/**
 * The arrays a recording's samples are decoded into. On a cross-origin-isolated page (the app sends
 * Cross-Origin-Opener-Policy `same-origin` and Cross-Origin-Embedder-Policy `require-corp`, HTML Standard,
 * "cross-origin isolated capability") they live on a SharedArrayBuffer: the page, the plan worker and the analysis
 * workers then read one copy of the samples, where posting ordinary arrays would give each of them its own (a 500 MB
 * recording held twice is a gigabyte more). Elsewhere (Node, the command line, a page that is not isolated) they
 * are ordinary arrays. Nothing writes into a recording's samples once decoded, so sharing needs no locks.
 */
export function sampleArray(length: number): Float32Array {
  const isolated = (globalThis as { crossOriginIsolated?: boolean }).crossOriginIsolated === true;
  if (isolated && typeof SharedArrayBuffer === 'function') return new Float32Array(new SharedArrayBuffer(4 * length));
  return new Float32Array(length);
}

/** Whether an array's memory is shared (it then travels between threads without being copied or transferred). */
export function isShared(array: ArrayBufferView): boolean {
  return typeof SharedArrayBuffer === 'function' && array.buffer instanceof SharedArrayBuffer;
}

/**
 * A channel's samples as they go to a worker: shared ones as they are (nothing to transfer), others as a copy whose
 * buffer is transferred (the page keeps its own).
 */
export function forWorker(samples: Float32Array): { samples: Float32Array; transfer: ArrayBuffer[] } {
  if (isShared(samples)) return { samples, transfer: [] };
  const copy = samples.slice();
  return { samples: copy, transfer: [copy.buffer] };
}
