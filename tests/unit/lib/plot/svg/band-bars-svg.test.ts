// Band bars as a standalone SVG. A scenario of our own: a "foghorn" and a "buoy" cue, two bands, one window.
import { describe, expect, it } from 'vitest';
import { bandBarsSvg, type BandBarRow } from '../../../../../src/lib/plot/svg/band-bars-svg';

const texts = (svg: string) => [...svg.matchAll(/<text\b[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
const rects = (svg: string) => [...svg.matchAll(/<rect x="([-\d.]+)" y="([-\d.]+)" width="14" height="([-\d.]+)" fill="([^"]+)"><title>([^<]*)<\/title>/g)].map((m) => ({ y: Number(m[2]), h: Number(m[3]), fill: m[4], title: m[5] }));

describe('bandBarsSvg', () => {
  const theta = { name: 'theta', lowHz: 4, highHz: 8 };
  const alpha = { name: 'alpha', lowHz: 8, highHz: 13 };
  const win = { name: 'early', startSeconds: 0, endSeconds: 0.5 };
  const rows: BandBarRow[] = [
    { band: theta, window: win, condition: 'foghorn', value: 2 },
    { band: alpha, window: win, condition: 'foghorn', value: -1 },
    { band: theta, window: win, condition: 'buoy', value: 0.5 },
    { band: alpha, window: win, condition: 'buoy', value: NaN },
  ];
  const svg = bandBarsSvg({ title: 'Band means · Cz · dB', rows, bands: [theta, alpha], windows: [win], labels: ['foghorn', 'buoy'], unit: 'dB', neutral: 0, colours: ['#0072B2', '#E69F00'] });

  it('draws each bar from the neutral value, its length proportional to the value (largest |value| spans half the axis)', () => {
    const bars = rects(svg);
    expect(bars).toHaveLength(4);
    const unit = bars[0].h / 2; // value 2 is the largest |v − 0|: it reaches the top
    expect(bars[1].h / unit).toBeCloseTo(1, 2);
    expect(bars[2].h / unit).toBeCloseTo(0.5, 2);
    expect(bars[0].y + bars[0].h).toBeCloseTo(bars[1].y, 6); // up from and down from the same neutral line
    expect(bars[3].h).toBe(1);
    expect(bars[3].title).toBe('alpha · early · buoy: no value');
    expect(bars.map((b) => b.fill)).toEqual(['#0072B2', '#E69F00', '#0072B2', '#E69F00']);
  });

  it('writes the axis values, group names, legend and caution as <text>', () => {
    const t = texts(svg);
    for (const s of ['-2', '0', '2', 'dB', 'early', 'foghorn', 'buoy', 'theta 4–8 Hz', 'alpha 8–13 Hz', 'Band means · Cz · dB']) expect(t).toContain(s);
    expect(t.some((s) => s.includes('not a medical device'))).toBe(true);
  });
});
