import { useMemo, useState } from 'react';
import type { PooledSession } from '../../lib/cohort/values';
import { distributionAt, GROUP } from '../../lib/client/cohort/cohort-model';
import { HistogramPlot, QqPlot, fmt } from './plots';

interface Props {
  atChannel: PooledSession[];
  bands: string[];
  windows: string[];
  /** The window chosen at first. */
  initialWindow: string;
  condition: string;
  channel: string;
  /** The method's unit in words. */
  u: string;
}

/** Raw band power beside the normalized values of the same subjects: histograms, Q–Q plots and a sentence. */
export default function DistributionCheck({ atChannel, bands, windows, initialWindow, condition, channel, u }: Props) {
  const [band, setBand] = useState(bands[0] ?? '');
  const [window, setWindow] = useState(initialWindow);
  const dist = useMemo(() => distributionAt(atChannel, band, window, condition, channel), [atChannel, band, window, condition, channel]);
  return (
        <section className="card mt-6" aria-labelledby="dist-h" data-testid="distribution-check">
          <h2 id="dist-h" className="text-xl font-semibold">Distribution check</h2>
          <p className="text-sm text-ink-soft">Raw band power beside the normalized values of the same subjects. The t-tests above assume the normalized values are close to normal.</p>
          <div className="mt-2 flex flex-wrap gap-4">
            <label className="field"><span className="text-sm">Band</span><select value={band} onChange={(e) => setBand(e.target.value)}>{bands.map((b) => <option key={b}>{b}</option>)}</select></label>
            <label className="field"><span className="text-sm">Window</span><select value={window} onChange={(e) => setWindow(e.target.value)}>{windows.map((w) => <option key={w}>{w}</option>)}</select></label>
            <p className="self-end text-sm text-ink-soft">Condition and channel as chosen above ({condition}, {channel.replace(GROUP, 'group ')}).</p>
          </div>
          {dist.raw.n > 0 && (
            <>
              <p className="mt-3 max-w-4xl" data-testid="distribution-sentence">{dist.sentence}</p>
              <div className="mt-3 grid gap-4 md:grid-cols-2">
                {([['Raw power', dist.raw, 'raw', '#8a6d3b'], [`Normalized (${u})`, dist.normalized, u, '#2f6f5e']] as const).map(([title, side, unitLabel, colour]) => (
                  <div key={title} data-testid={`dist-${unitLabel === 'raw' ? 'raw' : 'normalized'}`}>
                    <h3 className="font-semibold">{title}</h3>
                    <p className="font-mono text-xs">n {side.n} · skewness {fmt(side.skewness)} · {side.normality ? `K² ${fmt(side.normality.k2)}, p ${side.normality.p < 0.001 ? side.normality.p.toExponential(1) : side.normality.p.toFixed(3)}` : 'K² needs 8 subjects'}</p>
                    <div className="flex flex-wrap gap-2">
                      <HistogramPlot title="Histogram" bins={side.histogram} unit={unitLabel === 'raw' ? 'raw power' : unitLabel} colour={colour} />
                      <QqPlot title="Normal Q–Q" points={side.qq} mean={side.mean} sd={side.sd} unit={unitLabel === 'raw' ? 'raw power' : unitLabel} colour={colour} />
                    </div>
                  </div>
                ))}
              </div>
            </>
          )}
        </section>
  );
}
