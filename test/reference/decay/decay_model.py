"""Reference implementation (numpy/scipy) of driftlight's decay model and Poisson-deviance fit.

Written independently of the TypeScript code from the same equations (docs/decay.md):
  channel k covers [kΔ, (k+1)Δ); IRF g (unit sum) shifted later by s: irf_mode 'flat' = linear
  interpolation; 'second-order' (the default) = Catmull-Rom cubic interpolation of the channel values at
  k - s/Δ (Keys 1981, a = -1/2), then g[k] - (g[k+1] - 2g[k] + g[k-1])/12, negatives set to 0;
  expected[k] = b + Σ a_i · (g_s[k]·K0_i + c_i·S_i[k]) / Δ  (+ earlier pulses when a period T is given)
  K0 = τ − (τ²/Δ)(1 − x), c = (τ²/Δ)(1 − x)², x = exp(−Δ/τ), S[k+1] = x·S[k] + g_s[k] (scipy.signal.lfilter)
  earlier pulses: c·S[n]·x^(T/Δ − n + k) / (1 − exp(−T/τ)) added per component.
The fit minimises the Poisson deviance 2Σ[m − n + n ln(n/m)] as the sum of squared deviance residuals
with scipy.optimize.least_squares (trust-region reflective, bounds).
"""
import numpy as np
from scipy.optimize import least_squares
from scipy.signal import lfilter
from scipy.stats import norm

MODEL_FLOOR = 1e-10


def gaussian_irf(channels, width_ns, centre_ns, fwhm_ns):
    sigma = fwhm_ns / (2.0 * np.sqrt(2.0 * np.log(2.0)))
    edges = np.arange(channels + 1) * width_ns
    return np.diff(norm.cdf((edges - centre_ns) / sigma))


def shift_irf(irf_unit, shift_ns, width_ns):
    shift_channels = shift_ns / width_ns
    whole = int(np.floor(shift_channels))
    frac = shift_channels - whole
    n = irf_unit.size
    padded = np.concatenate([np.zeros(n + 2), irf_unit, np.zeros(n + 2)])
    idx = np.arange(n) - whole + n + 2
    return (1.0 - frac) * padded[idx] + frac * padded[idx - 1]


def shift_irf_second_order(irf_unit, shift_ns, width_ns):
    n = irf_unit.size
    padded = np.concatenate([np.zeros(n + 4), irf_unit, np.zeros(n + 4)])
    # positions k - 1 .. n (one extra channel each side for the second difference)
    positions = np.arange(-1, n + 1) - shift_ns / width_ns
    base = np.floor(positions).astype(int)
    t = positions - base
    p = [padded[base + n + 4 + offset] for offset in (-1, 0, 1, 2)]
    values = 0.5 * (2 * p[1] + (p[2] - p[0]) * t + (2 * p[0] - 5 * p[1] + 4 * p[2] - p[3]) * t ** 2
                    + (-p[0] + 3 * p[1] - 3 * p[2] + p[3]) * t ** 3)
    corrected = values[1:-1] - (values[2:] - 2 * values[1:-1] + values[:-2]) / 12.0
    return np.maximum(corrected, 0.0)


def expected_counts(params, irf_unit, width_ns, components, period_ns=None, irf_mode='second-order'):
    taus = params[:components]
    amps = params[components:2 * components]
    shift_ns, background = params[2 * components], params[2 * components + 1]
    if irf_mode == 'flat':
        g = shift_irf(irf_unit, shift_ns, width_ns)
    else:
        g = shift_irf_second_order(irf_unit, shift_ns, width_ns)
    n = g.size
    model = np.full(n, background, dtype=float)
    for tau, amp in zip(taus, amps):
        u = width_ns / tau
        x = np.exp(-u)
        q = -np.expm1(-u)
        k0 = tau - tau * tau * q / width_ns
        c = tau * tau * q * q / width_ns
        s_before = lfilter([0.0, 1.0], [1.0, -x], g)  # S[k] = Σ_{j<k} g[j] x^(k-1-j)
        response = g * k0 + c * s_before
        if period_ns is not None:
            s_total = x * s_before[-1] + g[-1]
            offset = period_ns / width_ns - n
            k = np.arange(n)
            response = response + c * s_total * np.exp(-(offset + k) * u) / (1.0 - np.exp(-period_ns / tau))
        model += amp * response / width_ns
    return model


def deviance_residuals(counts, model):
    m = np.maximum(model, MODEL_FLOOR)
    with np.errstate(divide='ignore', invalid='ignore'):
        unit = np.where(counts > 0, 2.0 * (m - counts + counts * np.log(counts / m)), 2.0 * m)
    return np.sign(counts - m) * np.sqrt(np.maximum(unit, 0.0))


def poisson_deviance(counts, model):
    return float(np.sum(deviance_residuals(counts, model) ** 2))


def fit_decay(counts, irf_unit, width_ns, components, first, end, start, lower, upper, period_ns=None, irf_mode='second-order'):
    """least_squares on deviance residuals over channels [first, end); returns (x, result)."""
    data = counts[first:end]

    def residuals(p):
        return deviance_residuals(data, expected_counts(p, irf_unit, width_ns, components, period_ns, irf_mode)[first:end])

    result = least_squares(residuals, start, bounds=(lower, upper), method='trf', jac='3-point',
                           x_scale='jac', ftol=1e-12, xtol=1e-12, gtol=1e-12, max_nfev=2000)
    return result.x, result
