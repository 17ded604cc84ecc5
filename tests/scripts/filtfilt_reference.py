#!/usr/bin/env python3
"""Regenerate the scipy reference numbers pasted into tests/reference_zero_phase.rs.

Run: python3 tests/scripts/filtfilt_reference.py
The Rust tests do not need Python; this script only documents where the numbers came from.

Convention under test (src/checks/zero_phase.rs): a zero-phase filter of order N (counted over
both passes) is an N/2-pole Butterworth run forward and backward, the pass designed at f_d with
tan(pi*f_d/fs) = tan(pi*fc/fs) * (sqrt(2) - 1)**(-1/N), so that the combined gain at fc is
1/sqrt(2). The combined gain at fc is printed from scipy.signal.freqz as a check.
"""
import numpy as np
import scipy
from scipy.signal import butter, filtfilt, sosfiltfilt, freqz

print(f"# scipy {scipy.__version__}, numpy {np.__version__}")


def design(order, fc, fs):
    m = order // 2
    t = np.tan(np.pi * fc / fs) * (np.sqrt(2.0) - 1.0) ** (-1.0 / (2 * m))
    fd = fs / np.pi * np.arctan(t)
    b, a = butter(m, fd, btype="low", fs=fs)
    _, h = freqz(b, a, worN=[fc], fs=fs)
    print(f"# order {order}, fc {fc}, fs {fs}: butter({m}, {float(fd)!r}, fs={fs}); "
          f"|H(fc)|^2 = {float(abs(h[0])**2)!r} (1/sqrt 2 = {float(1/np.sqrt(2))!r})")
    return m, fd, b, a


def show(name, y, idx=None):
    if idx is None:
        idx = range(len(y))
    print(f"const {name.upper()}: &[(usize, f64)] = &[" +
          ", ".join(f"({i}, {float(y[i])!r})" for i in idx) + "];")


# A: step, fs = 100 Hz, 4-pole zero-phase, 5 Hz.
m, fd, b, a = design(4, 5.0, 100.0)
x = np.array([1.0] * 5 + [3.0] * 35)
print("# x = [1.0]*5 + [3.0]*35")
for padtype, padlen in [("constant", 30), ("odd", 9), ("even", 20), (None, 0)]:
    y = filtfilt(b, a, x, padtype=padtype, padlen=padlen)
    print(f"# filtfilt(b, a, x, padtype={padtype!r}, padlen={padlen})")
    show(f"step_{padtype}", y)

# B: a half-sine braking pulse that ends with the record, fs = 1000 Hz, 4-pole, 5 Hz.
m, fd, b, a = design(4, 5.0, 1000.0)
t = np.arange(1500) / 1000.0
x = np.where(t >= 1.2, 1.5 * np.sin(np.pi * (t - 1.2) / 0.35), 0.0) + 0.02
print("# t = arange(1500)/1000; x = where(t >= 1.2, 1.5*sin(pi*(t - 1.2)/0.35), 0) + 0.02")
y = filtfilt(b, a, x, padtype="constant", padlen=1400)
ys = sosfiltfilt(butter(m, fd, btype="low", fs=1000.0, output="sos"), x,
                 padtype="constant", padlen=1400)
print(f"# filtfilt(b, a, x, padtype='constant', padlen=1400); "
      f"max |filtfilt - sosfiltfilt| = {np.max(np.abs(y - ys)):.3e}")
show("pulse_constant", y, list(range(0, 1500, 50)) + list(range(1490, 1500)))

# C: 8-pole zero-phase, 10 Hz at fs = 200 Hz, a sum of sines, odd padding of scipy's default
# length for this (b, a): 3 * max(len(a), len(b)) = 15.
m, fd, b, a = design(8, 10.0, 200.0)
t = np.arange(120) / 200.0
x = np.sin(2 * np.pi * 3.0 * t) + 0.5 * np.sin(2 * np.pi * 25.0 * t) + 0.3 * t
print("# t = arange(120)/200; x = sin(2 pi 3 t) + 0.5 sin(2 pi 25 t) + 0.3 t")
y = filtfilt(b, a, x)
print("# filtfilt(b, a, x) (padtype='odd', padlen=15 by default)")
show("sines_odd", y, range(0, 120, 7))
