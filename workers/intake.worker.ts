// Opens a recording on this device (src/lib/formats/intake.ts). Comlink wiring only: the sample buffers are
// transferred, never copied, on their way to the page.
import * as Comlink from 'comlink';
import { openCsvBlob, openEdfBlob, type CsvRequest, type EdfReading, type IntakeProgress, type IntakeResult } from '../src/lib/formats/intake';

function transferred(result: IntakeResult): IntakeResult {
  // A recording of hundreds of MB must not be copied on its way to the page.
  return result.ok ? Comlink.transfer(result, result.recording.data.map((d) => d.buffer as ArrayBuffer)) : result;
}

const api = {
  async openEdf(file: Blob, reading: EdfReading, onProgress: IntakeProgress, events: Blob | null = null): Promise<IntakeResult> {
    return transferred(await openEdfBlob(file, reading, onProgress, events));
  },
  async openCsv(file: Blob, request: CsvRequest, onProgress: IntakeProgress): Promise<IntakeResult> {
    return transferred(await openCsvBlob(file, request, onProgress));
  },
};

export type IntakeWorker = typeof api;
Comlink.expose(api);
