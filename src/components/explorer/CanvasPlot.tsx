import SvgExportButton from './SvgExportButton';
import { useLayoutEffect, useRef, type ReactNode } from 'react';
import { useElementWidth } from './useElementWidth';
import { lineLayout, type LabelRect, type LineLayout } from '../../lib/plot/line-plot';

export interface CanvasPlotProps {
  height: number;
  label: string;
  testId?: string;
  /** Paints the plot in CSS pixels (the transform already holds the pixel ratio); may return the labels' boxes. */
  draw: (ctx: CanvasRenderingContext2D, layout: LineLayout) => LabelRect[] | void;
  /** Height of a control lane above the plot area (for handles that must not cover any label). */
  lane?: number;
  /** DOM drawn over the plot (interactive bands). */
  overlay?: (layout: LineLayout) => ReactNode;
  /** File name (no extension) of an "Export SVG" of this plot; no button without it. */
  exportName?: string;
}

/** A canvas that fills its container's width, repaints at the device pixel ratio, and hosts a DOM overlay. */
export default function CanvasPlot({ height, label, testId, draw, overlay, lane = 0, exportName }: CanvasPlotProps) {
  const wrap = useRef<HTMLDivElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const width = useElementWidth(wrap);
  const layout = width > 0 ? lineLayout(width, height, { lane }) : null;
  useLayoutEffect(() => {
    const c = canvas.current;
    if (c === null || layout === null) return;
    const r = window.devicePixelRatio || 1;
    const w = Math.round(layout.width * r);
    const h = Math.round(layout.height * r);
    if (c.width !== w) c.width = w;
    if (c.height !== h) c.height = h;
    const ctx = c.getContext('2d');
    if (ctx === null) return;
    ctx.setTransform(r, 0, 0, r, 0, 0);
    ctx.fillStyle = '#fffdf8';
    ctx.fillRect(0, 0, layout.width, layout.height);
    const labels = draw(ctx, layout);
    // The drawn labels' boxes, for tests that check nothing covers them.
    c.dataset.labelBoxes = labels ? JSON.stringify(labels.map((b) => [b.x, b.y, b.width, b.height].map((v) => Math.round(v * 10) / 10))) : '';
  });
  const plot = (
    <div ref={wrap} className="relative w-full" style={{ height }}>
      {layout !== null && (
        <>
          <canvas ref={canvas} role="img" aria-label={label} data-testid={testId} data-plot-left={layout.left} data-plot-top={layout.top} data-plot-width={layout.plotWidth} data-plot-height={layout.plotHeight} className="block" style={{ width: layout.width, height: layout.height }} />
          {overlay?.(layout)}
        </>
      )}
    </div>
  );
  if (exportName === undefined) return plot;
  // The export button sits in a row of its own above the plot, so it never covers a label or a handle.
  return (
    <div className="flex w-full flex-col">
      <SvgExportButton layout={layout} draw={draw} label={label} fileName={exportName} testId={testId === undefined ? undefined : `${testId}-svg`} />
      {plot}
    </div>
  );
}
