/**
 * A generated BIDS dataset for the batch tests (our own invented scenario, "Tidepool Listening": subjects hear
 * gull calls and foghorn blasts; nothing here is a person's data). Layout after the BIDS specification ("Common
 * principles" and the EEG modality pages): dataset_description.json at the top, `sub-<label>/eeg/` with
 * `sub-<label>_task-tidepool_run-<index>_eeg.edf` and its `_events.tsv` (onset, duration, trial_type) and
 * `_channels.tsv` (name, type, units, status) sidecars.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeEdf } from '../../src/lib/formats';
import { seededNormal } from './seeded-random';

export const TIDEPOOL = {
  subjects: ['01', '02', '03', '04', '05', '06'],
  runs: ['1', '2'],
  task: 'tidepool',
  rateHz: 100,
  seconds: 30,
  /** The run whose EDF is cut short: its header promises more records than the file holds. */
  corrupt: { sub: '04', run: '2' },
  /** A channel marked bad in one run's channels file. */
  bad: { sub: '02', run: '1', channel: 'C4' },
};

export const tidepoolRecipe = {
  format: 2,
  epochs: { events: ['gull', 'foghorn'], start: -0.5, end: 1.0 },
  channels: ['C3', 'C4', 'Pz'],
  frequencies: { min: 5, max: 30, count: 4, spacing: 'log' },
  cycles: { min: 3, max: 5 },
  baseline: { start: -0.4, end: -0.1, method: 'decibel', scope: 'average' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 40], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};

export const stemOf = (sub: string, run: string) => `sub-${sub}_task-${TIDEPOOL.task}_run-${run}_eeg`;

/** Writes the dataset under `root`; returns the path of each recording by stem. */
export function writeTidepoolDataset(root: string): Map<string, string> {
  const { rateHz, seconds } = TIDEPOOL;
  mkdirSync(root, { recursive: true });
  writeFileSync(join(root, 'dataset_description.json'), JSON.stringify({ Name: 'Tidepool Listening (generated)', BIDSVersion: '1.9.0', DatasetType: 'raw' }, null, 2));
  writeFileSync(join(root, 'participants.tsv'), 'participant_id\n' + TIDEPOOL.subjects.map((s) => `sub-${s}\n`).join(''));
  const files = new Map<string, string>();
  TIDEPOOL.subjects.forEach((sub, si) => {
    TIDEPOOL.runs.forEach((run, ri) => {
      const dir = join(root, `sub-${sub}`, 'eeg');
      mkdirSync(dir, { recursive: true });
      const stem = stemOf(sub, run);
      const normal = seededNormal(100 + si * 10 + ri);
      const n = rateHz * seconds;
      const c3 = new Float64Array(n);
      const c4 = new Float64Array(n);
      const pz = new Float64Array(n);
      const eog = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        c3[i] = 5 * normal();
        c4[i] = 5 * normal() + (4 + si) * Math.sin((2 * Math.PI * 10 * i) / rateHz);
        pz[i] = 5 * normal();
        eog[i] = 20 * normal();
      }
      const onsets = Array.from({ length: 10 }, (_, k) => 2 + 2.5 * k);
      const label = (k: number) => (k % 2 === 0 ? 'gull' : 'foghorn');
      const signal = (l: string, samples: Float64Array) => ({ label: l, physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: rateHz, samples });
      let bytes: Uint8Array = writeEdf({
        variant: 'EDF',
        start: { year: 2025, month: 6, day: 2, hour: 10, minute: 0, second: 0 },
        recordDurationSeconds: 1,
        signals: [signal('EEG C3', c3), signal('EEG C4', c4), signal('EEG Pz', pz), signal('HEOG', eog)],
      });
      if (sub === TIDEPOOL.corrupt.sub && run === TIDEPOOL.corrupt.run) bytes = bytes.subarray(0, bytes.length - 5 * 4 * rateHz * 2 - 17);
      const path = join(dir, `${stem}.edf`);
      writeFileSync(path, bytes);
      files.set(stem, path);
      writeFileSync(join(dir, `${stem.replace(/_eeg$/, '')}_events.tsv`), 'onset\tduration\ttrial_type\n' + onsets.map((o, k) => `${o}\t0.2\t${label(k)}\n`).join(''));
      const bad = TIDEPOOL.bad.sub === sub && TIDEPOOL.bad.run === run ? TIDEPOOL.bad.channel : null;
      writeFileSync(
        join(dir, `${stem.replace(/_eeg$/, '')}_channels.tsv`),
        'name\ttype\tunits\tstatus\n' + [['C3', 'EEG'], ['C4', 'EEG'], ['Pz', 'EEG'], ['HEOG', 'EOG']].map(([name, type]) => `${name}\t${type}\tuV\t${name === bad ? 'bad' : 'good'}\n`).join(''),
      );
    });
  });
  return files;
}
