// A 2-D context that writes SVG: the canvas painters (paintPanel, drawAxes, drawSeries, …) draw on it unchanged,
// so a vector figure shows the same geometry, ticks and colours as the canvas, from the one drawing code.
import type { ImageBuffer } from '../raster';
import { base64Of, encodePng } from './png';
import { fontFaceCss, type SvgFont } from './fonts';

type Matrix = [number, number, number, number, number, number];

interface State {
  m: Matrix;
  fillStyle: string | SvgGradient;
  strokeStyle: string | SvgGradient;
  lineWidth: number;
  font: string;
  textAlign: CanvasTextAlign;
  textBaseline: CanvasTextBaseline;
  globalAlpha: number;
  dash: number[];
  clip: string | null;
}

/** What `createLinearGradient` returns: stops kept for a `<linearGradient>`. */
export class SvgGradient {
  readonly stops: { offset: number; colour: string }[] = [];
  constructor(readonly x0: number, readonly y0: number, readonly x1: number, readonly y1: number) {}
  addColorStop(offset: number, colour: string): void {
    this.stops.push({ offset, colour });
  }
}

/** XML-escapes text and attribute values (XML 1.0 §2.4: `&`, `<`, `>`, quotes). */
export function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}

/** Coordinates to 3 decimals (a thousandth of a CSS pixel), shortest form. */
const num = (x: number) => String(Math.round(x * 1000) / 1000);

const multiply = (a: Matrix, b: Matrix): Matrix => [
  a[0] * b[0] + a[2] * b[1],
  a[1] * b[0] + a[3] * b[1],
  a[0] * b[2] + a[2] * b[3],
  a[1] * b[2] + a[3] * b[3],
  a[0] * b[4] + a[2] * b[5] + a[4],
  a[1] * b[4] + a[3] * b[5] + a[5],
];

/** Splits a CSS font shorthand as the painters write it (`[weight ]<size>px <families>`). */
export function parseFont(font: string): { weight: string; size: number; family: string } {
  const m = /^\s*(?:(normal|bold|\d{3})\s+)?(\d+(?:\.\d+)?)px\s+(.+)$/.exec(font);
  if (m === null) return { weight: '400', size: 10, family: 'sans-serif' };
  return { weight: m[1] === undefined || m[1] === 'normal' ? '400' : m[1] === 'bold' ? '700' : m[1], size: Number(m[2]), family: m[3].trim() };
}

const ANCHOR: Record<CanvasTextAlign, string> = { left: 'start', start: 'start', center: 'middle', right: 'end', end: 'end' };

/**
 * Ascent of the em box above the alphabetic baseline, in em, of the faces the plots use: canvas text baselines
 * (HTML §4.12.5.1.12) other than alphabetic are lines of this box. Measured in Chromium (measureText at 100 px, the
 * fontBoundingBoxAscent of "top" and "middle" against "alphabetic"); they equal the OS/2 typographic ascent over
 * ascent + descent (JetBrains Mono 1020/1320). Other faces get 0.8. SVG's dominant-baseline would say the same in
 * words, but its lines come from other metrics in Chromium and many editors ignore it: the shift goes into y.
 */
const EM_ASCENT: Record<string, number> = { 'JetBrains Mono Variable': 0.772656, 'Inter Variable': 0.800625 };

