"""Times scipy's fit of one decay for bench/decay.ts: python3 time_scipy_fit.py DECAY.json [REPEATS]

DECAY.json holds counts, irfCounts, channelWidthNs, firstChannel, endChannel, components and start
(τ1..τc, p1..pc as amplitudes a = pΔ/τ, shift, background). The fit is the reference fit of
decay_model.py (least_squares, trf, 3-point Jacobian, Poisson deviance residuals). Prints one JSON line.
"""
import json
import sys
import time

import numpy as np

sys.dont_write_bytecode = True  # keep the repository free of __pycache__
from decay_model import fit_decay


def main():
    with open(sys.argv[1]) as handle:
        spec = json.load(handle)
    repeats = int(sys.argv[2]) if len(sys.argv) > 2 else 5
    counts = np.array(spec['counts'], dtype=float)
    irf = np.array(spec['irfCounts'], dtype=float)
    irf_unit = irf / irf.sum()
    width = spec['channelWidthNs']
    c = spec['components']
    start = np.array(spec['start'], dtype=float)
    lower = np.array([width / 50] * c + [0.0] * c + [-spec['shiftLimitNs'], 0.0])
    upper = np.array([1e6] * c + [np.inf] * c + [spec['shiftLimitNs'], np.inf])
    times = []
    taus = None
    for _ in range(repeats):
        begin = time.perf_counter()
        x, result = fit_decay(counts, irf_unit, width, c, spec['firstChannel'], spec['endChannel'], start, lower, upper)
        times.append((time.perf_counter() - begin) * 1000.0)
        taus = sorted(x[:c].tolist())
    print(json.dumps({'medianMs': float(np.median(times)), 'repeats': repeats, 'tauNs': taus, 'nfev': int(result.nfev)}))


if __name__ == '__main__':
    main()
