import type { CyclesSpec } from '../../lib/analysis/wavelet';
import { resolutionRows } from '../../lib/client/workspace/resolution';

interface Props {
  frequencies: { min: number; max: number; count: number; spacing: 'log' | 'linear' };
  cycles: CyclesSpec;
}

/**
 * Each frequency's time and frequency resolution for the recipe as it stands (`resolutionRows`: the same core
 * functions a run uses). The run's Result carries the same numbers (`temporalFwhmSeconds`, `spectralFwhmHz`,
 * `edgeSeconds`).
 */
export default function ResolutionTable({ frequencies, cycles }: Props) {
  const rows = resolutionRows(frequencies, cycles);
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
