import { useRef, type KeyboardEvent, type PointerEvent } from 'react';
import type { PanelLayout } from '../../lib/plot/figure';
import type { AxisScale } from '../../lib/plot/axes';
import { useWorkspace } from '../../lib/client/workspace/store';

interface BaselineBandProps {
  testId: string;
  layout: PanelLayout;
  time: AxisScale;
  times: ArrayLike<number>;
  /** Seconds per sample, for the band's cell edges and keyboard steps. */
  dt: number;
  /** Snaps seconds to the sample grid and clamps into the epoch. */
  snap: (seconds: number) => number;
  /** Only one panel's band takes keyboard focus; the others mirror it. */
  focusable: boolean;
}

type Drag = { kind: 'body' | 'start' | 'end'; x0: number; start0: number; end0: number; pxPerSecond: number };

/**
 * The live baseline window over a map (drag the body or an edge; arrows move one sample, shift 50 ms). It reads the
 * baseline itself, so a move re-renders the bands, not the maps around them.
 */
export default function BaselineBand({ testId, layout, time, times, dt, snap, focusable }: BaselineBandProps) {
  const baseline = useWorkspace((s) => s.baseline);
  const setBaseline = useWorkspace((s) => s.setBaseline);
  const drag = useRef<Drag | null>(null);
  const nt = times.length;
  const lo = times[0];
  const hi = times[nt - 1];
  const x0 = time(baseline.start - dt / 2);
  const x1 = time(baseline.end + dt / 2);

  const onPointerDown = (kind: Drag['kind']) => (e: PointerEvent<HTMLDivElement>) => {
    e.preventDefault();
    e.stopPropagation();
    (e.currentTarget as HTMLElement).setPointerCapture(e.pointerId);
    const [d0, d1] = time.domain();
    drag.current = { kind, x0: e.clientX, start0: baseline.start, end0: baseline.end, pxPerSecond: layout.plotWidth / (d1 - d0) };
  };
  const onPointerMove = (e: PointerEvent<HTMLDivElement>) => {
    const g = drag.current;
    if (g === null) return;
    const now = useWorkspace.getState().baseline;
    const shift = (e.clientX - g.x0) / g.pxPerSecond;
    if (g.kind === 'body') {
      const len = g.end0 - g.start0;
      let s = snap(g.start0 + shift);
      if (s + len > hi + 1e-9) s = snap(hi - len);
      if (s < lo) s = lo;
      const next = { start: s, end: snap(s + len) };
      if (next.start !== now.start || next.end !== now.end) setBaseline(next);
    } else if (g.kind === 'start') {
      const s = Math.min(snap(g.start0 + shift), now.end);
      if (s !== now.start) setBaseline({ start: s, end: now.end });
    } else {
      const en = Math.max(snap(g.end0 + shift), now.start);
      if (en !== now.end) setBaseline({ start: now.start, end: en });
    }
  };
  const onPointerUp = () => {
    drag.current = null;
  };
  const onKey = (kind: Drag['kind']) => (e: KeyboardEvent<HTMLDivElement>) => {
    if (e.key !== 'ArrowLeft' && e.key !== 'ArrowRight') return;
    e.preventDefault();
    const step = (e.shiftKey ? 0.05 : dt) * (e.key === 'ArrowLeft' ? -1 : 1);
    let { start, end } = useWorkspace.getState().baseline;
    if (kind === 'body') {
      const len = end - start;
      start = Math.max(lo, Math.min(snap(start + step), snap(hi - len)));
      end = snap(start + len);
    } else if (kind === 'start') start = Math.min(snap(start + step), end);
    else end = Math.max(snap(end + step), start);
    setBaseline({ start, end });
  };

  const fmt = (s: number) => `${Number(s.toFixed(3))} s`;
  const common = { tabIndex: focusable ? 0 : -1, 'aria-hidden': focusable ? undefined : true, onPointerMove, onPointerUp, onPointerCancel: onPointerUp } as const;
  return (
    <>
      <div
        {...common}
        role={focusable ? 'slider' : undefined}
        aria-label="Baseline window (move)"
        aria-valuemin={lo}
        aria-valuemax={hi}
        aria-valuenow={baseline.start}
        aria-valuetext={`${fmt(baseline.start)} to ${fmt(baseline.end)}`}
        data-testid={`${testId}-baseline`}
        className="absolute cursor-grab border-x-2 border-ink bg-foam/35 outline-offset-0 active:cursor-grabbing"
        style={{ left: x0, top: layout.top, width: Math.max(4, x1 - x0), height: layout.plotHeight, touchAction: 'none' }}
        onPointerDown={onPointerDown('body')}
        onKeyDown={onKey('body')}
      >
        <span aria-hidden className="pointer-events-none absolute top-0.5 left-1 rounded-sm bg-ink/80 px-1 text-[10px] leading-tight text-foam">baseline</span>
      </div>
      {/* The edges are siblings of the band, not inside it: an interactive control never nests in another. */}
      {(['start', 'end'] as const).map((kind) => (
        <div
          key={kind}
          {...common}
          role={focusable ? 'slider' : undefined}
          aria-label={`Baseline ${kind}`}
          aria-valuemin={lo}
          aria-valuemax={hi}
          aria-valuenow={baseline[kind]}
          aria-valuetext={fmt(baseline[kind])}
          data-testid={`${testId}-baseline-${kind}`}
          className="group absolute w-4 cursor-ew-resize"
          style={{ left: kind === 'start' ? x0 - 7 : x0 + Math.max(4, x1 - x0) - 9, top: layout.top, height: layout.plotHeight, touchAction: 'none' }}
          onPointerDown={onPointerDown(kind)}
          onKeyDown={onKey(kind)}
        >
          {/* The handle itself: an ink tab across the edge with two grip lines, always visible. */}
          <span aria-hidden className="absolute left-1/2 flex h-7 w-2.5 -translate-x-1/2 flex-col items-center justify-center gap-0.5 rounded-sm bg-ink ring-1 ring-foam group-hover:bg-kelp-deep group-focus-visible:bg-kelp-deep" style={{ top: 'calc(50% - 14px)' }} data-testid={`${testId}-baseline-${kind}-handle`}>
            <span className="h-px w-1.5 bg-foam" />
            <span className="h-px w-1.5 bg-foam" />
          </span>
        </div>
      ))}
    </>
  );
}
