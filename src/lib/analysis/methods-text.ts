import type { AnalysisResult } from './run-recipe';
import type { Recipe } from './recipe';

/** A paragraph for a paper's methods section and the works it cites, from a recipe and the result it gave. */
export interface MethodsText {
  paragraph: string;
  references: string[];
}

const REFS = {
  morlet: ['Cohen, 2019', 'Cohen, M. X. (2019). A better way to define and describe Morlet wavelets for time-frequency analysis. NeuroImage, 199, 81–86.'],
  welch: ['Welch, 1967', 'Welch, P. D. (1967). The use of fast Fourier transform for the estimation of power spectra. IEEE Transactions on Audio and Electroacoustics, 15, 70–73.'],
  hann: ['Harris, 1978', 'Harris, F. J. (1978). On the use of windows for harmonic analysis with the discrete Fourier transform. Proceedings of the IEEE, 66, 51–83.'],
  aperiodic: ['Donoghue et al., 2020', 'Donoghue, T., et al. (2020). Parameterizing neural power spectra into periodic and aperiodic components. Nature Neuroscience, 23, 1655–1665.'],
  itpc: ['Lachaux et al., 1999', 'Lachaux, J.-P., Rodriguez, E., Martinerie, J., & Varela, F. J. (1999). Measuring phase synchrony in brain signals. Human Brain Mapping, 8, 194–208.'],
  induced: ['Tallon-Baudry & Bertrand, 1999', 'Tallon-Baudry, C., & Bertrand, O. (1999). Oscillatory gamma activity in humans and its role in object representation. Trends in Cognitive Sciences, 3, 151–162.'],
  butterworth: ['Butterworth, 1930', 'Butterworth, S. (1930). On the theory of filter amplifiers. Experimental Wireless and the Wireless Engineer, 7, 536–541.'],
} as const;

/** The value to `digits` significant digits, shortest form (no float noise such as 0.30000000000000004). */
export function methodsNumber(x: number, digits = 6): string {
  return String(Number(x.toPrecision(digits)));
}

/** Derived quantities (resolution) need no more than three significant digits. */
const r3 = (x: number) => methodsNumber(x, 3);

const n = methodsNumber;

const METHOD_WORDS: Record<Recipe['baseline']['method'], string> = {
  decibel: 'decibel change, 10·log10(P/B)',
  'percent-change': 'percent change, 100·(P − B)/B',
  'z-score': 'z-score, (P − B)/S with S the standard deviation of baseline power',
  'power-ratio': 'power ratio, P/B',
};

