import { frequencyGrid } from '../../lib/analysis/frequency-grid';
import { cyclesOf, edgeSecondsOf, gaussianSigmas, resolutionOf, type CyclesSpec } from '../../lib/analysis/wavelet';

interface Props {
  frequencies: { min: number; max: number; count: number; spacing: 'log' | 'linear' };
  cycles: CyclesSpec;
}

/**
 * Each frequency's time and frequency resolution for the recipe as it stands: temporal FWHM (s), spectral FWHM
 * (Hz) and edge zone (3σ, s), from the same core functions a run uses (Cohen, 2019, NeuroImage 199:81–86). The run's
 * Result carries the same numbers (`temporalFwhmSeconds`, `spectralFwhmHz`, `edgeSeconds`).
 */
export default function ResolutionTable({ frequencies, cycles }: Props) {
  let rows: { f: number; n: number; t: number; s: number; e: number }[] = [];
  try {
    if (!(frequencies.min > 0 && frequencies.max >= frequencies.min && frequencies.count >= 1 && frequencies.count <= 1000)) throw new Error('no grid');
    const f = frequencyGrid(frequencies);
    const sigmas = gaussianSigmas(f, cycles);
    if (!sigmas.every((x) => x > 0 && Number.isFinite(x))) throw new Error('no widths');
    const n = cyclesOf(f, sigmas);
    const r = resolutionOf(sigmas);
    const e = edgeSecondsOf(sigmas);
    rows = Array.from(f, (fi, i) => ({ f: fi, n: n[i], t: r.temporalFwhmSeconds[i], s: r.spectralFwhmHz[i], e: e[i] }));
  } catch {
    rows = [];
  }
  return (
    <details className="card p-3" data-testid="resolution">
      <summary className="cursor-pointer text-sm font-semibold">Resolution at each frequency (what the wavelets can tell apart)</summary>
      {rows.length === 0 ? (
        <p className="text-sm text-ink-soft">Set valid frequencies and widths to see the resolution.</p>
      ) : (
        <div className="max-h-64 overflow-auto">
          <table className="data-table text-sm" data-testid="resolution-table">
            <thead>
              <tr>
                <th scope="col">Frequency (Hz)</th>
                <th scope="col">Cycles</th>
                <th scope="col">Time FWHM (s)</th>
                <th scope="col">Frequency FWHM (Hz)</th>
                <th scope="col">Edge zone (s)</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r) => (
                <tr key={r.f} data-testid="resolution-row" data-frequency={r.f} data-time-fwhm={r.t} data-frequency-fwhm={r.s} data-edge={r.e}>
                  <td className="font-mono">{r.f.toFixed(2)}</td>
                  <td className="font-mono">{r.n.toFixed(2)}</td>
                  <td className="font-mono">{r.t.toFixed(3)}</td>
                  <td className="font-mono">{r.s.toFixed(2)}</td>
                  <td className="font-mono">{r.e.toFixed(3)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </details>
  );
}
