import { useEffect, useRef, useState } from 'react';
import type { FitSetting } from '../../lib/analysis/slope-check/bench';
import type { SlopeSweepCell, SlopeSweepInput } from '../../lib/analysis/slope-check/sweep';
import { runSlopeBenchInWorker, SlopeCheckCancelledError, SlopeCheckError } from '../../lib/client/slope-check';
import NumberField from '../explorer/NumberField';
import Choice from '../explorer/Choice';
import { Label } from '../../lib/schemas/review';

export interface BenchRun {
  input: SlopeSweepInput;
  cells: SlopeSweepCell[];
}

interface SettingDraft extends FitSetting {
  key: number;
}

// Demo scenario of our own: a resting channel at 250 Hz with an alpha bump, one plain and one robust fit.
const firstSettings: SettingDraft[] = [
  { key: 1, name: 'robust 2-40 Hz', range: [2, 40], model: 'power-law', robust: true, segmentSeconds: 2, overlap: 0.5 },
  { key: 2, name: 'plain 2-40 Hz', range: [2, 40], model: 'power-law', robust: false, segmentSeconds: 2, overlap: 0.5 },
];

/** "1, 1.5, 2" → [1, 1.5, 2], or the problem in words. */
function parseExponents(text: string): number[] | string {
  const parts = text.split(/[\s,;]+/).filter((p) => p !== '');
  if (parts.length === 0) return 'list at least one true exponent, e.g. 1, 1.5, 2';
  const out: number[] = [];
  for (const p of parts) {
    const v = Number(p);
    if (!Number.isFinite(v) || v < 0 || v > 6) return `"${p}" is not an exponent between 0 and 6`;
    out.push(v);
  }
  if (out.length > 8) return `lists ${out.length} exponents; at most 8`;
  return out;
}

const FIELD_WORDS: Record<string, string> = {
  range: 'fit range',
  segmentSeconds: 'Welch segment',
  overlap: 'overlap',
  durationSeconds: 'Duration',
  sampleRateHz: 'Sample rate',
  exponent: 'True exponent',
  exponents: 'True exponents',
  repetitions: 'Repetitions',
  knee: 'Knee',
};

/** The core's field path in the screen's words: `settings[0].range` → `Setting 1 ("robust 2-40 Hz"), fit range`. */
function fieldWords(field: string, settings: FitSetting[]): string {
  const m = /^settings\[(\d+)\]\.(\w+)$/.exec(field);
  if (m) return `Setting ${Number(m[1]) + 1} ("${settings[Number(m[1])]?.name ?? ''}"), ${FIELD_WORDS[m[2]] ?? m[2]}`;
  return FIELD_WORDS[field] ?? field;
}