function list(items: string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/**
 * Every setting that changes the numbers, with units, in plain sentences: epochs, channels and reference, filters,
 * rejection, wavelets (with the time and frequency FWHM at the lowest and highest frequency), normalization, trials
 * kept per condition, spectrum and aperiodic fit, phase consistency and induced power when used, and the citations.
 */
export function methodsParagraph(recipe: Recipe, result: AnalysisResult): MethodsText {
  const refs: string[] = [];
  const cite = (key: keyof typeof REFS) => {
    const [short, full] = REFS[key];
    if (!refs.includes(full)) refs.push(full);
    return `(${short})`;
  };
  const s: string[] = [];
  const e = recipe.epochs;
  s.push(`Epochs ran from ${n(e.start)} to ${n(e.end)} s around each event (${list(e.events.map((x) => `"${x}"`))}), and each epoch's own mean was removed per channel before analysis.`);
  const chans = result.channels;
  const ref = recipe.reference;
  const refText =
    ref === undefined || ref.kind === 'as-recorded'
      ? 'as recorded'
      : ref.kind === 'common-average'
        ? 're-referenced to the common average of the good EEG channels'
        : ref.kind === 'mean-of-channels'
          ? `re-referenced to the mean of ${list(ref.channels)}`
          : `as bipolar derivations (${[...(ref.pairs ?? []).map(([a, b]) => `${a}−${b}`), ...(ref.shafts ?? []).map((x) => `neighbours along ${x}`)].join(', ')})`;
  s.push(`${chans.length} channel${chans.length === 1 ? ' was' : 's were'} analysed (${chans.length <= 12 ? list(chans) : `${chans.slice(0, 12).join(', ')}, …`}), ${refText}.`);
  const units = Object.entries(recipe.recording?.units ?? {});
  if (units.length > 0) s.push(`Signals recorded in ${list(units.map(([d, k]) => `"${d}" were scaled by ${n(k)} to µV`))}.`);
  if (recipe.signals?.bad !== undefined && recipe.signals.bad.length > 0) s.push(`Channels marked bad and left out: ${list(recipe.signals.bad)}.`);
  const f = recipe.filters;
  if (f?.highPass !== undefined || f?.notch !== undefined) {
    const parts: string[] = [];
    if (f.highPass !== undefined) parts.push(`a Butterworth high-pass at ${n(f.highPass.cutoffHz)} Hz ${cite('butterworth')} (order ${n(f.highPass.order)}, run forward and backward for zero phase)`);
    if (f.notch !== undefined) parts.push(
      f.notch.harmonics === 1
        ? `a notch at ${n(f.notch.lineHz!)} Hz (quality factor ${n(f.notch.q)}, forward and backward)`
        : `notches at k × ${n(f.notch.lineHz!)} Hz for k = 1 to ${n(f.notch.harmonics)} (quality factor ${n(f.notch.q)}·k, so each is ${n(f.notch.lineHz! / f.notch.q, 3)} Hz wide; forward and backward)`,
    );
    s.push(`The continuous data were filtered with ${list(parts)}.`);
  }
  const rj = recipe.rejection;
  if (rj !== undefined) {
    const rules: string[] = [];
    if (rj.peakToPeakMicrovolts !== null) rules.push(`a peak-to-peak amplitude above ${n(rj.peakToPeakMicrovolts)} µV`);
    if (rj.flatMicrovolts !== null) rules.push(`a standard deviation below ${n(rj.flatMicrovolts)} µV (a flat signal)`);
    const byType = Object.entries(rj.byType ?? {}).map(([t, l]) => `${t}: ${l.peakToPeak === null ? 'no upper limit' : `above ${n(l.peakToPeak)}`}${l.flat === null ? '' : `, below ${n(l.flat)}`} in the channel's unit`);
    const manual = Object.keys(rj.overrides ?? {}).length;
    s.push(
      `Epochs were rejected for ${rules.length > 0 ? list(rules) : 'no amplitude rule'}${byType.length > 0 ? ` (by channel type: ${byType.join('; ')})` : ''} on ${rj.scope === 'any' ? 'any channel' : list(rj.channels ?? [])}${manual > 0 ? `, with ${manual} decision${manual === 1 ? '' : 's'} made by hand` : ''}.`,
    );
  }
  const fr = recipe.frequencies;
  const c = recipe.cycles;
  const cyc = 'fixed' in c ? `${n(c.fixed)} cycles` : 'fwhm' in c ? `a Gaussian of ${n(c.fwhm)} s full width at half maximum` : `${n(c.min)} to ${n(c.max)} cycles, spread geometrically over frequency`;
  const last = result.frequencies.length - 1;
  s.push(
    `Time-frequency power was computed by convolution with complex Morlet wavelets ${cite('morlet')} at ${n(fr.count)} frequencies from ${n(fr.min)} to ${n(fr.max)} Hz (${fr.spacing === 'log' ? 'logarithmic' : 'linear'} spacing), with ${cyc}; the time and frequency resolution (full width at half maximum) was ${r3(result.temporalFwhmSeconds[0])} s and ${r3(result.spectralFwhmHz[0])} Hz at ${n(result.frequencies[0])} Hz, and ${r3(result.temporalFwhmSeconds[last])} s and ${r3(result.spectralFwhmHz[last])} Hz at ${n(result.frequencies[last])} Hz.`,
  );
  if (recipe.trialPower === 'induced') s.push(`Induced power was estimated by subtracting each condition's evoked response (the average of its epochs) from every epoch before the transform ${cite('induced')}.`);
  const b = recipe.baseline;
  s.push(
    `Power was normalized per channel, condition and frequency against the baseline from ${n(b.start)} to ${n(b.end)} s as ${METHOD_WORDS[b.method]}${b.spread === 'trials' ? ', S taken across trials' : ''}, ${b.scope === 'trial' ? 'each trial against its own baseline before averaging' : 'after averaging trials'}.`,
  );
  const kept = Object.entries(result.conditions).map(([label, k]) => `${label}: ${k.trials} kept${k.rejected > 0 ? `, ${k.rejected} rejected` : ''}${k.dropped > 0 ? `, ${k.dropped} outside the recording` : ''}`);
  s.push(`Trials per condition: ${kept.join('; ')}.`);
  if (recipe.itpc === true) s.push(`Inter-trial phase consistency was computed as the length of the mean unit phase vector over trials ${cite('itpc')}.`);
  const sp = recipe.spectrum;
  s.push(
    `Power spectra were estimated with Welch's method ${cite('welch')} on ${n(sp.segment)} s Hann-windowed segments ${cite('hann')} with ${n(sp.overlap * 100)} % overlap over ${sp.source === 'recording' ? 'the whole recording' : 'the kept epochs'}, between ${n(sp.range[0])} and ${n(sp.range[1])} Hz.`,
  );
  const ap = recipe.aperiodic;
  s.push(
    `The aperiodic component was fitted as ${ap.model === 'power-law' ? 'a power law, log10 P = b − χ·log10 f,' : 'a power law with a knee, log10 P = b − log10(k + f^χ),'} over ${n(ap.range[0])} to ${n(ap.range[1])} Hz, excluding spectral peaks above the aperiodic line ${cite('aperiodic')}.`,
  );
  s.push('Analyses were run in Tidemark, a research tool; results are not for clinical decisions.');
  return { paragraph: s.join(' '), references: refs };
}
