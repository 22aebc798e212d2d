"""Regenerates the scipy reference for the decay engine: python3 test/reference/decay/make_reference.py

Simulates seeded Poisson decays (numpy default_rng) with the model of decay_model.py, fits each with
scipy.optimize.least_squares on Poisson deviance residuals, and writes
  decays.json     the simulated histograms (counts, IRF, channel width, fit range, truth) read by the TS tests
  reference.json  scipy's fitted parameters, deviance and status per case
"""
import json
import sys
import os

import numpy as np

sys.dont_write_bytecode = True  # keep the repository free of __pycache__
from decay_model import expected_counts, fit_decay, gaussian_irf, poisson_deviance

HERE = os.path.dirname(os.path.abspath(__file__))

CASES = [
    # name, channels, window ns, taus, intensity fractions, photons, background, shift ns, irf fwhm ns, period ns, irf mode
    ('mono-fluorescein-like', 1024, 50.0, [4.1], [1.0], 1e5, 2.0, 0.0, 0.2, None, 'second-order'),
    ('bi-0.8-4.0', 4096, 50.0, [0.8, 4.0], [0.3, 0.7], 1e5, 1.0, 0.02, 0.2, None, 'second-order'),
    ('mono-shifted-1.74', 512, 25.0, [1.74], [1.0], 2e4, 0.5, 0.035, 0.2, None, 'second-order'),
    ('mono-periodic-12ns', 1024, 12.5, [12.0], [1.0], 5e4, 1.0, 0.0, 0.1, 12.5, 'second-order'),
    ('bi-low-counts', 256, 20.0, [0.5, 2.5], [0.4, 0.6], 5e3, 0.2, 0.0, 0.15, None, 'second-order'),
    ('mono-shifted-flat', 512, 25.0, [1.74], [1.0], 2e4, 0.5, 0.035, 0.2, None, 'flat'),
    ('mono-coarse-0.3', 200, 10.0, [0.3], [1.0], 5e4, 0.5, 0.021, 0.15, None, 'second-order'),
]


def intensity_amplitudes(taus, fractions, photons, irf_unit, width_ns, period_ns, irf_mode):
    amps = []
    for tau, fraction in zip(taus, fractions):
        unit = expected_counts(np.array([tau, 1.0, 0.0, 0.0]), irf_unit, width_ns, 1, period_ns, irf_mode)
        amps.append(fraction * photons / unit.sum())
    return amps


def main():
    rng = np.random.default_rng(20261201)
    decays = []
    references = []
    for name, channels, window_ns, taus, fractions, photons, background, shift_ns, fwhm_ns, period_ns, irf_mode in CASES:
        width_ns = window_ns / channels
        irf_mean = gaussian_irf(channels, width_ns, 0.1 * window_ns, fwhm_ns) * 2e5
        irf_counts = rng.poisson(irf_mean).astype(float)
        irf_unit = irf_counts / irf_counts.sum()
        c = len(taus)
        amps = intensity_amplitudes(taus, fractions, photons, irf_unit, width_ns, period_ns, irf_mode)
        truth = np.array(taus + amps + [shift_ns, background])
        counts = rng.poisson(expected_counts(truth, irf_unit, width_ns, c, period_ns, irf_mode)).astype(float)
        rise = int(np.argmax(irf_unit >= 0.01 * irf_unit.max()))
        first = max(0, rise - max(5, int(np.ceil(fwhm_ns / width_ns))))
        end = channels
        start = np.array([t * f for t, f in zip(taus, [0.7, 1.3, 1.1, 0.9][:c])] + [a * 0.8 for a in amps] + [0.0, max(background, 0.1)])
        shift_limit = max(10 * width_ns, 2 * fwhm_ns)
        lower = np.array([width_ns / 50] * c + [0.0] * c + [-shift_limit, 0.0])
        upper = np.array([1000 * window_ns] * c + [np.inf] * c + [shift_limit, np.inf])
        x, result = fit_decay(counts, irf_unit, width_ns, c, first, end, start, lower, upper, period_ns, irf_mode)
        model = expected_counts(x, irf_unit, width_ns, c, period_ns, irf_mode)[first:end]
        decays.append({
            'name': name,
            'channelWidthNs': width_ns,
            'counts': counts.tolist(),
            'irfCounts': irf_counts.tolist(),
            'rangeNs': [first * width_ns, (end - 1) * width_ns],
            'components': c,
            'periodNs': period_ns,
            'irfWithinChannel': irf_mode,
            'truth': {'tauNs': taus, 'amplitudes': amps, 'shiftNs': shift_ns, 'backgroundPerChannel': background},
        })
        references.append({
            'name': name,
            'tauNs': x[:c].tolist(),
            'amplitudes': x[c:2 * c].tolist(),
            'shiftNs': float(x[2 * c]),
            'backgroundPerChannel': float(x[2 * c + 1]),
            'deviance': poisson_deviance(counts[first:end], model),
            'success': bool(result.success),
            'status': int(result.status),
            'message': str(result.message),
            'nfev': int(result.nfev),
        })
        print(name, x[:c], result.message)
    with open(os.path.join(HERE, 'decays.json'), 'w') as handle:
        json.dump({'generator': 'test/reference/decay/make_reference.py', 'seed': 20261201, 'decays': decays}, handle)
    with open(os.path.join(HERE, 'reference.json'), 'w') as handle:
        json.dump({'generator': 'scipy.optimize.least_squares (trf, 3-point Jacobian) on Poisson deviance residuals',
                   'cases': references}, handle, indent=1)


if __name__ == '__main__':
    main()
