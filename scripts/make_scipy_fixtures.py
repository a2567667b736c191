"""Reference values from numpy/scipy for psdgate's tests (never used by the product).

Run: python3 scripts/make_scipy_fixtures.py   (writes tests/fixtures/scipy-reference.json)
"""
import json
import numpy as np
import scipy
import scipy.signal as ss
import scipy.stats as st

rng = np.random.default_rng(20261201)
fs = 1000.0
n = 3000
t = np.arange(n) / fs
# Noise + a tone + a slow trend + an offset, so every detrend mode changes the answer.
x = rng.normal(size=n) * 0.7 + 0.4 * np.sin(2 * np.pi * 37.5 * t) + 0.8 * t + 0.25

names = {"hann": "hann", "hamming": "hamming", "blackman-harris": "blackmanharris", "flattop": "flattop", "rectangular": "boxcar"}
cases = []
def case(window, nperseg, overlap, detrend):
    noverlap = int(round(overlap * nperseg))
    f, p = ss.welch(x, fs=fs, window=names[window], nperseg=nperseg, noverlap=noverlap,
                    detrend={"none": False, "mean": "constant", "linear": "linear"}[detrend], scaling="density")
    cases.append({"window": window, "segmentLength": nperseg, "overlap": overlap, "detrend": detrend,
                  "frequencyHz": f.tolist(), "psd": p.tolist()})

for w in names:
    for d in ["none", "mean", "linear"]:
        case(w, 256, 0.5, d)
for ov in [0.0, 0.25, 0.6, 0.75, 0.9]:
    case("hann", 256, ov, "mean")
for seg in [64, 1024, 2048]:
    case("hann", seg, 0.5, "mean")
case("flattop", 512, 0.75, "linear")

windows = {}
for w, sn in names.items():
    win = ss.get_window(sn, 4096, fftbins=True)
    windows[w] = {"coherentGain": float(win.mean()), "enbwBins": float(4096 * np.sum(win**2) / np.sum(win) ** 2)}

chi2 = []
for nu in [2, 10, 19.048, 20, 30, 60, 100, 120, 3.5, 1000]:
    for p in [0.025, 0.05, 0.5, 0.95, 0.975]:
        chi2.append({"dof": nu, "p": p, "quantile": float(st.chi2.ppf(p, nu))})

# Moments of the same signal (Pearson kurtosis, biased skewness, population std).
moments = {"mean": float(x.mean()), "std": float(x.std()), "skewness": float(st.skew(x)), "kurtosis": float(st.kurtosis(x, fisher=False)),
           "min": float(x.min()), "max": float(x.max())}

json.dump({"source": f"scipy {scipy.__version__}, numpy {np.__version__}", "sampleRateHz": fs, "signal": x.tolist(),
           "welch": cases, "windows": windows, "chi2": chi2, "moments": moments},
          open("tests/fixtures/scipy-reference.json", "w"))
print("wrote tests/fixtures/scipy-reference.json", len(cases), "welch cases")

# Far tails for the decision rule's family-wise limits (probabilities down to 1e-9, dof from 0.3 to 1e5):
# chi2.ppf for lower tails, chi2.isf for upper tails given as the small probability itself.
tails = []
for nu in [0.3, 0.5, 0.9, 1, 1.5, 2, 3.7, 5, 10, 19.048, 30, 60, 120, 188.6, 377.2, 1000, 3000, 10000, 1e5]:
    for q in [1e-9, 1e-7, 1e-6, 1e-5, 2.5e-5, 1e-4, 1e-3, 0.01, 0.05, 0.25]:
        tails.append({"dof": nu, "q": q, "lower": float(st.chi2.ppf(q, nu)), "upper": float(st.chi2.isf(q, nu))})
json.dump({"source": f"scipy {scipy.__version__}", "tails": tails}, open("tests/fixtures/scipy-chi2-tails.json", "w"))
print("wrote tests/fixtures/scipy-chi2-tails.json", len(tails), "tail cases")
