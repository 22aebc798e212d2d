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

`--exact` (a few seconds) adds 'exact' to the JSON: one seed (index 0) fitted over the whole window with b free
(model > 0 only) by a model that is exact for a channel-flat IRF (the engine's irfWithinChannel: 'flat'), so
that the engine must agree with it to the optimiser's precision, not only on average. Kernel: the triangle-
weighted integral (1/D) * int_{-D}^{D} (D - |v|) h(dD + v) dv of the periodic decay h(s) = exp(-(s mod T)/tau)
/ (1 - exp(-T/tau)) for each channel lag d, by 8-point Gauss-Legendre on each half (h is smooth there, so
the rule is exact to rounding); the IRF shifted by linear interpolation between channels (zero outside);
circular convolution by direct summation. (tau, shift) by Nelder-Mead from several starts, then the spread
of the converged tau over the starts is reported as the precision. Afterwards: npx prettier --write on the JSON.
"""
import sys
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


GL_NODES, GL_WEIGHTS = np.polynomial.legendre.leggauss(8)


def exact_kernel(tau):
    """K[d] for lags d = 0..N-1: the mean over the IRF channel of the periodic decay integrated over channel k = j + d."""
    period_decay = lambda s: np.exp(-np.mod(s, PERIOD_NS) / tau) / (1 - np.exp(-PERIOD_NS / tau))
    lags = np.arange(CHANNELS)[:, None] * WIDTH_NS
    kernel = np.zeros(CHANNELS)
    for low, high in ((-WIDTH_NS, 0.0), (0.0, WIDTH_NS)):
        v = 0.5 * (high - low) * GL_NODES + 0.5 * (high + low)
        # (0, D) side: s in (dD, (d+1)D); (-D, 0) side: s in ((d-1)D, dD), wrapping into the period for d = 0.
        s = lags + v[None, :]
        kernel += 0.5 * (high - low) * np.sum(GL_WEIGHTS[None, :] * (WIDTH_NS - np.abs(v))[None, :] * period_decay(s + (s < 0) * PERIOD_NS), axis=1)
    return kernel / WIDTH_NS


def shifted_irf(irf, shift):
    """The channel IRF moved later by `shift` ns, linear interpolation between channel values, zero outside."""
    channels = shift / WIDTH_NS
    whole = int(np.floor(channels))
    fraction = channels - whole
    out = np.zeros(CHANNELS)
    for k in range(CHANNELS):
        at, before = k - whole, k - whole - 1
        out[k] = (1 - fraction) * (irf[at] if 0 <= at < CHANNELS else 0.0) + fraction * (irf[before] if 0 <= before < CHANNELS else 0.0)
    return out


def exact_shape(irf, tau, shift):
    g = shifted_irf(irf, shift)
    kernel = exact_kernel(tau)
    index = (np.arange(CHANNELS)[:, None] - np.arange(CHANNELS)[None, :]) % CHANNELS
    return (kernel[index] @ g) / WIDTH_NS


def exact(path):
    with open(path) as handle:
        data = json.load(handle)
    irf = np.array(data['irf'])
    counts = np.array(data['seeds'][0]['counts'], dtype=float)
    objective = lambda p: linear_ml(exact_shape(irf, p[0], p[1]), counts, False)[0]
    runs = [minimize(objective, [t0, s0], method='Nelder-Mead', options={'xatol': 1e-7, 'fatol': 1e-11, 'maxiter': 4000}) for t0 in (14.0, 20.0, 28.0) for s0 in (-0.01, 0.01)]
    best = min(runs, key=lambda r: r.fun)
    close = [r for r in runs if r.fun < best.fun + 1e-6]
    tau, shift = best.x
    shape = exact_shape(irf, tau, shift)
    background = linear_ml(shape, counts, False)[1]
    data['exact'] = {'seedIndex': 0, 'tauNs': float(tau), 'shiftNs': float(shift), 'backgroundPerChannel': float(background),
                     'tauPrecisionNs': float(max(abs(r.x[0] - tau) for r in close)), 'starts': len(runs), 'startsAtBest': len(close)}
    with open(path, 'w') as handle:
        json.dump(data, handle, separators=(',', ':'))
    print('exact, seed 0: tau %.5f ns (spread over %d starts %.1e ns), shift %.5f ns, background %.4f counts/channel' % (
        tau, len(close), data['exact']['tauPrecisionNs'], shift, background))


if __name__ == '__main__':
    if '--exact' in sys.argv:
        exact(os.path.join(HERE, 'periodic_background.json'))
    else:
        main()
