"""Reference timing for `npm run bench`: the same Morlet power + dB baseline workload in numpy, for our own
comparison only (no test depends on Python). Two variants, both batched over epochs:
- "standard": one forward FFT per epoch at the largest size, per frequency one inverse FFT at the smallest power
  of two >= L + 5 sigma, power averaged over trials, then dB against the baseline mean;
- "band": the core's own algorithm (src/lib/analysis/wavelet.ts, decompose.ts): wavelets to 8 sigma, narrow-band
  frequencies summed on a 2M-point grid per trial and interpolated once.

Run: env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE python3 scripts/bench-numpy.py
"""
import resource
import time

import numpy as np

FS = 512.0
CHANNELS = 32
EPOCHS = 100
TMIN, TMAX = -1.0, 2.0
FREQS = 2.0 * (60.0 / 2.0) ** (np.arange(40) / 39.0)
CYCLES = 3.0 * (10.0 / 3.0) ** (np.arange(40) / 39.0)
BASELINE = (-0.5, -0.2)


def next_pow2(n):
    p = 2
    while p < n:
        p *= 2
    return p


def wavelet_spectrum(f, s, h, n):
    t = np.arange(-h, h + 1) / FS
    g = np.exp(-t * t / (2 * s * s))
    w = (2.0 / g.sum()) * g * np.exp(2j * np.pi * f * t)
    placed = np.zeros(n, complex)
    placed[: h + 1] = w[h:]
    placed[n - h:] = w[:h]
    return np.fft.fft(placed)


def standard(data, starts, L):
    sigmas = CYCLES / (2 * np.pi * FREQS)
    halves = np.ceil(5 * sigmas * FS).astype(int)
    sizes = [next_pow2(L + h) for h in halves]
    nmax = max(sizes)
    spectra = [wavelet_spectrum(f, s, h, n) for f, s, h, n in zip(FREQS, sigmas, halves, sizes)]
    idx = starts[:, None] + np.arange(L)[None, :]
    power = np.empty((CHANNELS, len(FREQS), L))
    for c in range(CHANNELS):
        X = np.fft.fft(data[c][idx].astype(np.float64), n=nmax, axis=1)
        for i, (n, W) in enumerate(zip(sizes, spectra)):
            y = np.fft.ifft(X[:, :: nmax // n] * W, axis=1)[:, :L]
            power[c, i] = (y.real ** 2 + y.imag ** 2).mean(axis=0)
    return power


def band(data, starts, L):
    sigmas = CYCLES / (2 * np.pi * FREQS)
    plans = []
    for f, s in zip(FREQS, sigmas):
        h = int(np.ceil(8 * s * FS))
        n = next_pow2(L + h)
        W = wavelet_spectrum(f, s, h, n)
        mag = np.abs(W)
        peak = int(mag.argmax())
        d = (np.arange(n) - peak + n // 2) % n - n // 2
        keep = d[mag >= 1e-13 * mag[peak]]
        below, above = -keep.min(), keep.max()
        width = below + above + 1
        m = next_pow2(width)
        if 4 * m <= n:
            k = (peak - below - (m - width) // 2 + np.arange(m)) % n
            plans.append((n, k, W[k] / n, m))
        else:
            plans.append((n, None, W, None))
    nmax = max(p[0] for p in plans)
    idx = starts[:, None] + np.arange(L)[None, :]
    power = np.empty((CHANNELS, len(FREQS), L))
    for c in range(CHANNELS):
        X = np.fft.fft(data[c][idx].astype(np.float64), n=nmax, axis=1)
        for i, (n, k, W, m) in enumerate(plans):
            stride = nmax // n
            if k is None:
                y = np.fft.ifft(X[:, ::stride] * W, axis=1)[:, :L]
                power[c, i] = (y.real ** 2 + y.imag ** 2).mean(axis=0)
                continue
            u = np.fft.fft(np.conj(X[:, k * stride]) * np.conj(W), n=2 * m, axis=1)
            acc = (u.real ** 2 + u.imag ** 2).mean(axis=0)
            coef = np.fft.fft(acc) / (2 * m)
            spec = np.zeros(n, complex)
            spec[:m] = coef[:m]
            spec[n - m + 1:] = coef[m + 1:]
            spec[m] += coef[m] / 2
            spec[n - m] += coef[m] / 2
            power[c, i] = np.maximum(np.fft.ifft(spec).real[:L] * n, 0)
    return power


def main():
    rng = np.random.default_rng(7)
    L = int(round((TMAX - TMIN) * FS)) + 1
    gap = 64
    n_samples = EPOCHS * (L + gap) + 1024
    data = rng.standard_normal((CHANNELS, n_samples)).astype(np.float32) * 10.0
    starts = 512 + np.arange(EPOCHS) * (L + gap)
    b0 = int(np.floor((BASELINE[0] - TMIN) * FS + 0.5))
    b1 = int(np.floor((BASELINE[1] - TMIN) * FS + 0.5))
    results = {}
    for name, fn in (("standard", standard), ("band", band)):
        t0 = time.perf_counter()
        c0 = time.process_time()
        power = fn(data, starts, L)
        base = power[:, :, b0 : b1 + 1].mean(axis=2, keepdims=True)
        normalized = 10 * np.log10(power / base)
        wall = time.perf_counter() - t0
        cpu = time.process_time() - c0
        results[name] = power
        work = CHANNELS * EPOCHS * len(FREQS)
        print(f"numpy {np.__version__} {name}: wall {wall:.3f} s, {work / wall:.0f} epoch-frequency maps/s, "
              f"cpu {cpu:.3f} s, check {float(np.nanmean(normalized)):.6f} dB")
    rel = np.abs(results["band"] - results["standard"]).max() / results["standard"].max()
    peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"numpy peak RSS {peak_mb:.0f} MB; band vs standard max difference {rel:.1e} of the peak power")


if __name__ == "__main__":
    main()
