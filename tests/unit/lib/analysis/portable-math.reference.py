# Writes portable-math.reference.json: arguments and correctly rounded results of exp, log, log10, pow, sin and
# cos, every double as its 16-hex-digit IEEE 754 bit pattern. Produced once with mpmath 1.3.0 (mp.prec = 200,
# each value then rounded to the nearest double, ties to even, subnormals included), cross-checked at
# mp.prec = 320; the tests only read the JSON and never run Python.
#   python3 tests/unit/lib/analysis/portable-math.reference.py > tests/unit/lib/analysis/portable-math.reference.json
import json
import math
import random
import struct

import mpmath
from mpmath import mp, mpf


def bits(x):
    return '%016x' % struct.unpack('>Q', struct.pack('>d', x))[0]


def to_double(v):
    """The double nearest to the mpf v (round half to even, gradual underflow, overflow to infinity)."""
    if mpmath.isnan(v):
        return math.nan
    if mpmath.isinf(v):
        return math.inf if v > 0 else -math.inf
    if v == 0:
        return 0.0
    sign, man, exp, bc = v._mpf_  # |v| = man·2^exp exactly, man has bc bits
    top = exp + bc - 1  # |v| in [2^top, 2^(top+1))
    q = max(top - 52, -1074)  # quantum of the binade (or of the subnormals)
    shift = q - exp
    if shift <= 0:
        n = man << -shift
    else:
        n, rem = man >> shift, man & ((1 << shift) - 1)
        half = 1 << (shift - 1)
        if rem > half or (rem == half and n & 1):
            n += 1
    if q + n.bit_length() - 1 > 1023:
        return -math.inf if sign else math.inf
    x = math.ldexp(float(n), q)  # n < 2^54, exact
    return -x if sign else x


def reference(f, *args):
    out = []
    for prec in (200, 320):
        mp.prec = prec
        out.append(to_double(f(*[mpf(a) for a in args])))
    mp.prec = 200
    a, b = out
    assert bits(a) == bits(b), (f, args, a, b)
    return a


def is_exact(f, *args):
    mp.prec = 320
    v = f(*[mpf(a) for a in args])
    mp.prec = 200
    return not mpmath.isinf(v) and v == mpf(to_double(v))


rng = random.Random(20240611)


def log_uniform(lo, hi):
    return math.exp(rng.uniform(math.log(lo), math.log(hi)))


def signed(x):
    return x if rng.random() < 0.5 else -x


def unary(name, f, xs):
    return {'function': name, 'cases': [[bits(x), bits(reference(f, x))] for x in xs]}


# exp: tiny to ±709, near the overflow edge and into the subnormal results below −708.4
exp_x = [signed(log_uniform(1e-20, 709)) for _ in range(150)]
exp_x += [rng.uniform(-2, 2) for _ in range(20)]
exp_x += [rng.uniform(709, 709.78) for _ in range(10)] + [709.782712893384]
exp_x += [rng.uniform(-745.1, -708.4) for _ in range(19)]

# log and log10: subnormals to 1e308, and 1 ± small
def log_args():
    xs = [log_uniform(1e-308, 1e308) for _ in range(150)]
    xs += [log_uniform(5e-324, 2.2e-308) for _ in range(15)]
    xs += [1 + signed(log_uniform(1e-15, 0.3)) for _ in range(30)]
    xs += [rng.uniform(0.5, 2) for _ in range(5)]
    return xs

log_x = log_args()
log10_x = log_args() + [0.9999989942367702, 1.000002084277492]  # where the 1993 e_log10.c was 2 bits off

