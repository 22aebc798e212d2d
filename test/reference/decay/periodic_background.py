"""Issue 17.1, 20 ns at 80 MHz with a free background: python3 test/reference/decay/periodic_background.py

An independent Poisson-ML fit (numpy/scipy, not a port of the engine's recursion) of seeded periodic
decays, written to periodic_background.json with the counts, for test/unit/decay/earlier-pulses.test.ts.
Truth: a Gaussian IRF (centre 1.5 ns, FWHM 0.2 ns) on a 10x fine grid, circularly convolved (FFT) with
exp(-s/tau)/(1 - exp(-T/tau)) (every earlier pulse, geometric series), binned to 500 channels of 25 ps
(window = one 12.5 ns period), 1e5 photons per period, background 2 counts/channel, Poisson-sampled with
numpy's default_rng. Fit: the same circular model from the channel IRF (flat within a channel, linear-
interpolated shift); for fixed (tau, shift) the ML in (amplitude, background) is concave and is solved by
Newton with b >= 0 ('bounded') or b free with the model > 0 ('free'); (tau, shift) by Nelder-Mead from
three starts. About two minutes.
"""
import json
import os

import numpy as np
from scipy.optimize import minimize

HERE = os.path.dirname(os.path.abspath(__file__))
CHANNELS, PERIOD_NS, FINE = 500, 12.5, 10
WIDTH_NS = PERIOD_NS / CHANNELS
DT = WIDTH_NS / FINE
TAU_NS, PHOTONS, BACKGROUND, SEEDS = 20.0, 1e5, 2.0, 50
X = np.arange(CHANNELS * FINE) * DT
S = (np.arange(CHANNELS * FINE) + 0.5) * DT


def periodic(fine_irf, tau):
    kernel = np.exp(-S / tau) / (1 - np.exp(-PERIOD_NS / tau))
    return np.real(np.fft.ifft(np.fft.fft(fine_irf) * np.fft.fft(kernel))).reshape(CHANNELS, FINE).sum(1)


def truth():
    sigma = 0.2 / (2 * np.sqrt(2 * np.log(2)))
    fine = np.exp(-0.5 * ((S - 1.5) / sigma) ** 2)
    irf = fine.reshape(CHANNELS, FINE).sum(1)
    shape = periodic(fine, TAU_NS)
    return irf / irf.sum(), BACKGROUND + PHOTONS * shape / shape.sum()


def shape_of(irf, tau, shift):
    fine = np.interp(X - shift, X, np.repeat(irf, FINE) / FINE, left=0, right=0)
    f = periodic(fine, tau)
    return f / f.sum()


def linear_ml(f, counts, bounded):
    amplitude, background = counts.sum(), 0.0
    for _ in range(100):
        m = background + amplitude * f
        gradient = np.array([np.sum((counts / m - 1) * f), np.sum(counts / m - 1)])
        w = counts / m ** 2
        hessian = -np.array([[np.sum(w * f * f), np.sum(w * f)], [np.sum(w * f), np.sum(w)]])
        step = -np.linalg.solve(hessian, gradient)
        t = 1.0
        while np.any(background + t * step[1] + (amplitude + t * step[0]) * f <= 0):
            t /= 2
        amplitude, background = amplitude + t * step[0], background + t * step[1]
        if bounded and background < 0:
            background, amplitude = 0.0, counts.sum() / f.sum()
        if np.abs(step).max() < 1e-9 * max(amplitude, 1):
            break
    m = background + amplitude * f
    return np.sum(m - counts * np.log(m)), background


def fit(irf, counts, bounded):
    objective = lambda p: linear_ml(shape_of(irf, p[0], p[1]), counts, bounded)[0]
    best = min((minimize(objective, [t0, 0.0], method='Nelder-Mead', options={'xatol': 1e-5, 'fatol': 1e-9, 'maxiter': 600}) for t0 in (14.0, 20.0, 28.0)), key=lambda r: r.fun)
    return {'tauNs': float(best.x[0]), 'backgroundPerChannel': float(linear_ml(shape_of(irf, *best.x), counts, bounded)[1])}


def main():
    irf, expected = truth()
    rng = np.random.default_rng(20261205)
    seeds = []
    for _ in range(SEEDS):
        counts = rng.poisson(expected).astype(float)
        seeds.append({'counts': counts.astype(int).tolist(), 'bounded': fit(irf, counts, True), 'free': fit(irf, counts, False)})
    out = {'tauNs': TAU_NS, 'photons': PHOTONS, 'backgroundPerChannel': BACKGROUND, 'channelWidthNs': WIDTH_NS, 'repetitionRateHz': 1e9 / PERIOD_NS,
           'irf': irf.tolist(), 'seeds': seeds}
    with open(os.path.join(HERE, 'periodic_background.json'), 'w') as handle:
        json.dump(out, handle, separators=(',', ':'))
    for kind in ('bounded', 'free'):
        taus = np.array([s[kind]['tauNs'] for s in seeds])
        print(kind, 'mean tau %.3f ns (%+.1f %%, %+.1f SE of the mean), background at 0 in %d' % (
            taus.mean(), 100 * (taus.mean() / TAU_NS - 1), (taus.mean() - TAU_NS) / (taus.std(ddof=1) / np.sqrt(SEEDS)),
            sum(s[kind]['backgroundPerChannel'] <= 1e-9 for s in seeds)))


if __name__ == '__main__':
    main()
