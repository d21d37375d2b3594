import { useLayoutEffect, useRef } from 'react';
import { useElementWidth } from './useElementWidth';
import { drawTrace, FOAM, panelLayout, type TraceSeries } from '../../lib/plot/figure';
import { timeScale } from '../../lib/plot/axes';

interface EvokedTraceProps {
  times: Float64Array;
  series: TraceSeries[];
  title: string;
  testId: string;
  height?: number;
}

/**
 * The evoked response under a map: laid out with the map's own `panelLayout` and time scale, in a container of the
 * map's width, so each time point sits straight below its map column.
 */
export default function EvokedTrace({ times, series, title, testId, height = 150 }: EvokedTraceProps) {
  const wrap = useRef<HTMLDivElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const width = useElementWidth(wrap);
  const layout = width > 0 ? panelLayout(width, height) : null;
  useLayoutEffect(() => {
    const c = canvas.current;
    if (c === null || layout === null) return;
    const r = window.devicePixelRatio || 1;
    c.width = Math.round(layout.width * r);
    c.height = Math.round(layout.height * r);
    const ctx = c.getContext('2d');
    if (ctx === null) return;
    ctx.setTransform(r, 0, 0, r, 0, 0);
    ctx.fillStyle = FOAM;
    ctx.fillRect(0, 0, layout.width, layout.height);
    drawTrace(ctx, layout, timeScale(times, layout.left, layout.left + layout.plotWidth), times, series, 'µV', title);
    // Repaint for a new trace or size only: the Maps screen renders on every move of the baseline.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [times, series, title, width, height]);
  return (
    <div ref={wrap} className="w-full" style={{ height }}>
      {layout !== null && (
        <canvas
          ref={canvas}
          role="img"
          aria-label={`${title}: ${series.map((s) => s.label).join(', ')}, µV against time`}
          data-testid={testId}
          data-plot-left={layout.left}
          data-plot-width={layout.plotWidth}
          className="block"
          style={{ width: layout.width, height: layout.height }}
        />
      )}
    </div>
  );
}
