"""Reference values from scipy for the ISO 2631 weighting filters (never used by the product).

Run: python3 scripts/make_weighting_fixture.py   (writes tests/fixtures/scipy-weighting.json)

For each weighting and rate: every analog section of ISO 2631-1 Annex A turned digital by
scipy.signal.bilinear with the section pre-warped at its pole frequency (fs' = c/2, c = wp/tan(wp/(2 fs))),
the digital magnitude by scipy.signal.sosfreqz at the nominal one-third-octave centres, and the output
of scipy.signal.sosfilt (initial state sosfilt_zi * x[0]) for a fixed test signal.

Then the design psdgate uses ("fitted", src/weight/fittedBiquads.ts), written again here with numpy: the
high-pass bilinear as above; every other section with poles by impulse invariance (z = exp(s T)) and the
numerator's squared-magnitude coefficients B0, B1, B2 by numpy.linalg.lstsq on |H|^2 / |H_analog|^2 = 1 at
200 log-spaced frequencies from 0.1 Hz to the upper edge of the highest one-third-octave band below Nyquist.
The reference for its error is independent of both implementations: scipy.signal.freqs on the analog
sections against scipy.signal.sosfreqz on the digital ones, at the covered nominal centres.
"""
import json
from math import cos, cosh, exp, pi, sin, sqrt, tan
import numpy as np
import scipy
import scipy.signal as ss

P = {"Wk": (0.4, 100, 12.5, 12.5, 0.63, 2.37, 0.91, 3.35, 0.91, 1.0),
     "Wd": (0.4, 100, 2.0, 2.0, 0.63, None, None, None, None, 1.0),
     "Wc": (0.4, 100, 8.0, 8.0, 0.63, None, None, None, None, 1.0),
     "We": (0.4, 100, 1.0, 1.0, 0.63, None, None, None, None, 1.0),
     "Wj": (0.4, 100, None, None, None, 3.75, 0.91, 5.32, 0.91, 1.0),
     "Wb": (0.4, 100, 16.0, 16.0, 0.55, 2.5, 0.9, 4.0, 0.95, 1.024)}
CENTRES = [0.5, 0.63, 0.8, 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8, 10, 12.5, 16, 20, 25, 31.5, 40, 50, 63, 80]


def sections(name):
    f1, f2, f3, f4, q4, f5, q5, f6, q6, k = P[name]
    w1, w2, q = 2 * pi * f1, 2 * pi * f2, 1 / sqrt(2)
    out = [([1, 0, 0], [1, w1 / q, w1 ** 2], f1), ([0, 0, w2 ** 2], [1, w2 / q, w2 ** 2], f2)]
    if f3:
        w3, w4 = 2 * pi * f3, 2 * pi * f4
        out.append(([0, 1 / w3, 1], [1 / w4 ** 2, 1 / (w4 * q4), 1], f4))
    if f5:
        w5, w6 = 2 * pi * f5, 2 * pi * f6
        g = (w5 / w6) ** 2
        out.append(([g / w5 ** 2, g / (w5 * q5), g], [1 / w6 ** 2, 1 / (w6 * q6), 1], f6))
    return out, k


fs_list = [512.0, 1000.0, 5120.0]
n = 1000
rng = np.random.default_rng(20261202)
signal = 9.80665 + rng.normal(size=n) + 0.5 * np.sin(2 * pi * 4 * np.arange(n) / 1000.0)
cases = []
for name in P:
    for fs in fs_list:
        secs, k = sections(name)
        sos = []
        for b, a, fp in secs:
            c = 2 * pi * fp / tan(pi * fp / fs)
            bz, az = ss.bilinear(b, a, fs=c / 2)
            sos.append(np.concatenate([bz, az]))
        sos = np.array(sos)
        _, h = ss.sosfreqz(sos, worN=np.array(CENTRES), fs=fs)
        zi = ss.sosfilt_zi(sos) * signal[0]
        y, _ = ss.sosfilt(sos, signal, zi=zi)
        cases.append({"weighting": name, "sampleRateHz": fs, "sos": sos.tolist(),
                      "magnitude": (k * np.abs(h)).tolist(), "output": (k * y).tolist() if fs == 1000.0 else None})


