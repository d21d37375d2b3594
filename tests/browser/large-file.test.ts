// A recording above the size at which the workspace shows the file once decoded and hashes it afterwards in a second
// worker (PARALLEL_FINGERPRINT_BYTES, 64 MiB): the page must show the same SHA-256 as Node's crypto (FIPS 180-4) and the
// same samples as our reader gives for the whole file in one read. The recording is invented for this test
// (8 channels of the demo's "Harbour Lights" scenario, 256 Hz, about 72 MB); timing belongs to `npm run bench:large`.
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { launchBrowser } from '../helpers/browser';
import { openWorkspace } from '../helpers/workspace';
import { PARALLEL_FINGERPRINT_BYTES } from '../../src/lib/client/intake';
import { bytesSource, openEdf, writeEdf } from '../../src/lib/formats';

const CHANNELS = ['Fz', 'Cz', 'Pz', 'Oz', 'C3', 'C4', 'P3', 'P4'];
const FS = 256;

let browser: Browser;
let close: () => Promise<void>;
let folder: string;
let file: string;
let digest: string;
let firstSamples: number[];

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  // Just over the threshold: one record is 1 s of 8 × 256 int16 samples (4 KiB) plus its timekeeping annotation.
  const records = Math.ceil((PARALLEL_FINGERPRINT_BYTES * 1.08) / (CHANNELS.length * FS * 2));
  const n = records * FS;
  const wave = Float32Array.from({ length: n }, (_, i) => 40 * Math.sin((2 * Math.PI * 10 * i) / FS) + ((i * 7919) % 61) - 30);
  const bytes = writeEdf({
    patientIdentification: 'X X X DEMO-ONLY-NOT-A-PERSON',
    start: { year: 2026, month: 3, day: 14, hour: 9, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: CHANNELS.map((c, k) => ({ label: `EEG ${c}`, physicalDimension: 'uV', physicalMin: -100 - k, physicalMax: 100 + k, samplesPerRecord: FS, samples: wave })),
    annotations: Array.from({ length: 40 }, (_, i) => ({ onsetSeconds: 10 + i * 30, durationSeconds: 0, texts: [i % 2 === 0 ? 'lamp-watch' : 'oar-pull'] })),
  });
  expect(bytes.length).toBeGreaterThan(PARALLEL_FINGERPRINT_BYTES);
  folder = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-large-file-'));
  file = path.join(folder, 'harbour-lights-long.edf');
  fs.writeFileSync(file, bytes);
  digest = createHash('sha256').update(bytes).digest('hex');
  const whole = await openEdf(bytesSource(bytes), { chunkBytes: bytes.length });
  firstSamples = Array.from(whole.channels[3].samples.subarray(n - 5));
}, 180_000);

afterAll(async () => {
  await close();
  fs.rmSync(folder, { recursive: true, force: true });
});

describe('a recording above 64 MiB', () => {
  it('is decoded, then hashed: the same SHA-256 as Node gives, and the same samples as one whole read', async () => {
    const page = await (await browser.newContext({ viewport: { width: 1280, height: 900 } })).newPage();
    await openWorkspace(page, 'analyst', '?testhooks');
    await page.getByTestId('drop-zone').waitFor();
    await page.waitForFunction(() => (window as unknown as { __tidemark?: unknown }).__tidemark !== undefined);
    await page.getByLabel('Choose a recording file…').setInputFiles(file);
    await page.getByTestId('recording-details').waitFor({ timeout: 120_000 });
    // Shown once decoded; the fingerprint follows from its own worker.
    await page.getByTestId('fingerprint').waitFor({ timeout: 120_000 });
    expect(await page.getByTestId('fingerprint').textContent()).toBe(digest);
    expect(await page.getByTestId('recording-details').textContent()).toContain(`${CHANNELS.length} channels at ${FS} Hz`);
    // The last samples of Oz as the page holds them (the store's recording, read through the test hooks).
    const tail = await page.evaluate(() => {
      const hooks = (window as unknown as { __tidemark: { stores: { workspace: { getState(): { recording: { data: Float32Array[] } } } } } }).__tidemark;
      const x = hooks.stores.workspace.getState().recording.data[3];
      return Array.from(x.subarray(x.length - 5));
    });
    expect(tail).toEqual(firstSamples);
    await page.context().close();
  }, 240_000);
});
