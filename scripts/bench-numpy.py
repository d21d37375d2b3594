"""Reference timing for `npm run bench`: the same Morlet power + dB baseline workload in numpy, for our own
comparison only (no test depends on Python). Same algorithm as src/lib/analysis/decompose.ts: one forward FFT
per epoch at the largest size, per frequency one inverse FFT at the smallest power of two >= L + half-width,
batched over epochs, power averaged over trials, then dB against the baseline mean.

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


def main():
    rng = np.random.default_rng(7)
    L = int(round((TMAX - TMIN) * FS)) + 1
    gap = 64
    n_samples = EPOCHS * (L + gap) + 1024
    data = rng.standard_normal((CHANNELS, n_samples)).astype(np.float32) * 10.0
    starts = 512 + np.arange(EPOCHS) * (L + gap)

    t0 = time.perf_counter()
    c0 = time.process_time()
    sigmas = CYCLES / (2 * np.pi * FREQS)
    halves = np.ceil(5 * sigmas * FS).astype(int)
    sizes = np.array([next_pow2(L + h) for h in halves])
    nmax = int(sizes.max())
    spectra = []
    for f, s, h, n in zip(FREQS, sigmas, halves, sizes):
        t = np.arange(-h, h + 1) / FS
        g = np.exp(-t * t / (2 * s * s))
        w = (2.0 / g.sum()) * g * np.exp(2j * np.pi * f * t)
        placed = np.zeros(n, complex)
        placed[: h + 1] = w[h:]
        placed[n - h:] = w[:h]
        spectra.append(np.fft.fft(placed))
    b0 = int(np.floor((BASELINE[0] - TMIN) * FS + 0.5))
    b1 = int(np.floor((BASELINE[1] - TMIN) * FS + 0.5))
    idx = starts[:, None] + np.arange(L)[None, :]
    power = np.empty((CHANNELS, len(FREQS), L))
    for c in range(CHANNELS):
        epochs = data[c][idx].astype(np.float64)
        X = np.fft.fft(epochs, n=nmax, axis=1)
        for i, (n, W) in enumerate(zip(sizes, spectra)):
            y = np.fft.ifft(X[:, :: nmax // n] * W, axis=1)[:, :L]
            power[c, i] = (y.real ** 2 + y.imag ** 2).mean(axis=0)
    base = power[:, :, b0 : b1 + 1].mean(axis=2, keepdims=True)
    normalized = 10 * np.log10(power / base)
    wall = time.perf_counter() - t0
    cpu = time.process_time() - c0
    peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    work = CHANNELS * EPOCHS * len(FREQS)
    print(f"numpy {np.__version__}: wall {wall:.3f} s, {work / wall:.0f} epoch-frequency maps/s, "
          f"cpu {cpu:.3f} s, peak RSS {peak_mb:.0f} MB, check {float(np.nanmean(normalized)):.6f} dB")


if __name__ == "__main__":
    main()