/** Truth settings, the fit settings side by side, and the run with progress and cancel. */
export default function BenchPanel({ onRun }: { onRun: (run: BenchRun | null) => void }) {
  const [offset, setOffset] = useState(1);
  const [exponentsText, setExponentsText] = useState('1, 1.5, 2');
  const [knee, setKnee] = useState(0);
  const [peakOn, setPeakOn] = useState(true);
  const [peak, setPeak] = useState({ centreHz: 10, widthHz: 1.5, heightLog10: 0.8 });
  const [durationSeconds, setDuration] = useState(60);
  const [sampleRateHz, setSampleRate] = useState(250);
  const [noiseMicrovolts, setNoise] = useState(0);
  const [repetitions, setRepetitions] = useState(20);
  const [seed, setSeed] = useState(1);
  const [coverageOn, setCoverageOn] = useState(false);
  const [settings, setSettings] = useState<SettingDraft[]>(firstSettings);
  const [progress, setProgress] = useState<number | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const abort = useRef<AbortController | null>(null);
  // Leaving the screen ends a bench still going (its worker).
  useEffect(() => () => abort.current?.abort(), []);
  const nextKey = useRef(3);

  const exponents = parseExponents(exponentsText);
  const patch = (key: number, p: Partial<FitSetting>) => setSettings((all) => all.map((s) => (s.key === key ? { ...s, ...p } : s)));

  const run = async () => {
    if (typeof exponents === 'string') {
      setProblem(`True exponents: ${exponents}.`);
      return;
    }
    const names = settings.map((s) => s.name.trim());
    const twice = names.find((n, i) => names.indexOf(n) !== i);
    if (twice !== undefined || names.some((n) => n === '')) {
      setProblem(twice !== undefined ? `Fit settings: the name "${twice}" is used twice; each setting needs its own name.` : 'Fit settings: every setting needs a name.');
      return;
    }
    // The rule a saved report's names must meet, checked before the run so a result can always be saved.
    const badName = names.findIndex((n) => !Label.safeParse(n).success);
    if (badName >= 0) {
      setProblem(`Setting ${badName + 1}, name "${names[badName]}": ${Label.safeParse(names[badName]).error!.issues[0].message}.`);
      return;
    }
    const input: SlopeSweepInput = {
      truth: { offset, knee, peaks: peakOn ? [peak] : [], durationSeconds, sampleRateHz, noiseMicrovolts, seed },
      exponents,
      settings: settings.map(({ key: _key, ...s }) => ({ ...s, name: s.name.trim() })),
      repetitions,
      coverage: coverageOn ? { level: 0.9, resamples: 100 } : null,
    };
    abort.current?.abort();
    const controller = new AbortController();
    abort.current = controller;
    setProblem(null);
    setProgress(0);
    try {
      const cells = await runSlopeBenchInWorker(input, { onProgress: setProgress, signal: controller.signal });
      onRun({ input, cells });
    } catch (e) {
      if (e instanceof SlopeCheckCancelledError) setProblem('Cancelled; nothing was changed.');
      else setProblem(e instanceof SlopeCheckError && e.field !== null ? `${fieldWords(e.field, input.settings)}: ${e.message.slice(e.field.length + 1)}; nothing was run.` : e instanceof Error ? e.message : String(e));
    } finally {
      if (abort.current === controller) abort.current = null;
      setProgress(null);
    }
  };

  const running = progress !== null;
  return (
    <section className="card p-4" aria-labelledby="bench-h" data-testid="slope-bench">
      <h3 id="bench-h" className="text-lg font-semibold">Simulation bench</h3>
      <p className="mt-1 max-w-3xl text-sm text-ink-soft">
        Draws seeded series whose spectrum is known (coloured Gaussian noise by spectral synthesis, as in Timmer &amp; König, 1995, Astron Astrophys 300:707),
        fits each with every setting below using the product's own Welch and aperiodic fit, and shows how far the estimates land from the truth.
      </p>
      <fieldset className="mt-3 flex flex-wrap items-end gap-3" disabled={running}>
        <legend className="mb-1 text-sm font-semibold text-ink">Truth</legend>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          <span>True exponents χ</span>
          <input
            className={`w-36 rounded-sm border bg-foam px-2 py-1 font-mono text-sm text-ink ${typeof exponents === 'string' ? 'border-coral' : 'border-shell'}`}
            value={exponentsText}
            onChange={(e) => setExponentsText(e.target.value)}
            aria-invalid={typeof exponents === 'string' ? true : undefined}
            data-testid="bench-exponents"
          />
          {typeof exponents === 'string' && <span className="text-coral-deep" role="alert">{exponents}</span>}
        </label>
        <NumberField label="Offset" unit="log10 µV²/Hz" value={offset} step={0.1} onValue={setOffset} testId="bench-offset" />
        <NumberField label="Knee k" unit="0 = none" value={knee} step={10} min={0} onValue={setKnee} testId="bench-knee" />
        <NumberField label="Duration" unit="s" value={durationSeconds} step={10} min={1} onValue={setDuration} testId="bench-duration" />
        <NumberField label="Sample rate" unit="Hz" value={sampleRateHz} step={50} min={10} onValue={setSampleRate} testId="bench-rate" />
        <NumberField label="White noise" unit="µV SD" value={noiseMicrovolts} step={0.1} min={0} onValue={setNoise} testId="bench-noise" />
        <NumberField label="Repetitions" value={repetitions} step={5} min={2} max={500} onValue={setRepetitions} testId="bench-repetitions" />
        <NumberField label="Seed" value={seed} step={1} onValue={setSeed} testId="bench-seed" />
      </fieldset>
      <fieldset className="mt-3 flex flex-wrap items-end gap-3" disabled={running}>
        <label className="flex items-center gap-2 self-center text-sm">
          <input type="checkbox" checked={peakOn} onChange={(e) => setPeakOn(e.target.checked)} data-testid="bench-peak-on" />
          Add a peak
        </label>
        {peakOn && (
          <>
            <NumberField label="Peak centre" unit="Hz" value={peak.centreHz} step={0.5} onValue={(v) => setPeak({ ...peak, centreHz: v })} testId="bench-peak-centre" />
            <NumberField label="Peak SD" unit="Hz" value={peak.widthHz} step={0.5} onValue={(v) => setPeak({ ...peak, widthHz: v })} testId="bench-peak-width" />
            <NumberField label="Peak height" unit="log10" value={peak.heightLog10} step={0.1} onValue={(v) => setPeak({ ...peak, heightLog10: v })} testId="bench-peak-height" />
          </>
        )}
        <label className="flex items-center gap-2 self-center text-sm">
          <input type="checkbox" checked={coverageOn} onChange={(e) => setCoverageOn(e.target.checked)} data-testid="bench-coverage-on" />
          Coverage of 90 % bootstrap intervals (100 resamples each; slower)
        </label>
      </fieldset>
      <h4 className="mt-4 text-sm font-semibold">Fit settings, side by side</h4>
      <div className="mt-2 grid grid-cols-1 gap-3 md:grid-cols-2 xl:grid-cols-3">
        {settings.map((s, i) => (
          <fieldset key={s.key} className="rounded-sm border border-sand-deep p-3" disabled={running} data-testid="bench-setting">
            <legend className="px-1 text-xs text-ink-soft">Setting {i + 1}</legend>
            <div className="flex flex-wrap items-end gap-3">
              <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
                <span>Name</span>
                <input className="w-40 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={s.name} maxLength={40} onChange={(e) => patch(s.key, { name: e.target.value })} data-testid="bench-setting-name" />
              </label>
              <NumberField label="Fit from" unit="Hz" value={s.range[0]} step={0.5} width="w-20" onValue={(v) => patch(s.key, { range: [v, s.range[1]] })} testId="bench-setting-low" />
              <NumberField label="to" unit="Hz" value={s.range[1]} step={0.5} width="w-20" onValue={(v) => patch(s.key, { range: [s.range[0], v] })} testId="bench-setting-high" />
              <NumberField label="Welch segment" unit="s" value={s.segmentSeconds} step={0.5} width="w-20" onValue={(v) => patch(s.key, { segmentSeconds: v })} testId="bench-setting-segment" />
              <NumberField label="Overlap" unit="0–<1" value={s.overlap} step={0.25} width="w-20" onValue={(v) => patch(s.key, { overlap: v })} testId="bench-setting-overlap" />
              <Choice legend="Model" value={s.model} options={[{ value: 'power-law', label: 'power law' }, { value: 'power-law-knee', label: 'with knee' }]} onChange={(m) => patch(s.key, { model: m })} />
              <Choice legend="Peaks" value={s.robust ? 'robust' : 'plain'} options={[{ value: 'robust', label: 'left out' }, { value: 'plain', label: 'kept (plain fit)' }]} onChange={(v) => patch(s.key, { robust: v === 'robust' })} />
              {settings.length > 1 && (
                <button type="button" className="text-sm text-coral-deep underline" onClick={() => setSettings((all) => all.filter((x) => x.key !== s.key))}>
                  Remove
                </button>
              )}
            </div>
          </fieldset>
        ))}
      </div>
      <div className="mt-3 flex flex-wrap items-center gap-3">
        <button
          type="button"
          className="btn btn-quiet"
          disabled={running || settings.length >= 6}
          onClick={() => setSettings((all) => [...all, { ...all[all.length - 1], key: nextKey.current, name: `setting ${nextKey.current++}` }])}
          data-testid="bench-add-setting"
        >
          Add a setting
        </button>
        {running ? (
          <>
            <progress className="w-48" max={1} value={progress} aria-label="Bench progress" data-testid="bench-progress" />
            <span className="font-mono text-sm">{Math.round(progress * 100)} %</span>
            <button type="button" className="btn btn-quiet" onClick={() => abort.current?.abort()} data-testid="bench-cancel">
              Cancel
            </button>
          </>
        ) : (
          <button type="button" className="btn btn-primary" onClick={() => void run()} data-testid="bench-run">
            Run the bench
          </button>
        )}
      </div>
      {problem !== null && (
        <p className="notice notice-warn mt-3" role="alert" data-testid="bench-problem">
          {problem}
        </p>
      )}
    </section>
  );
}