/** How far below `y` the alphabetic baseline sits for a canvas textBaseline, in em. */
export function baselineShiftEm(family: string, baseline: CanvasTextBaseline): number {
  const first = family.split(',')[0].trim().replace(/^["']|["']$/g, '');
  const a = EM_ASCENT[first] ?? 0.8;
  switch (baseline) {
    case 'top':
    case 'hanging':
      return a;
    case 'middle':
      return a - 0.5;
    case 'bottom':
    case 'ideographic':
      return a - 1;
    default:
      return 0;
  }
}

/**
 * Records canvas drawing calls as SVG elements in CSS pixels. `pixelRatio` is the device-pixel scale the painter
 * assumes (paintPanel sets a transform of that scale and puts its raster at device pixels), so the SVG user unit is
 * one CSS pixel whatever the painter's ratio; the raster keeps its device resolution as an embedded PNG.
 */
export class SvgContext {
  private state: State;
  private stack: State[] = [];
  private path: string[] = [];
  private readonly body: string[] = [];
  private readonly defs: string[] = [];
  private readonly images: { at: number; image: ImageBuffer; x: number; y: number }[] = [];
  private ids = 0;

  constructor(readonly width: number, readonly height: number, readonly pixelRatio = 1) {
    this.state = { m: [1, 0, 0, 1, 0, 0], fillStyle: '#000000', strokeStyle: '#000000', lineWidth: 1, font: '10px sans-serif', textAlign: 'start', textBaseline: 'alphabetic', globalAlpha: 1, dash: [], clip: null };
  }

  get fillStyle(): string | CanvasGradient | CanvasPattern {
    return this.state.fillStyle as string;
  }
  set fillStyle(v: string | CanvasGradient | CanvasPattern) {
    this.state.fillStyle = v as string | SvgGradient;
  }
  get strokeStyle(): string | CanvasGradient | CanvasPattern {
    return this.state.strokeStyle as string;
  }
  set strokeStyle(v: string | CanvasGradient | CanvasPattern) {
    this.state.strokeStyle = v as string | SvgGradient;
  }
  get lineWidth() {
    return this.state.lineWidth;
  }
  set lineWidth(v: number) {
    this.state.lineWidth = v;
  }
  get font() {
    return this.state.font;
  }
  set font(v: string) {
    this.state.font = v;
  }
  get textAlign() {
    return this.state.textAlign;
  }
  set textAlign(v: CanvasTextAlign) {
    this.state.textAlign = v;
  }
  get textBaseline() {
    return this.state.textBaseline;
  }
  set textBaseline(v: CanvasTextBaseline) {
    this.state.textBaseline = v;
  }
  get globalAlpha() {
    return this.state.globalAlpha;
  }
  set globalAlpha(v: number) {
    this.state.globalAlpha = v;
  }

  save(): void {
    this.stack.push({ ...this.state, m: [...this.state.m] as Matrix, dash: [...this.state.dash] });
  }
  restore(): void {
    const s = this.stack.pop();
    if (s !== undefined) this.state = s;
  }
  setTransform(a: number, b: number, c: number, d: number, e: number, f: number): void {
    this.state.m = [a, b, c, d, e, f];
  }
  translate(x: number, y: number): void {
    this.state.m = multiply(this.state.m, [1, 0, 0, 1, x, y]);
  }
  rotate(angle: number): void {
    const c = Math.cos(angle);
    const s = Math.sin(angle);
    this.state.m = multiply(this.state.m, [c, s, -s, c, 0, 0]);
  }
  setLineDash(segments: number[]): void {
    this.state.dash = [...segments];
  }

  /** The current transform in CSS pixels (device transform divided by the pixel ratio). */
  private out(): Matrix {
    const r = this.pixelRatio;
    const m = this.state.m;
    return [m[0] / r, m[1] / r, m[2] / r, m[3] / r, m[4] / r, m[5] / r];
  }
  private pt(x: number, y: number): string {
    const m = this.out();
    return `${num(m[0] * x + m[2] * y + m[4])} ${num(m[1] * x + m[3] * y + m[5])}`;
  }
  /** How much the transform stretches a length (uniform scale assumed, as the painters use). */
  private scale(): number {
    const m = this.out();
    return Math.sqrt(Math.abs(m[0] * m[3] - m[1] * m[2]));
  }

  beginPath(): void {
    this.path = [];
  }
  moveTo(x: number, y: number): void {
    this.path.push(`M${this.pt(x, y)}`);
  }
  lineTo(x: number, y: number): void {
    this.path.push(`${this.path.length === 0 ? 'M' : 'L'}${this.pt(x, y)}`);
  }
  closePath(): void {
    this.path.push('Z');
  }
  rect(x: number, y: number, w: number, h: number): void {
    this.path.push(`M${this.pt(x, y)}L${this.pt(x + w, y)}L${this.pt(x + w, y + h)}L${this.pt(x, y + h)}Z`);
  }
  arc(x: number, y: number, radius: number, start: number, end: number, anticlockwise = false): void {
    const at = (a: number) => this.pt(x + radius * Math.cos(a), y + radius * Math.sin(a));
    const r = num(radius * this.scale());
    let sweep = anticlockwise ? start - end : end - start;
    const full = sweep >= 2 * Math.PI - 1e-9;
    if (!full) sweep = ((sweep % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI);
    this.path.push(`${this.path.length === 0 ? 'M' : 'L'}${at(start)}`);
    const flag = anticlockwise ? 0 : 1;
    if (full) {
      const mid = start + (anticlockwise ? -Math.PI : Math.PI);
      this.path.push(`A${r} ${r} 0 0 ${flag} ${at(mid)}`, `A${r} ${r} 0 0 ${flag} ${at(start)}`);
    } else {
      this.path.push(`A${r} ${r} 0 ${sweep > Math.PI ? 1 : 0} ${flag} ${at(end)}`);
    }
  }

  private paint(style: string | SvgGradient): string {
    if (typeof style === 'string') return escapeXml(style);
    const id = `g${++this.ids}`;
    const stops = style.stops.map((s) => `<stop offset="${num(s.offset)}" stop-color="${escapeXml(s.colour)}"/>`).join('');
    const [x1, y1] = this.pt(style.x0, style.y0).split(' ');
    const [x2, y2] = this.pt(style.x1, style.y1).split(' ');
    this.defs.push(`<linearGradient id="${id}" gradientUnits="userSpaceOnUse" x1="${x1}" y1="${y1}" x2="${x2}" y2="${y2}">${stops}</linearGradient>`);
    return `url(#${id})`;
  }
  private common(): string {
    const s = this.state;
    return `${s.globalAlpha < 1 ? ` opacity="${num(s.globalAlpha)}"` : ''}${s.clip !== null ? ` clip-path="url(#${s.clip})"` : ''}`;
  }
  private strokeAttrs(): string {
    const s = this.state;
    const k = this.scale();
    return ` fill="none" stroke="${this.paint(s.strokeStyle)}" stroke-width="${num(s.lineWidth * k)}"${s.dash.length > 0 ? ` stroke-dasharray="${s.dash.map((d) => num(d * k)).join(' ')}"` : ''}`;
  }

  stroke(): void {
    if (this.path.length === 0) return;
    this.body.push(`<path d="${this.path.join('')}"${this.strokeAttrs()}${this.common()}/>`);
  }
  fill(): void {
    if (this.path.length === 0) return;
    this.body.push(`<path d="${this.path.join('')}" fill="${this.paint(this.state.fillStyle)}"${this.common()}/>`);
  }
  clip(): void {
    const id = `c${++this.ids}`;
    const outer = this.state.clip === null ? '' : ` clip-path="url(#${this.state.clip})"`;
    this.defs.push(`<clipPath id="${id}"${outer}><path d="${this.path.join('')}"/></clipPath>`);
    this.state.clip = id;
  }
  private rectPath(x: number, y: number, w: number, h: number): string {
    return `M${this.pt(x, y)}L${this.pt(x + w, y)}L${this.pt(x + w, y + h)}L${this.pt(x, y + h)}Z`;
  }
  fillRect(x: number, y: number, w: number, h: number): void {
    this.body.push(`<path d="${this.rectPath(x, y, w, h)}" fill="${this.paint(this.state.fillStyle)}"${this.common()}/>`);
  }
  strokeRect(x: number, y: number, w: number, h: number): void {
    this.body.push(`<path d="${this.rectPath(x, y, w, h)}"${this.strokeAttrs()}${this.common()}/>`);
  }
  clearRect(x: number, y: number, w: number, h: number): void {
    // Only a clear of the whole picture is meaningful here: it drops what was drawn so far.
    if (x <= 0 && y <= 0 && w * this.scale() >= this.width && h * this.scale() >= this.height) this.body.length = 0;
  }

  fillText(text: string, x: number, y: number): void {
    const s = this.state;
    const f = parseFont(s.font);
    const m = this.out();
    const anchor = ANCHOR[s.textAlign];
    const y0 = y + baselineShiftEm(f.family, s.textBaseline) * f.size;
    const attrs = `font-family="${escapeXml(f.family)}" font-size="${num(f.size)}" font-weight="${f.weight}" fill="${this.paint(s.fillStyle)}"${anchor === 'start' ? '' : ` text-anchor="${anchor}"`}${this.common()}`;
    // A plain move and uniform scale keep x/y (what most editors expect); a rotation goes into a transform.
    const plain = Math.abs(m[1]) < 1e-12 && Math.abs(m[2]) < 1e-12 && Math.abs(m[0] - m[3]) < 1e-12;
    if (plain) {
      const [px, py] = this.pt(x, y0).split(' ');
      const k = m[0];
      const scaled = k === 1 ? attrs : attrs.replace(/font-size="[^"]*"/, `font-size="${num(f.size * k)}"`);
      this.body.push(`<text x="${px}" y="${py}" ${scaled}>${escapeXml(text)}</text>`);
    } else {
      this.body.push(`<text transform="matrix(${m.map(num).join(' ')})" x="${num(x)}" y="${num(y0)}" ${attrs}>${escapeXml(text)}</text>`);
    }
  }
  /** A monospace estimate (0.6 em per character); the painters that export do not measure text. */
  measureText(text: string): TextMetrics {
    return { width: 0.6 * parseFont(this.state.font).size * text.length } as TextMetrics;
  }

  createLinearGradient(x0: number, y0: number, x1: number, y1: number): CanvasGradient {
    return new SvgGradient(x0, y0, x1, y1) as unknown as CanvasGradient;
  }
  createImageData(w: number, h: number): ImageData {
    return { width: w, height: h, data: new Uint8ClampedArray(4 * w * h), colorSpace: 'srgb' } as ImageData;
  }
  /** Device-pixel placement, as canvas does (the transform does not apply); kept for a PNG at `toSvg`. */
  putImageData(image: ImageData, dx: number, dy: number): void {
    const copy = { width: image.width, height: image.height, data: new Uint8ClampedArray(image.data) };
    this.images.push({ at: this.body.length, image: copy, x: dx / this.pixelRatio, y: dy / this.pixelRatio });
    this.body.push('');
  }
  drawImage(): void {
    throw new Error('SvgContext: drawImage is not supported (the plots draw rasters with putImageData)');
  }

  /**
   * The SVG document: width × height CSS pixels (viewBox in the same units), the fonts as base64 @font-face rules
   * (SVG 2 §6 styling; CSS Fonts 4 §4), rasters as PNG data URLs.
   */
  async toSvg(options: { fonts?: SvgFont[]; title?: string; description?: string } = {}): Promise<string> {
    const body = [...this.body];
    for (const { at, image, x, y } of this.images) {
      const png = base64Of(await encodePng(image));
      const w = image.width / this.pixelRatio;
      const h = image.height / this.pixelRatio;
      body[at] = `<image x="${num(x)}" y="${num(y)}" width="${num(w)}" height="${num(h)}" preserveAspectRatio="none" image-rendering="optimizeSpeed" xlink:href="data:image/png;base64,${png}"/>`;
    }
    const fonts = options.fonts ?? [];
    const style = fonts.length > 0 ? `<style>${fontFaceCss(fonts)}</style>` : '';
    const title = options.title === undefined ? '' : `<title>${escapeXml(options.title)}</title>`;
    const desc = options.description === undefined ? '' : `<desc>${escapeXml(options.description)}</desc>`;
    return [
      `<?xml version="1.0" encoding="UTF-8"?>`,
      `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" version="1.1" width="${num(this.width)}" height="${num(this.height)}" viewBox="0 0 ${num(this.width)} ${num(this.height)}">`,
      title + desc,
      `<defs>${style}${this.defs.join('')}</defs>`,
      ...body.filter((e) => e !== ''),
      `</svg>`,
      '',
    ].join('\n');
  }
}
