import { cos, sin } from '../portable-math';
import { SPECTRAL_KERNELS_BASE64 } from './spectral-kernels.wasm';

/**
 * The spectral kernels (kernels/spectral.ts, WebAssembly with 128-bit SIMD), instantiated once per thread, and the
 * layout of their memory. Pointers are byte offsets; `allocate` hands out 16-byte-aligned blocks that live as long
 * as the thread (transform buffers and twiddle tables per size, residue and phase tables per shape, trial-group
 * buffers), growing the memory when needed: a new shape adds a few tables, a repeated one nothing. After any `allocate` the memory may have grown, so read `heap()` again rather than keeping a view.
 *
 * The module is under 4 KB, so it compiles synchronously even on a page's main thread (Chromium refuses larger
 * synchronous compiles there).
 */
export interface SpectralKernels {
  memory: WebAssembly.Memory;
  fft(n: number, data: number, scratch: number, table: number): void;
  realFft(n: number, real: number, data: number, scratch: number, table: number): void;
  scaleInto(dst: number, src: number, count: number, scale: number): void;
  multiplyStrided(product: number, rho: number, h: number, src: number, count: number, first: boolean): void;
  conjugateInto(dst: number, src: number, count: number): void;
  conjugateTimes(dst: number, src: number, twiddles: number, count: number): void;
  powerStrided(row: number, r: number, step: number, src: number, count: number): void;
  multiplyPhased(dst: number, src: number, phase: number, count: number, scale: number, first: boolean): void;
  weightedPower(src: number, weights: number, count: number): number;
}

export class KernelsUnavailableError extends Error {
  constructor(cause?: unknown) {
    super(
      'This browser cannot run the analysis: it lacks WebAssembly with 128-bit SIMD, or may not compile it under the ' +
        "page's security policy (Chrome or Edge 97 and later, Firefox 89 and later, Safari 16.4 and later can).",
      { cause },
    );
    this.name = 'KernelsUnavailableError';
  }
}

const PAGE = 65536;
let kernels: SpectralKernels | null = null;
let view: Float64Array | null = null;
// The module's own statics sit in its first page; blocks start after it.
let top = PAGE;

function decode(text: string): Uint8Array<ArrayBuffer> {
  const binary = atob(text);
  const bytes = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i++) bytes[i] = binary.charCodeAt(i);
  return bytes;
}

export function spectralKernels(): SpectralKernels {
  if (kernels === null) {
    const bytes = decode(SPECTRAL_KERNELS_BASE64);
    if (typeof WebAssembly !== 'object' || !WebAssembly.validate(bytes)) throw new KernelsUnavailableError();
    try {
      kernels = new WebAssembly.Instance(new WebAssembly.Module(bytes), {}).exports as unknown as SpectralKernels;
    } catch (error) {
      // e.g. a browser that predates the CSP's 'wasm-unsafe-eval' refuses the compile
      throw new KernelsUnavailableError(error);
    }
  }
  return kernels;
}

/** A block of `bytes` (rounded up to 16), for the life of the thread. */
export function allocate(bytes: number): number {
  const k = spectralKernels();
  const start = top;
  top += Math.ceil(bytes / 16) * 16;
  const have = k.memory.buffer.byteLength;
  if (top > have) k.memory.grow(Math.ceil((top - have) / PAGE));
  return start;
}

const named = new Map<string, { at: number; bytes: number }>();

/**
 * A reusable block: the same pointer for the same name while `bytes` fits (a larger request takes a new block, at
 * least twice the old one, and the old one is never used again), so code that runs again and again (a channel's
 * decomposition) does not grow the memory each time. Callers on one thread must not hold one name twice at once.
 */
export function namedBlock(name: string, bytes: number): number {
  const have = named.get(name);
  if (have !== undefined && have.bytes >= bytes) return have.at;
  const size = Math.max(bytes, have === undefined ? 0 : 2 * have.bytes);
  const at = allocate(size);
  named.set(name, { at, bytes: size });
  return at;
}

/** Bytes handed out so far (blocks are never freed: this grows only when a new shape or size is met). */
export function allocatedBytes(): number {
  return top;
}

/** The kernels' memory as f64 (index = pointer / 8). */
export function heap(): Float64Array {
  const buffer = spectralKernels().memory.buffer;
  if (view === null || view.buffer !== buffer) view = new Float64Array(buffer);
  return view;
}

const tables = new Map<number, number>();

/**
 * The twiddle table of a size-n transform: entry k holds exp(−2πi·k/n) as (cos, cos, sin, −sin) (see
 * kernels/spectral.ts), from the portable cos/sin so every engine gets the same bits.
 */
export function twiddleTable(n: number): number {
  let table = tables.get(n);
  if (table === undefined) {
    table = allocate(32 * n);
    const h = heap();
    const base = table / 8;
    for (let k = 0; k < n; k++) {
      const angle = (2 * Math.PI * k) / n;
      const c = cos(angle);
      const s = sin(angle);
      h[base + 4 * k] = c;
      h[base + 4 * k + 1] = c;
      h[base + 4 * k + 2] = s;
      h[base + 4 * k + 3] = -s;
    }
    tables.set(n, table);
  }
  return table;
}
