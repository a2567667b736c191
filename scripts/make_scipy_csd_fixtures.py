"""Cross-spectral reference values from scipy for psdgate's transfer tests (never used by the product).

Run: python3 scripts/make_scipy_csd_fixtures.py   (writes tests/fixtures/scipy-csd.json)
"""
import json
import numpy as np
import scipy
import scipy.signal as ss

rng = np.random.default_rng(20261202)
fs = 2048.0
n = 6000
t = np.arange(n) / fs
# Input: noise + a tone + a slow trend + an offset (every detrend mode changes the answer).
x = rng.normal(size=n) + 0.5 * np.sin(2 * np.pi * 101.0 * t) + 0.6 * t + 0.3
# Output: x through a resonant two-pole filter, delayed 3 samples, plus independent noise and an offset.
b, a = ss.iirpeak(300.0, 8.0, fs=fs)
y = np.roll(ss.lfilter(b, a, x), 3) * 4.0 + 0.3 * rng.normal(size=n) - 1.1

names = {"hann": "hann", "hamming": "hamming", "blackman-harris": "blackmanharris", "flattop": "flattop", "rectangular": "boxcar"}
detrends = {"none": False, "mean": "constant", "linear": "linear"}
cases = []
def case(window, nperseg, overlap, detrend):
    noverlap = int(round(overlap * nperseg))
    kw = dict(fs=fs, window=names[window], nperseg=nperseg, noverlap=noverlap, detrend=detrends[detrend])
    f, pxy = ss.csd(x, y, scaling="density", **kw)
    _, pxx = ss.welch(x, scaling="density", **kw)
    _, pyy = ss.welch(y, scaling="density", **kw)
    _, cxy = ss.coherence(x, y, **kw)
    cases.append({"window": window, "segmentLength": nperseg, "overlap": overlap, "detrend": detrend,
                  "frequencyHz": f.tolist(), "pxyRe": pxy.real.tolist(), "pxyIm": pxy.imag.tolist(),
                  "pxx": pxx.tolist(), "pyy": pyy.tolist(), "coherence": cxy.tolist()})

for w in names:
    case(w, 256, 0.5, "mean")
for d in detrends:
    case("hann", 512, 0.5, d)
for ov in [0.0, 0.75]:
    case("hann", 256, ov, "linear")
case("flattop", 1024, 0.6, "none")

json.dump({"source": f"scipy {scipy.__version__}, numpy {np.__version__}: signal.csd, signal.welch, signal.coherence",
           "sampleRateHz": fs, "x": x.tolist(), "y": y.tolist(), "cases": cases},
          open("tests/fixtures/scipy-csd.json", "w"))
print("wrote tests/fixtures/scipy-csd.json", len(cases), "cases")