# sin and cos: tiny to 1.6e6 rad, fft/wavelet-like angles 2πk/N, and doubles nearest to k·π/2 (cancellation)
def trig_args():
    xs = [signed(log_uniform(1e-10, 1.6e6)) for _ in range(140)]
    xs += [rng.uniform(-7, 7) for _ in range(20)]
    xs += [2 * math.pi * rng.randrange(1, 4096) / 4096 for _ in range(10)]
    mp.prec = 200
    for k in [1, 2, 3, 4, 5, 7, 10, 100, 1000, 6381, 12345, 100000, 523601, 1000003, 1048575]:
        xs.append(float(k * mp.pi / 2))  # nearest double to kπ/2 (round to nearest)
    xs += [signed(rng.uniform(1.5e6, 1647099.9)) for _ in range(15)]
    return xs

sin_x = trig_args()
cos_x = trig_args()

# pow: (x, y) over magnitudes so that x^y spans subnormal to near-overflow, negative x with integer y, x near 1
# with large y, the fractional exponents of log-spaced grids
pow_xy = []
while len(pow_xy) < 120:
    x = log_uniform(1e-300, 1e300)
    target = rng.uniform(-1070, 1020) * math.log(2)  # ln of the result
    y = target / math.log(x)
    if abs(y) < 1e-300:
        continue
    pow_xy.append((x, y))
pow_xy += [(rng.uniform(0.01, 100), rng.uniform(-3, 3)) for _ in range(30)]
pow_xy += [(-rng.uniform(0.1, 50), float(rng.randrange(-60, 60) or 3)) for _ in range(15)]
for _ in range(15):
    x = 1 + signed(log_uniform(1e-16, 1e-7))
    pow_xy.append((x, signed(log_uniform(1, 700)) / abs(math.log(x))))  # |y| up to 7e18, result in range
pow_xy += [(log_uniform(1.5, 1000), i / n) for n in (4, 7, 39) for i in range(1, n, max(1, n // 6))]
pow_xy += [(log_uniform(5e-324, 2.2e-308), rng.uniform(-1.2, 0.9)) for _ in range(8)]

pow_cases = [[bits(x), bits(y), bits(reference(mpmath.power, x, y))] for x, y in pow_xy]

# pow results that are exactly representable (integer powers of 2 and 10, 16^(k/4), 4^0.5, 3^k, (−3)^k, 1.5^k), and two
# that are not, though their exponent or base stands for an exact one: 8^(2/3 rounded), (√2 rounded)^2
exact_xy = [(2.0, float(k)) for k in (-1074, -1073, -1022, -1000, -100, -3, -1, 3, 10, 52, 53, 100, 1000, 1023)]
exact_xy += [(10.0, float(k)) for k in range(2, 23)]
exact_xy += [(16.0, 0.25), (16.0, 0.5), (16.0, 0.75), (16.0, 1.25), (4.0, 0.5), (4.0, 1.5), (0.25, -1.5),
             (3.0, 20.0), (3.0, 33.0), (-3.0, 5.0), (-3.0, 6.0), (1.5, 10.0), (7.0, 18.0), (0.5, 1074.0),
             (8.0, 2 / 3), (2.0 ** 0.5, 2.0)]
exact_cases = []
for x, y in exact_xy:
    r = reference(mpmath.power, x, y)
    exact_cases.append([bits(x), bits(y), bits(r), is_exact(mpmath.power, x, y)])

document = {
    'source': 'mpmath ' + mpmath.__version__ + ', mp.prec = 200 (checked at 320), rounded to nearest double; '
              'generated by portable-math.reference.py; all numbers are IEEE 754 binary64 bit patterns in hex',
    'exp': unary('exp', mpmath.exp, exp_x),
    'log': unary('log', mpmath.log, log_x),
    'log10': unary('log10', mpmath.log10, log10_x),
    'sin': unary('sin', mpmath.sin, sin_x),
    'cos': unary('cos', mpmath.cos, cos_x),
    'pow': {'function': 'pow', 'cases': pow_cases},
    'powExact': {'function': 'pow', 'note': 'fourth field: the 320-bit value is exactly this double',
                 'cases': exact_cases},
}
# one case a line, so a diff shows which values moved
print(json.dumps(document, separators=(',', ':')).replace('],[', '],\n[').replace('"cases":[[', '"cases":[\n['))
