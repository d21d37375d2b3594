// Decoded samples on a SharedArrayBuffer only where the page is cross-origin isolated (HTML Standard, "cross-origin
// isolated capability"), and how they travel to a worker: shared memory as it is (postMessage refuses to transfer
// it, HTML Standard StructuredSerializeWithTransfer), an ordinary array as a transferred copy.
import { afterEach, describe, expect, it } from 'vitest';
import { forWorker, isShared, sampleArray } from '../../../../src/lib/formats/sample-arrays';

const scope = globalThis as { crossOriginIsolated?: boolean };

describe('sample arrays', () => {
  afterEach(() => {
    delete scope.crossOriginIsolated;
  });

  it('are ordinary arrays unless the context is cross-origin isolated', () => {
    expect(isShared(sampleArray(8))).toBe(false);
    scope.crossOriginIsolated = true;
    const shared = sampleArray(8);
    expect(isShared(shared)).toBe(true);
    expect(shared.length).toBe(8);
  });

  it('go to a worker as they are when shared, else as a copy whose buffer is transferred', () => {
    scope.crossOriginIsolated = true;
    const shared = sampleArray(4);
    shared.set([1, 2, 3, 4]);
    expect(forWorker(shared)).toEqual({ samples: shared, transfer: [] });
    expect(forWorker(shared).samples).toBe(shared);
    const plain = Float32Array.of(1, 2, 3);
    const sent = forWorker(plain);
    expect(sent.samples).not.toBe(plain);
    expect(Array.from(sent.samples)).toEqual([1, 2, 3]);
    expect(sent.transfer).toEqual([sent.samples.buffer]);
    expect(isShared(sent.samples)).toBe(false);
  });
});