def analog_sq(b, a, f):
    _, h = ss.freqs(b, a, worN=[2 * pi * f])
    return abs(h[0]) ** 2


def fitted(b, a, fs, top):
    T = 1 / fs
    w0 = sqrt(a[2] / a[0])
    zeta = a[1] / (2 * sqrt(a[2] * a[0]))
    r = exp(-zeta * w0 * T)
    a1 = -2 * r * (cos(w0 * T * sqrt(1 - zeta ** 2)) if zeta < 1 else cosh(w0 * T * sqrt(zeta ** 2 - 1)))
    a2 = r * r
    A0, A1, A2 = (1 + a1 + a2) ** 2, (1 - a1 + a2) ** 2, -4 * a2
    fr = np.geomspace(0.1, min(top, 0.999 * fs / 2), 200)
    p1 = np.sin(pi * fr / fs) ** 2
    p0 = 1 - p1
    p2 = 4 * p0 * p1
    t = np.array([analog_sq(b, a, f) for f in fr])
    M = np.stack([p0, p1, p2], 1) / ((A0 * p0 + A1 * p1 + A2 * p2) * t)[:, None]
    (B0, B1, B2), *_ = np.linalg.lstsq(M, np.ones_like(fr), rcond=None)
    s0, s1 = sqrt(B0), sqrt(B1)
    W = (s0 + s1) / 2
    b0 = (W + sqrt(W * W + B2)) / 2
    return [b0, (s0 - s1) / 2, -B2 / (4 * b0), 1.0, a1, a2]


fitted_cases = []
ride_rates = [100.0, 128.0, 200.0, 256.0, 400.0, 512.0, 1000.0, 5120.0]
for name in P:
    for fs in ride_rates:
        secs, k = sections(name)
        cs = [c for c in CENTRES if c * 2 ** (1 / 6) < fs / 2]
        sos = []
        for b, a, fp in secs:
            if b == [1, 0, 0]:
                c = 2 * pi * fp / tan(pi * fp / fs)
                bz, az = ss.bilinear(b, a, fs=c / 2)
                sos.append(list(np.concatenate([bz, az])))
            else:
                sos.append(fitted(b, a, fs, cs[-1] * 2 ** (1 / 6)))
        sos = np.array(sos)
        _, h = ss.sosfreqz(sos, worN=np.array(cs), fs=fs)
        ana = np.array([k * np.prod([sqrt(analog_sq(b, a, c)) for b, a, _ in secs]) for c in cs])
        err = np.abs(k * np.abs(h) / ana - 1) * 100
        out = None
        if fs == 200.0 and name in ("Wk", "Wd"):
            t = np.arange(3000) / fs
            x = -1.0 + 1.8 * np.clip((t - 8) / 4, 0, 1) + rng.normal(size=t.size) * 0.3
            y, _ = ss.sosfilt(sos, x, zi=ss.sosfilt_zi(sos) * -1.0)
            out = {"input": x.tolist(), "startLevel": -1.0, "output": (k * y).tolist()}
        fitted_cases.append({"weighting": name, "sampleRateHz": fs, "centresHz": cs, "sos": sos.tolist(),
                             "errorPct": err.tolist(), "maxErrorPct": float(err.max()), "filtered": out})

with open("tests/fixtures/scipy-weighting.json", "w") as f:
    json.dump({"source": f"scipy {scipy.__version__} signal.bilinear / freqs / sosfreqz / sosfilt, numpy {np.__version__} linalg.lstsq",
               "centresHz": CENTRES, "signal": signal.tolist(), "cases": cases, "fitted": fitted_cases}, f)
