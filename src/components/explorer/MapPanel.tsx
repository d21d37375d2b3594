import { useEffect, useLayoutEffect, useMemo, useRef, useState, type KeyboardEvent, type PointerEvent, type ReactNode } from 'react';
import { useElementWidth } from './useElementWidth';
import { panelLayout, type PanelLayout } from '../../lib/plot/figure';
import { paintPanel, panelScales, type PanelScales, type PanelSpec } from '../../lib/plot/panel';

export interface Cell {
  f: number;
  t: number;
}

export interface MapPanelProps {
  testId: string;
  spec: PanelSpec;
  height?: number;
  baseline: { start: number; end: number };
  /** Seconds per sample, for the band's cell edges and keyboard steps. */
  dt: number;
  /** Snaps seconds to the sample grid and clamps into the epoch. */
  snap: (seconds: number) => number;
  onBaseline: (b: { start: number; end: number }) => void;
  /** Only one panel's band takes keyboard focus; the other mirrors it. */
  focusable: boolean;
  cursor: Cell | null;
  onCursor: (cell: Cell | null) => void;
  /** Shown beside the plot (below it, never over it). */
  warnings?: string[];
  /** Draw the baseline band (default yes); a map the baseline does not act on (phase consistency) leaves it out. */
  showBaseline?: boolean;
  /**
   * Drawn above the map in the panel's own coordinates (CSS pixels from the panel's top left), e.g. note pins:
   * `scales.time(seconds)` and `scales.frequency(hertz)` place a point; `layout` gives the plot rectangle.
   */
  overlay?: (geometry: MapGeometry) => ReactNode;
}

export interface MapGeometry {
  layout: PanelLayout;
  scales: PanelScales;
  spec: PanelSpec;
}

type Drag = { kind: 'body' | 'start' | 'end'; x0: number; start0: number; end0: number; pxPerSecond: number };

/** Watches devicePixelRatio through matchMedia (as uPlot's dom.js does), so zooming repaints at the new ratio. */
function usePixelRatio(): number {
  const [ratio, setRatio] = useState(() => (typeof window === 'undefined' ? 1 : window.devicePixelRatio || 1));
  useEffect(() => {
    const query = window.matchMedia(`(resolution: ${ratio}dppx)`);
    const update = () => setRatio(window.devicePixelRatio || 1);
    query.addEventListener('change', update);
    return () => query.removeEventListener('change', update);
  }, [ratio]);
  return ratio;
}

