import { useEffect, useLayoutEffect, useMemo, useRef, useState, type KeyboardEvent, type PointerEvent, type ReactNode } from 'react';
import { useElementWidth } from './useElementWidth';
import BaselineBand from './BaselineBand';
import { panelLayout, type PanelLayout } from '../../lib/plot/figure';
import { paintPanelFrame, paintPanelValues, panelScales, type PanelScales, type PanelSpec } from '../../lib/plot/panel';
import { setMapCursor, useMapCursor } from '../../lib/client/workspace/map-view';

export interface Cell {
  f: number;
  t: number;
}

export interface MapPanelProps {
  testId: string;
  spec: PanelSpec;
  height?: number;
  /** Seconds per sample, for the band's cell edges and keyboard steps. */
  dt: number;
  /** Snaps seconds to the sample grid and clamps into the epoch. */
  snap: (seconds: number) => number;
  /** Only one panel's band and map take keyboard focus; the others mirror them. */
  focusable: boolean;
  /** Shown beside the plot (below it, never over it). */
  warnings?: string[];
  /** Draw the baseline band (default yes); a map the baseline does not act on (phase consistency) leaves it out. */
  showBaseline?: boolean;
  /**
   * Drawn above the map in the panel's own coordinates (CSS pixels from the panel's top left), e.g. note pins:
   * `scales.time(seconds)` and `scales.frequency(hertz)` place a point; `layout` gives the plot rectangle.
   */
  overlay?: (geometry: MapGeometry) => ReactNode;
  /** Called after each paint of a new picture (the screen closes its timing measure there). */
  onPainted?: () => void;
}

export interface MapGeometry {
  layout: PanelLayout;
  scales: PanelScales;
  spec: PanelSpec;
}

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

/** The cursor's square over the map (it reads the cursor itself, so a pointer move repaints only this). */
function CursorMark({ layout, nf, nt }: { layout: PanelLayout; nf: number; nt: number }) {
  const cursor = useMapCursor((s) => s.cell);
  if (cursor === null) return null;
  const x = layout.left + ((cursor.t + 0.5) * layout.plotWidth) / nt;
  const y = layout.top + ((nf - 1 - cursor.f + 0.5) * layout.plotHeight) / nf;
  return <div aria-hidden className="pointer-events-none absolute border border-ink" style={{ left: x - 4, top: y - 4, width: 8, height: 8 }} />;
}

/**
 * One map as a canvas island, with the baseline band on top. The axes, ticks and title are painted once per size
 * and title into a kept canvas; a new picture copies it and paints only the map and the colour bar over it.
 */
export default function MapPanel(props: MapPanelProps) {
  const { spec, dt, snap, focusable, testId, warnings = [], showBaseline = true, onPainted } = props;
  const height = props.height ?? 300;
  const wrap = useRef<HTMLDivElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const reuse = useRef<{ image: ImageData | null; frame: HTMLCanvasElement | null; frameKey: string }>({ image: null, frame: null, frameKey: '' });
  const width = useElementWidth(wrap);
  const ratio = usePixelRatio();
  const layout: PanelLayout | null = width > 0 ? panelLayout(width, height) : null;
  const nt = spec.times.length;
  const nf = spec.frequencies.length;

  useLayoutEffect(() => {
    const c = canvas.current;
    if (c === null || layout === null) return;
    const w = Math.round(layout.width * ratio);
    const h = Math.round(layout.height * ratio);
    if (c.width !== w) c.width = w;
    if (c.height !== h) c.height = h;
    const ctx = c.getContext('2d');
    if (ctx === null) return;
    const kept = reuse.current;
    const frameKey = [w, h, ratio, spec.title, spec.spacing, nt, nf, spec.times[0], spec.times[nt - 1], spec.frequencies[0], spec.frequencies[nf - 1]].join('|');
    if (kept.frame === null || kept.frameKey !== frameKey) {
      kept.frame ??= document.createElement('canvas');
      kept.frame.width = w;
      kept.frame.height = h;
      const fctx = kept.frame.getContext('2d');
      if (fctx === null) return;
      paintPanelFrame(fctx, layout, spec, ratio);
      kept.frameKey = frameKey;
    }
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.drawImage(kept.frame, 0, 0);
    paintPanelValues(ctx, layout, spec, ratio, kept);
    onPainted?.();
    // Repaint only for a new picture: the raw map keeps its spec object while the baseline moves.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [spec, width, height, ratio]);

  // Cells outlined (e.g. Rayleigh p < 0.05), counted once per picture for the label, not at every cursor move.
  const outlined = useMemo(() => {
    let n = 0;
    if (spec.outline) for (let i = 0; i < spec.outline.length; i++) n += spec.outline[i] !== 0 ? 1 : 0;
    return n;
  }, [spec.outline]);
  const scales = useMemo(() => (layout === null ? null : panelScales(layout, spec.times, spec.frequencies, spec.spacing)), [layout?.width, layout?.height, spec.times, spec.frequencies, spec.spacing]); // eslint-disable-line react-hooks/exhaustive-deps

  if (layout === null || scales === null) return <div ref={wrap} className="w-full" style={{ height }} />;

  const cellAt = (clientX: number, clientY: number): Cell | null => {
    const rect = canvas.current!.getBoundingClientRect();
    const x = clientX - rect.left - layout.left;
    const y = clientY - rect.top - layout.top;
    if (x < 0 || y < 0 || x >= layout.plotWidth || y >= layout.plotHeight) return null;
    return { t: Math.min(nt - 1, Math.floor((x * nt) / layout.plotWidth)), f: nf - 1 - Math.min(nf - 1, Math.floor((y * nf) / layout.plotHeight)) };
  };
  const onMapKey = (e: KeyboardEvent<HTMLElement>) => {
    const c = useMapCursor.getState().cell ?? { f: Math.floor(nf / 2), t: Math.floor(nt / 2) };
    const big = e.shiftKey ? 10 : 1;
    const moves: Record<string, Cell> = {
      ArrowLeft: { f: c.f, t: Math.max(0, c.t - big) },
      ArrowRight: { f: c.f, t: Math.min(nt - 1, c.t + big) },
      ArrowUp: { f: Math.min(nf - 1, c.f + 1), t: c.t },
      ArrowDown: { f: Math.max(0, c.f - 1), t: c.t },
    };
    if (moves[e.key] === undefined) return;
    e.preventDefault();
    setMapCursor(moves[e.key]);
  };
  // While the band is dragged it holds the pointer (capture): moves over the map then go to the band, not here.
  const dragging = (e: PointerEvent<HTMLDivElement>) => (e.target as Element).hasPointerCapture?.(e.pointerId) ?? false;

  return (
    <div className="flex w-full flex-col gap-1">
      <div
        ref={wrap}
        className="relative w-full select-none"
        style={{ height }}
        onPointerMove={(e) => {
          if (!dragging(e)) setMapCursor(cellAt(e.clientX, e.clientY));
        }}
        onPointerLeave={(e) => {
          if (!dragging(e)) setMapCursor(null);
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
        <CursorMark layout={layout} nf={nf} nt={nt} />
        {showBaseline && <BaselineBand testId={testId} layout={layout} time={scales.time} times={spec.times} dt={dt} snap={snap} focusable={focusable} />}
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
