#!/usr/bin/env python3
"""Regenerate the scipy reference numbers pasted into tests/reference_signals.rs.

Run: python3 tests/scripts/butter_reference.py
The Rust tests do not need Python; this script only documents where the numbers came from.
"""
import numpy as np
import scipy
from scipy.signal import butter, lfilter, lfilter_zi

print(f"# scipy {scipy.__version__}, numpy {np.__version__}")

CASES = [
    (4, 5.0, 1000.0),
    (4, 5.0, 200.0),
    (3, 10.0, 500.0),
    (8, 40.0, 100.0),
]
for order, fc, fs in CASES:
    b, a = butter(order, fc, btype="low", fs=fs)
    print(f"# butter({order}, {fc}, btype='low', fs={fs})")
    print("b = [" + ", ".join(repr(float(v)) for v in b) + "]")
    print("a = [" + ", ".join(repr(float(v)) for v in a) + "]")

# Step signal: 5 samples at 1.0, then 35 samples at 3.0, filtered at fs = 100 Hz.
b, a = butter(4, 5.0, btype="low", fs=100.0)
x = np.array([1.0] * 5 + [3.0] * 35)
y, _ = lfilter(b, a, x, zi=lfilter_zi(b, a) * x[0])
print("# b, a = butter(4, 5.0, btype='low', fs=100.0)")
print("# x = [1.0]*5 + [3.0]*35; y, _ = lfilter(b, a, x, zi=lfilter_zi(b, a) * x[0])")
print("y = [" + ", ".join(repr(float(v)) for v in y) + "]")
