/**
 * The overview trace: a min/max envelope of one channel, one column per device pixel (decimated once there are
 * 4× more samples than pixels, as uPlot does), with every epoch's span marked. Kept epochs are solid bands with a
 * solid edge; rejected ones are hatched with a dashed edge, so the two differ without colour.
 */
export interface Envelope {
  mins: Float32Array;
  maxs: Float32Array;
}

/**
 * Min and max of x per pixel column: sample i belongs to column floor(i·columns/n), the column the drawing puts it
 * in (x = i/n · width), so column c holds samples ceil(c·n/columns) … ceil((c+1)·n/columns) − 1. With more columns
 * than samples, a column with no sample repeats its left neighbour's values.
 */
export function envelope(x: Float32Array, columns: number): Envelope {
  const mins = new Float32Array(columns);
  const maxs = new Float32Array(columns);
  const n = x.length;
  let i0 = 0;
  for (let c = 0; c < columns; c++) {
    // Integer ceil((c + 1)·n / columns), exact for n·columns < 2^53.
    const i1 = Math.floor(((c + 1) * n + columns - 1) / columns);
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = i0; i < i1; i++) {
      const v = x[i];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    mins[c] = lo === Infinity ? (c > 0 ? mins[c - 1] : 0) : lo;
    maxs[c] = hi === -Infinity ? (c > 0 ? maxs[c - 1] : 0) : hi;
    i0 = i1;
  }
  return { mins, maxs };
}

/** A robust vertical range: the 2nd percentile of column minima to the 98th of column maxima. */
export function robustRange(env: Envelope): [number, number] {
  const lo = Float32Array.from(env.mins).sort();
  const hi = Float32Array.from(env.maxs).sort();
  const n = lo.length;
  if (n === 0) return [-1, 1];
  const a = lo[Math.floor(0.02 * (n - 1))];
  const b = hi[Math.ceil(0.98 * (n - 1))];
  return b > a ? [a, b] : [a - 1, a + 1];
}

export interface OverviewSpan {
  startSample: number;
  endSample: number;
  rejected: boolean;
  selected: boolean;
}

export interface OverviewStyle {
  trace: string;
  kept: string;
  rejected: string;
  background: string;
}

export function drawOverview(
  ctx: CanvasRenderingContext2D,
  width: number,
  height: number,
  env: Envelope,
  totalSamples: number,
  spans: readonly OverviewSpan[],
  style: OverviewStyle,
  pixelRatio: number,
): void {
  ctx.fillStyle = style.background;
  ctx.fillRect(0, 0, width, height);
  const pad = 14 * pixelRatio;
  const plotH = height - pad;
  const xOf = (sample: number) => (sample / Math.max(1, totalSamples)) * width;

  for (const s of spans) {
    const x0 = xOf(s.startSample);
    const w = Math.max(1, xOf(s.endSample) - x0);
    ctx.save();
    if (s.rejected) {
      ctx.beginPath();
      ctx.rect(x0, pad, w, plotH - pad / 2);
      ctx.clip();
      ctx.strokeStyle = style.rejected;
      ctx.globalAlpha = 0.55;
      ctx.lineWidth = pixelRatio;
      const step = 6 * pixelRatio;
      for (let k = -plotH; k < w; k += step) {
        ctx.beginPath();
        ctx.moveTo(x0 + k, plotH);
        ctx.lineTo(x0 + k + plotH, pad);
        ctx.stroke();
      }
      ctx.restore();
      ctx.save();
      ctx.strokeStyle = style.rejected;
      ctx.setLineDash([3 * pixelRatio, 2 * pixelRatio]);
      ctx.lineWidth = (s.selected ? 2.5 : 1.25) * pixelRatio;
      ctx.strokeRect(x0, pad, w, plotH - pad / 2);
      // A cross above the span: rejected reads even in greyscale.
      ctx.setLineDash([]);
      const cx = x0 + w / 2;
      const r = 4 * pixelRatio;
      ctx.beginPath();
      ctx.moveTo(cx - r, 2 * pixelRatio);
      ctx.lineTo(cx + r, 2 * pixelRatio + 2 * r);
      ctx.moveTo(cx + r, 2 * pixelRatio);
      ctx.lineTo(cx - r, 2 * pixelRatio + 2 * r);
      ctx.stroke();
    } else {
      ctx.fillStyle = style.kept;
      ctx.globalAlpha = 0.18;
      ctx.fillRect(x0, pad, w, plotH - pad / 2);
      ctx.globalAlpha = 1;
      ctx.strokeStyle = style.kept;
      ctx.lineWidth = (s.selected ? 2.5 : 1.25) * pixelRatio;
      ctx.strokeRect(x0, pad, w, plotH - pad / 2);
      ctx.fillRect(x0, 3 * pixelRatio, w, 4 * pixelRatio);
    }
    ctx.restore();
  }

  const [lo, hi] = robustRange(env);
  const yOf = (v: number) => {
    const t = (v - lo) / (hi - lo);
    const clamped = t < -0.05 ? -0.05 : t > 1.05 ? 1.05 : t;
    return plotH - clamped * (plotH - pad * 1.5) - pad / 4;
  };
  ctx.strokeStyle = style.trace;
  ctx.lineWidth = pixelRatio;
  ctx.beginPath();
  const columns = env.mins.length;
  for (let c = 0; c < columns; c++) {
    const x = (c / columns) * width + 0.5;
    ctx.moveTo(x, yOf(env.maxs[c]));
    ctx.lineTo(x, yOf(env.mins[c]) + 0.5);
  }
  ctx.stroke();
}
