import { useEffect, useId, useMemo, useRef, useState } from 'react';
import type { Recording } from '../../lib/analysis/recording';
import type { EpochDecision } from '../../lib/client/workspace/source-rules';
import { epochSpans } from '../../lib/client/workspace/source-panels';
import { drawOverview, envelope, type OverviewSpan } from './overview-draw';

interface Props {
  recording: Recording;
  decisions: EpochDecision[];
  epochWindow: { start: number; end: number };
  channel: string;
  onChannel: (name: string) => void;
  selectedEvent: number | null;
}

const HEIGHT_CSS = 140;

function usePixelRatio(): number {
  const [ratio, setRatio] = useState(() => (typeof window === 'undefined' ? 1 : window.devicePixelRatio || 1));
  useEffect(() => {
    // Zooming changes the ratio; a media query on the current value fires once when it does (as uPlot watches it).
    const query = window.matchMedia(`(resolution: ${ratio}dppx)`);
    const update = () => setRatio(window.devicePixelRatio || 1);
    query.addEventListener('change', update, { once: true });
    return () => query.removeEventListener('change', update);
  }, [ratio]);
  return ratio;
}

/** One channel over the whole recording, with every epoch's span: kept solid, rejected hatched and dashed. */
export default function OverviewTrace({ recording, decisions, epochWindow, channel, onChannel, selectedEvent }: Props) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const box = useRef<HTMLDivElement>(null);
  const [widthCss, setWidthCss] = useState(600);
  const ratio = usePixelRatio();
  const id = useId();
  const index = Math.max(0, recording.channelNames.indexOf(channel));
  const total = recording.data[0]?.length ?? 0;

  useEffect(() => {
    if (!box.current) return;
    const observer = new ResizeObserver((entries) => setWidthCss(Math.max(200, Math.floor(entries[0].contentRect.width))));
    observer.observe(box.current);
    return () => observer.disconnect();
  }, []);

  const spans = useMemo<OverviewSpan[]>(() => epochSpans(recording, decisions, epochWindow, selectedEvent), [decisions, epochWindow, recording, selectedEvent]);

  const width = Math.round(widthCss * ratio);
  const height = Math.round(HEIGHT_CSS * ratio);
  const env = useMemo(() => envelope(recording.data[index], Math.min(width, Math.max(1, total))), [recording, index, width, total]);

  useEffect(() => {
    // One draw per frame at most, however many inputs change together.
    const frame = requestAnimationFrame(() => {
      const ctx = canvas.current?.getContext('2d');
      if (!ctx) return;
      const css = getComputedStyle(document.documentElement);
      const color = (name: string, fallback: string) => css.getPropertyValue(name).trim() || fallback;
      drawOverview(ctx, width, height, env, total, spans, {
        trace: color('--color-ink', '#10283a'),
        kept: color('--color-kelp', '#2f6f5e'),
        rejected: color('--color-coral-deep', '#a9442e'),
        background: color('--color-foam', '#fffdf8'),
      }, ratio);
    });
    return () => cancelAnimationFrame(frame);
  }, [env, spans, width, height, total, ratio]);

  const kept = decisions.filter((d) => !d.rejected).length;
  return (
    <div className="grid min-w-0 gap-2">
      <div className="flex flex-wrap items-end gap-3">
        <div className="field">
          <label htmlFor={`${id}-channel`}>Channel shown</label>
          <select id={`${id}-channel`} value={recording.channelNames[index]} onChange={(e) => onChannel(e.target.value)}>
            {recording.channelNames.map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
        </div>
        <ul className="flex flex-wrap gap-4 text-xs" aria-label="Legend">
          <li className="flex items-center gap-1">
            <span aria-hidden="true" className="inline-block h-3 w-5 border-2 border-kelp bg-kelp-pale" /> kept epoch (solid band)
          </li>
          <li className="flex items-center gap-1">
            <span
              aria-hidden="true"
              className="inline-block h-3 w-5 border-2 border-dashed border-coral-deep"
              style={{ backgroundImage: 'repeating-linear-gradient(45deg, var(--color-coral-deep) 0 1px, transparent 1px 5px)' }}
            />{' '}
            rejected epoch (hatched, dashed edge, ✕)
          </li>
        </ul>
      </div>
      <div ref={box} className="w-full min-w-0">
        <canvas
          ref={canvas}
          width={width}
          height={height}
          style={{ width: '100%', height: `${HEIGHT_CSS}px` }}
          role="img"
          aria-label={`Overview of ${recording.channelNames[index]} over the whole recording: ${decisions.length} epochs, ${kept} kept, ${decisions.length - kept} rejected`}
          className="block rounded border border-sand-deep"
        />
      </div>
    </div>
  );
}