/** One map as a canvas island, with the baseline band (drag body or edges; arrows one sample, shift 50 ms) on top. */
export default function MapPanel(props: MapPanelProps) {
  const { spec, baseline, dt, snap, onBaseline, focusable, cursor, onCursor, testId, warnings = [], showBaseline = true } = props;
  const height = props.height ?? 300;
  const wrap = useRef<HTMLDivElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const reuse = useRef<{ image: ImageData | null }>({ image: null });
  const drag = useRef<Drag | null>(null);
  const width = useElementWidth(wrap);
  const ratio = usePixelRatio();


  const layout: PanelLayout | null = width > 0 ? panelLayout(width, height) : null;

  useLayoutEffect(() => {
    const c = canvas.current;
    if (c === null || layout === null) return;
    const w = Math.round(layout.width * ratio);
    const h = Math.round(layout.height * ratio);
    if (c.width !== w) c.width = w;
    if (c.height !== h) c.height = h;
    const ctx = c.getContext('2d');
    if (ctx === null) return;
    paintPanel(ctx, layout, spec, ratio, reuse.current);
    // Repaint only for a new picture: the raw map keeps its spec object while the baseline moves.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [spec, width, height, ratio]);

  // Cells outlined (e.g. Rayleigh p < 0.05), counted once per picture for the label, not at every cursor move.
  const outlined = useMemo(() => {
    let n = 0;
    if (spec.outline) for (let i = 0; i < spec.outline.length; i++) n += spec.outline[i] !== 0 ? 1 : 0;
    return n;
  }, [spec.outline]);

  if (layout === null) return <div ref={wrap} className="w-full" style={{ height }} />;
  const scales = panelScales(layout, spec.times, spec.frequencies, spec.spacing);
  const x0 = scales.time(baseline.start - dt / 2);
  const x1 = scales.time(baseline.end + dt / 2);
  const nt = spec.times.length;
  const nf = spec.frequencies.length;

  const cellAt = (clientX: number, clientY: number): Cell | null => {
    const rect = canvas.current!.getBoundingClientRect();
    const x = clientX - rect.left - layout.left;
    const y = clientY - rect.top - layout.top;
    if (x < 0 || y < 0 || x >= layout.plotWidth || y >= layout.plotHeight) return null;
    return { t: Math.min(nt - 1, Math.floor((x * nt) / layout.plotWidth)), f: nf - 1 - Math.min(nf - 1, Math.floor((y * nf) / layout.plotHeight)) };
  };

  const onPointerDown = (kind: Drag['kind']) => (e: PointerEvent<HTMLDivElement>) => {
    e.preventDefault();
    e.stopPropagation();
    (e.currentTarget as HTMLElement).setPointerCapture(e.pointerId);
    const [d0, d1] = scales.time.domain();
    drag.current = { kind, x0: e.clientX, start0: baseline.start, end0: baseline.end, pxPerSecond: layout.plotWidth / (d1 - d0) };
  };
  const onPointerMove = (e: PointerEvent<HTMLDivElement>) => {
    const g = drag.current;
    if (g === null) return;
    const shift = (e.clientX - g.x0) / g.pxPerSecond;
    const lo = spec.times[0];
    const hi = spec.times[nt - 1];
    if (g.kind === 'body') {
      const len = g.end0 - g.start0;
      let s = snap(g.start0 + shift);
      if (s + len > hi + 1e-9) s = snap(hi - len);
      if (s < lo) s = lo;
      const next = { start: s, end: snap(s + len) };
      if (next.start !== baseline.start || next.end !== baseline.end) onBaseline(next);
    } else if (g.kind === 'start') {
      const s = Math.min(snap(g.start0 + shift), baseline.end);
      if (s !== baseline.start) onBaseline({ start: s, end: baseline.end });
    } else {
      const en = Math.max(snap(g.end0 + shift), baseline.start);
      if (en !== baseline.end) onBaseline({ start: baseline.start, end: en });
    }
  };
  const onPointerUp = () => {
    drag.current = null;
  };
  const onKey = (kind: Drag['kind']) => (e: KeyboardEvent<HTMLDivElement>) => {
    if (e.key !== 'ArrowLeft' && e.key !== 'ArrowRight') return;
    e.preventDefault();
    const step = (e.shiftKey ? 0.05 : dt) * (e.key === 'ArrowLeft' ? -1 : 1);
    const lo = spec.times[0];
    const hi = spec.times[nt - 1];
    let { start, end } = baseline;
    if (kind === 'body') {
      const len = end - start;
      start = Math.max(lo, Math.min(snap(start + step), snap(hi - len)));
      end = snap(start + len);
    } else if (kind === 'start') start = Math.min(snap(start + step), end);
    else end = Math.max(snap(end + step), start);
    onBaseline({ start, end });
  };
  const onMapKey = (e: KeyboardEvent<HTMLElement>) => {
    const c = cursor ?? { f: Math.floor(nf / 2), t: Math.floor(nt / 2) };
    const big = e.shiftKey ? 10 : 1;
    const moves: Record<string, Cell> = {
      ArrowLeft: { f: c.f, t: Math.max(0, c.t - big) },
      ArrowRight: { f: c.f, t: Math.min(nt - 1, c.t + big) },
      ArrowUp: { f: Math.min(nf - 1, c.f + 1), t: c.t },
      ArrowDown: { f: Math.max(0, c.f - 1), t: c.t },
    };
    if (moves[e.key] === undefined) return;
    e.preventDefault();
    onCursor(moves[e.key]);
  };

  const fmt = (s: number) => `${Number(s.toFixed(3))} s`;
  const bandTop = layout.top;
  const bandHeight = layout.plotHeight;
  const cursorX = cursor === null ? null : layout.left + ((cursor.t + 0.5) * layout.plotWidth) / nt;
  const cursorY = cursor === null ? null : layout.top + ((nf - 1 - cursor.f + 0.5) * layout.plotHeight) / nf;
  return (
    <div className="flex w-full flex-col gap-1">
    <div
      ref={wrap}
      className="relative w-full select-none"
      style={{ height }}
      onPointerMove={(e) => {
        if (drag.current === null) onCursor(cellAt(e.clientX, e.clientY));
      }}
      onPointerLeave={() => {
        if (drag.current === null) onCursor(null);
      }}
    >
      <canvas
        ref={canvas}
        data-testid={testId}
        data-plot-left={layout.left}
        data-plot-top={layout.top}
        data-plot-width={layout.plotWidth}
        data-plot-height={layout.plotHeight}
        data-times={nt}
        data-frequencies={nf}
        data-scale-kind={spec.scale.kind}
        data-scale-low={spec.scale.domain[0]}
        data-scale-high={spec.scale.domain[1]}
        data-outlined={spec.outline ? outlined : undefined}
        role="img"
        aria-label={`${spec.title}: ${nf} frequencies × ${nt} times, colour in ${spec.unit}`}
        tabIndex={focusable ? 0 : -1}
        onKeyDown={onMapKey}
        className="block"
        style={{ width: layout.width, height: layout.height }}
      />
      {props.overlay?.({ layout, scales, spec })}
      {cursorX !== null && cursorY !== null && (
        <div aria-hidden className="pointer-events-none absolute border border-ink" style={{ left: cursorX - 4, top: cursorY - 4, width: 8, height: 8 }} />
      )}
      {showBaseline && (
      <>
      <div
        role={focusable ? 'slider' : undefined}
        aria-hidden={focusable ? undefined : true}
        aria-label="Baseline window (move)"
        aria-valuemin={spec.times[0]}
        aria-valuemax={spec.times[nt - 1]}
        aria-valuenow={baseline.start}
        aria-valuetext={`${fmt(baseline.start)} to ${fmt(baseline.end)}`}
        tabIndex={focusable ? 0 : -1}
        data-testid={`${testId}-baseline`}
        className="absolute cursor-grab border-x-2 border-ink bg-foam/35 outline-offset-0 active:cursor-grabbing"
        style={{ left: x0, top: bandTop, width: Math.max(4, x1 - x0), height: bandHeight, touchAction: 'none' }}
        onPointerDown={onPointerDown('body')}
        onPointerMove={onPointerMove}
        onPointerUp={onPointerUp}
        onPointerCancel={onPointerUp}
        onKeyDown={onKey('body')}
      >
        <span aria-hidden className="pointer-events-none absolute top-0.5 left-1 rounded-sm bg-ink/80 px-1 text-[10px] leading-tight text-foam">baseline</span>
      </div>
      {/* The edges are siblings of the band, not inside it: an interactive control never nests in another. */}
        {(['start', 'end'] as const).map((kind) => (
          <div
            key={kind}
            role={focusable ? 'slider' : undefined}
            aria-hidden={focusable ? undefined : true}
            aria-label={`Baseline ${kind}`}
            aria-valuemin={spec.times[0]}
            aria-valuemax={spec.times[nt - 1]}
            aria-valuenow={baseline[kind]}
            aria-valuetext={fmt(baseline[kind])}
            tabIndex={focusable ? 0 : -1}
            data-testid={`${testId}-baseline-${kind}`}
            className="group absolute w-4 cursor-ew-resize"
            style={{ left: kind === 'start' ? x0 - 7 : x0 + Math.max(4, x1 - x0) - 9, top: bandTop, height: bandHeight, touchAction: 'none' }}
            onPointerDown={onPointerDown(kind)}
            onPointerMove={onPointerMove}
            onPointerUp={onPointerUp}
            onPointerCancel={onPointerUp}
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
      )}
    </div>
      {warnings.length > 0 && (
        <ul className="m-0 list-none p-0" style={{ marginLeft: layout.left }} data-testid={`${testId}-warnings`}>
          {warnings.map((w) => (
            <li key={w} className="mb-1 rounded-sm border border-coral bg-coral-pale px-2 py-0.5 text-xs text-coral-deep">
              ⚠ {w}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
