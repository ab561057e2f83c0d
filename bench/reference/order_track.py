"""Computed order tracking in numpy: the bench's outside reference for the twistlog CLI.

Method (Fyfe & Munck, Mech. Syst. Signal Process. 11(2), 1997), written independently of the
TypeScript code: read the CSV (time s, crank and gearbox speed rpm) with np.loadtxt; crank angle
by trapezoidal integration of crank speed; both speeds linearly interpolated (np.interp) onto a
uniform grid of S = 128 samples per revolution; blocks of R = 8 revolutions, hop 4 (50 %
overlap); a least-squares straight line removed, periodic Hann window, rfft, 0-peak amplitude
2|X|/sum(w) at the firing-order bin q*R (q = 2); blocks binned by mean speed to the nearest
50 rpm, amplitudes power-averaged; isolation = 20 log10(crank / gearbox) dB. No low-pass, no
transient handling: a cross-check, not a copy.

    python3 bench/reference/order_track.py LOG.csv [--json]   (prints rpm and dB per bin)
"""
import json, sys
import numpy as np

S, R, HOP, Q, BIN_RPM = 128, 8, 4, 2, 50
t, crank, gear = np.loadtxt(sys.argv[1], delimiter=",", skiprows=1, usecols=(0, 1, 2), unpack=True)
rev = np.concatenate(([0.0], np.cumsum(0.5 * (crank[1:] + crank[:-1]) * np.diff(t)))) / 60
grid = np.arange(0, rev[-1], 1 / S)  # revolutions
c, g, tg = np.interp(grid, rev, crank), np.interp(grid, rev, gear), np.interp(grid, rev, t)
N = S * R
starts = np.arange(0, len(grid) - N + 1, S * HOP)
idx = starts[:, None] + np.arange(N)[None, :]
w = 0.5 - 0.5 * np.cos(2 * np.pi * np.arange(N) / N)  # periodic Hann
x = np.arange(N) - (N - 1) / 2
def amp(sig):
    b = sig[idx]
    b = b - b.mean(axis=1, keepdims=True) - np.outer((b @ x) / (x @ x), x)
    return 2 * np.abs(np.fft.rfft(b * w, axis=1)[:, Q * R]) / w.sum()
ac, ag = amp(c), amp(g)
rpm = 60 * R * (N - 1) / N / (tg[starts + N - 1] - tg[starts])  # mean speed of each block
bins = np.round(rpm / BIN_RPM) * BIN_RPM
out = []
for b in np.unique(bins):
    m = bins == b
    db = 20 * np.log10(np.sqrt(np.mean(ac[m] ** 2)) / np.sqrt(np.mean(ag[m] ** 2)))
    out.append({"rpm": float(b), "dB": round(float(db), 2), "blocks": int(m.sum())})
if "--json" in sys.argv:
    print(json.dumps(out))
else:
    for p in out:
        print(f"{p['rpm']:7.0f} rpm {p['dB']:7.2f} dB  ({p['blocks']} blocks)")
