#!/usr/bin/env python3
# Reference EWMA (Roberts 1959; exact limits from Lucas & Saccucci, Technometrics 32, 1, 1990) and
# two-sided tabular CUSUM (Page 1954; Montgomery, Introduction to Statistical Quality Control, 6th ed.,
# sec. 9.1.2) computed with numpy, independently of driftlight. Reads
# {"values": [...], "mean": m, "sd": s, "lambda": l, "L": L, "k": k, "h": h} on stdin (an in-control
# series: no restarts needed) and prints {"ewma": [...], "lower": [...], "upper": [...], "cplus": [...], "cminus": [...]}.
import json
import sys

import numpy as np

spec = json.load(sys.stdin)
x = np.asarray(spec["values"], dtype=float)
mu, sigma, lam, L, k, h = spec["mean"], spec["sd"], spec["lambda"], spec["L"], spec["k"], spec["h"]
z = np.empty_like(x)
previous = mu
for i, value in enumerate(x):
    previous = lam * value + (1 - lam) * previous
    z[i] = previous
i = np.arange(1, len(x) + 1)
half = L * sigma * np.sqrt(lam / (2 - lam) * (1 - (1 - lam) ** (2 * i)))
standardized = (x - mu) / sigma
cplus = np.empty_like(x)
cminus = np.empty_like(x)
up = down = 0.0
for j, value in enumerate(standardized):
    up = max(0.0, value - k + up)
    down = max(0.0, -value - k + down)
    cplus[j], cminus[j] = up, down
json.dump({"ewma": z.tolist(), "lower": (mu - half).tolist(), "upper": (mu + half).tolist(), "cplus": cplus.tolist(), "cminus": cminus.tolist()}, sys.stdout)
