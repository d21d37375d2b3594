// Opens a recording on this device (src/lib/formats/intake.ts). Comlink wiring only: the sample buffers are
// transferred, never copied, on their way to the page.
import * as Comlink from 'comlink';
import { openCsvBlob, openEdfBlob, type CsvRequest, type EdfReading, type IntakeProgress, type IntakeResult } from '../src/lib/formats/intake';
import { blobSource } from '../src/lib/formats/byte-source';
import { fingerprintSource } from '../src/lib/formats/fingerprint';
import { isShared } from '../src/lib/formats/sample-arrays';

function transferred(result: IntakeResult): IntakeResult {
  // A recording of hundreds of MB must not be copied on its way to the page: ordinary buffers are transferred;
  // shared ones (a cross-origin-isolated page, src/lib/formats/sample-arrays.ts) travel as they are.
  if (!result.ok) return result;
  return Comlink.transfer(result, result.recording.data.filter((d) => !isShared(d)).map((d) => d.buffer as ArrayBuffer));
}

const api = {
  /** `fingerprintAt: 'elsewhere'`: the caller hashes the file in another worker, after this (src/lib/client/intake.ts). */
  async openEdf(file: Blob, reading: EdfReading, onProgress: IntakeProgress, events: Blob | null = null, fingerprintAt: 'here' | 'elsewhere' = 'here'): Promise<IntakeResult> {
    return transferred(await openEdfBlob(file, reading, onProgress, events, fingerprintAt));
  },
  /** SHA-256 of a whole file, read slice by slice (never held whole), with progress in [0, 1]. */
  async fingerprint(file: Blob, onProgress: (fraction: number) => void): Promise<string> {
    return fingerprintSource(blobSource(file), { chunkBytes: 4 * 1024 * 1024, onProgress });
  },
  async openCsv(file: Blob, request: CsvRequest, onProgress: IntakeProgress): Promise<IntakeResult> {
    return transferred(await openCsvBlob(file, request, onProgress));
  },
};

export type IntakeWorker = typeof api;
Comlink.expose(api);
