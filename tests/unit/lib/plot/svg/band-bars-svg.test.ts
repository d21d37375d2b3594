// Band bars as a standalone SVG. A scenario of our own: a "foghorn" and a "buoy" cue, two bands, one window.
import { describe, expect, it } from 'vitest';
import { bandBarsSvg, type BandBarRow } from '../../../../../src/lib/plot/svg/band-bars-svg';
import { bandChartLayout } from '../../../../../src/lib/plot/band-chart';

const texts = (svg: string) => [...svg.matchAll(/<text\b[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
const rects = (svg: string) => [...svg.matchAll(/<rect x="([-\d.]+)" y="([-\d.]+)" width="[\d.]+" height="([-\d.]+)" fill="([^"]+)"><title>([^<]*)<\/title>/g)].map((m) => ({ y: Number(m[2]), h: Number(m[3]), fill: m[4], title: m[5] }));

describe('bandBarsSvg', () => {
  const theta = { name: 'theta', lowHz: 4, highHz: 8 };
  const alpha = { name: 'alpha', lowHz: 8, highHz: 13 };
  const win = { name: 'early', startSeconds: 0, endSeconds: 0.5 };
  const rows: BandBarRow[] = [
    { band: theta, window: win, site: 'Cz', condition: 'foghorn', value: 2 },
    { band: alpha, window: win, site: 'Cz', condition: 'foghorn', value: -1 },
    { band: theta, window: win, site: 'Cz', condition: 'buoy', value: 0.5 },
    { band: alpha, window: win, site: 'Cz', condition: 'buoy', value: NaN },
  ];
  const svg = bandBarsSvg({ sites: ['Cz'], rows, bands: [theta, alpha], windows: [win], labels: ['foghorn', 'buoy'], unit: 'dB', neutral: 0, colours: ['#0072B2', '#E69F00'] });

  it('draws each bar from the neutral value, its length proportional to the value, on the screen’s chart geometry', () => {
    const bars = rects(svg);
    expect(bars).toHaveLength(4);
    const unit = bars[0].h / 2; // value 2 is the largest |v − 0|: it reaches the top
    expect(bars[1].h / unit).toBeCloseTo(1, 2);
    expect(bars[2].h / unit).toBeCloseTo(0.5, 2);
    expect(bars[0].y + bars[0].h).toBeCloseTo(bars[1].y, 6); // up from and down from the same neutral line
    expect(bars[3].h).toBe(1);
    expect(bars[3].title).toBe('Cz · alpha · early · buoy: no value');
    // bandChartLayout (the screen's geometry) at 640 px: value 2 is the nice upper limit, so its bar reaches the top.
    const layout = bandChartLayout({ width: 640, height: 240, groups: 2, bars: 2, values: rows.map((r) => r.value), neutral: 0 });
    expect(bars[0].y).toBeCloseTo(layout.y(2), 3);
    expect(bars[0].h).toBeCloseTo(layout.y(0) - layout.y(2), 3);
    expect(bars.map((b) => b.fill)).toEqual(['#0072B2', '#E69F00', '#0072B2', '#E69F00']);
  });

  it('writes the axis values, group names, legend and caution as <text>', () => {
    const t = texts(svg);
    for (const s of ['-2', '-1', '0', '1', '2', 'mean (dB)', 'Cz', 'early', 'foghorn', 'buoy', 'theta 4–8 Hz', 'alpha 8–13 Hz']) expect(t).toContain(s);
    expect(t.some((s) => s.includes('not a medical device'))).toBe(true);
  });
});
