"""Recomputes the numbers a lab signs from a driftlight result JSON and the input files it names.

python3 test/reference/signoff/recompute_result.py RESULT.json ARCHIVE_DIR CURVE_DIR  -> JSON on stdout

Reads ONLY the result (its provenance: file names, parts and sha256; the corrections it lists; its
window, excitation, refractive indices, standard and fit) and the named files, found under ARCHIVE_DIR
(inputs) or CURVE_DIR (the detector curve named by the config). Everything is written here from the
published forms, with numpy/scipy, without driftlight's code:
  - sha256 (FIPS 180-4) of every named file;
  - files: the CSV header/column layout and JCAMP-DX 5.01 AFFN (X++(Y..Y)) parsed by hand;
  - blank: sample − blank (blank linearly interpolated; Lakowicz, Principles of Fluorescence
    Spectroscopy, 3rd ed., ch. 2, practice); detector curve: × correction factor (linear interpolation;
    ASTM E3029 practice); inner filter, centred right-angle form F·10^((A_ex + A_em(λ))/2) (Lakowicz
    3rd ed., ch. 2, from memory; form confirmed in a secondary text: shared/REFERENCES.md);
  - integral: trapezoid rule over the window with the edges linearly interpolated (docs/spectra.md);
  - A(λex): linear interpolation of the absorbance file (docs/spectra.md, "no correction extrapolates");
  - Φ = Φr·(F/Fr)·(fr/f)·(n²/nr²) (Brouwer, Pure Appl. Chem. 83, 2213 (2011), confirmed), with
    f = 1 − 10^(−A) and, as the dilute centred-model form for inner-filter-corrected spectra, f = A;
  - decay: own reconvolution (channel-integrated exponential convolved by np.convolve with a flat-in-channel
    IRF, shifted by Keys cubic interpolation (IEEE Trans. ASSP 29, 1153 (1981)) and corrected by
    −Δ²/12·g'' as docs/decay.md "Coarse channels" states), fitted by Poisson maximum likelihood
    (deviance residuals, scipy.optimize.least_squares; Laurence & Chromy, Nat. Methods 7, 338 (2010));
    reduced Pearson chi-squared Σ(n − m)²/m / (N − p).
"""
import hashlib
import json
import math
import os
import sys

import numpy as np
from scipy.optimize import least_squares


def sha256_of(path):
    with open(path, 'rb') as handle:
        return hashlib.sha256(handle.read()).hexdigest()


def find_file(name, roots):
    for root in roots:
        for folder, _dirs, files in os.walk(root):
            if name in files:
                return os.path.join(folder, name)
    raise FileNotFoundError(name)


def read_columns(path):
    """A delimited export: '# key: value' header lines, a column-name line, then numeric rows."""
    header = {}
    names = None
    rows = []
    with open(path, encoding='utf-8') as handle:
        for line in handle:
            line = line.rstrip('\r\n')
            if line.startswith('#'):
                key, _sep, value = line[1:].partition(':')
                header[key.strip().lower()] = value.strip()
            elif names is None:
                names = [name.strip() for name in line.split(',')]
            elif line.strip():
                rows.append([float(cell) for cell in line.split(',')])
    return header, names, np.array(rows, dtype=float)


def read_jcamp_affn(path):
    """JCAMP-DX 5.01 ##XYDATA=(X++(Y..Y)) in AFFN: x of each line's first y, equal steps (FIRSTX..LASTX)."""
    labels = {}
    ys = []
    in_data = False
    with open(path, encoding='utf-8') as handle:
        for line in handle:
            line = line.strip()
            if line.startswith('##'):
                key, _sep, value = line[2:].partition('=')
                labels[key.strip().upper()] = value.strip()
                in_data = key.strip().upper() == 'XYDATA'
                continue
            if in_data and line:
                ys.extend(float(token) for token in line.split()[1:])
    first, last, count = float(labels['FIRSTX']), float(labels['LASTX']), int(labels['NPOINTS'])
    x = np.linspace(first, last, count) * float(labels.get('XFACTOR', '1'))
    y = np.array(ys, dtype=float) * float(labels.get('YFACTOR', '1'))
    assert y.size == count, f'{path}: {y.size} ordinates, NPOINTS {count}'
    return labels, x, y


def read_spectrum(path):
    """(wavelength nm, values, header) of a spectrum file, CSV or JCAMP-DX."""
    if path.endswith('.jdx'):
        labels, x, y = read_jcamp_affn(path)
        return x, y, {k.lstrip('$').lower(): v for k, v in labels.items()}
    header, names, table = read_columns(path)
    assert names[0].startswith('wavelength'), f'{path}: first column {names[0]}'
    return table[:, 0], table[:, 1], {**header, 'value column': names[1]}


def interp_within(x_from, y_from, x_to):
    assert x_to.min() >= x_from.min() and x_to.max() <= x_from.max(), 'would extrapolate'
    return np.interp(x_to, x_from, y_from)


def integrate_window(x, y, low, high):
    """Trapezoid rule over [low, high], window edges linearly interpolated."""
    inside = (x > low) & (x < high)
    xs = np.concatenate([[low], x[inside], [high]])
    ys = np.concatenate([[np.interp(low, x, y)], y[inside], [np.interp(high, x, y)]])
    return float(np.sum((xs[1:] - xs[:-1]) * (ys[1:] + ys[:-1]) / 2.0))


def corrected_emission(result, target, files):
    """Applies, in the result's order, the corrections it lists for `target` to the named raw files."""
    part = 'emission' if target == 'emission' else 'reference-emission'
    x, y, _header = read_spectrum(files[part])
    steps = []
    for correction in result['corrections']:
        if correction['target'] != target:
            continue
        name = correction['name']
        parameters = correction.get('parameters', {})
        if name == 'subtractBlank':
            bx, by, _ = read_spectrum(files['blank'])
            y = y - float(parameters.get('blankScale', 1)) * interp_within(bx, by, x)
        elif name == 'applyDetectorCorrection':
            cx, cy, cheader = read_spectrum(files['detector-curve'])
            meaning = parameters.get('curveMeaning')
            assert 'correction' in cheader.get('value column', ''), 'the curve says it holds correction factors'
            assert meaning == 'multiply', f'curve meaning {meaning}'
            y = y * interp_within(cx, cy, x)
        elif name == 'correctInnerFilter':
            assert parameters.get('method') == 'centred', parameters.get('method')
            ax, ay, _ = read_spectrum(files['absorbance' if target == 'emission' else 'reference-absorbance'])
            to_cell = float(parameters.get('cellPathCm', 1)) / float(parameters.get('absorbancePathLengthCm', 1))
            a_ex = float(np.interp(float(parameters['excitationNm']), ax, ay)) * to_cell
            a_em = interp_within(ax, ay, x) * to_cell
            y = y * 10.0 ** ((a_ex + a_em) / 2.0)
        else:
            raise ValueError(f'unknown correction {name}')
        steps.append(name)
    return x, y, steps


def corrected_emission_full_chain(target, files, excitation_nm):
    """The chain docs/pipeline.md states for both spectra (blank, detector, centred inner filter), whatever the result lists."""
    part = 'emission' if target == 'emission' else 'reference-emission'
    x, y, _ = read_spectrum(files[part])
    bx, by, _ = read_spectrum(files['blank'])
    y = y - interp_within(bx, by, x)
    cx, cy, _ = read_spectrum(files['detector-curve'])
    y = y * interp_within(cx, cy, x)
    ax, ay, _ = read_spectrum(files['absorbance' if target == 'emission' else 'reference-absorbance'])
    y = y * 10.0 ** ((float(np.interp(excitation_nm, ax, ay)) + interp_within(ax, ay, x)) / 2.0)
    return x, y


# ---------------------------------------------------------------- decay

def keys_shift(values, shift_channels):
    """values moved later by shift_channels (may be fractional): Keys cubic convolution, a = −1/2."""
    n = values.size
    positions = np.arange(-1, n + 1) - shift_channels
    base = np.floor(positions).astype(int)
    t = positions - base

    def at(index):
        inside = (index >= 0) & (index < n)
        return np.where(inside, values[np.clip(index, 0, n - 1)], 0.0)

    def kernel(d):
        d = np.abs(d)
        return np.where(d <= 1, 1.5 * d ** 3 - 2.5 * d ** 2 + 1,
                        np.where(d < 2, -0.5 * d ** 3 + 2.5 * d ** 2 - 4 * d + 2, 0.0))

    total = np.zeros_like(positions, dtype=float)
    for offset in (-1, 0, 1, 2):
        total += at(base + offset) * kernel(t - offset)
    return total  # channels −1 … n


def model_counts(tau_ns, amplitude, shift_ns, background, irf_unit, width_ns):
    """b + a/Δ²·Σ_j g[j]·D[k−j]: the exponential integrated over the IRF channel and the detection channel."""
    extended = keys_shift(irf_unit, shift_ns / width_ns)
    g = extended[1:-1] - (extended[2:] - 2 * extended[1:-1] + extended[:-2]) / 12.0
    g = np.maximum(g, 0.0)
    n = g.size
    x = math.exp(-width_ns / tau_ns)
    kernel = np.empty(n)
    kernel[0] = tau_ns * width_ns - tau_ns ** 2 * (1 - x)
    kernel[1:] = tau_ns ** 2 * (1 - x) ** 2 * x ** np.arange(n - 1)
    return background + amplitude / width_ns ** 2 * np.convolve(g, kernel)[:n]


def deviance_residuals(counts, model):
    m = np.maximum(model, 1e-12)
    with np.errstate(divide='ignore', invalid='ignore'):
        unit = np.where(counts > 0, 2 * (m - counts + counts * np.log(counts / m)), 2 * m)
    return np.sign(counts - m) * np.sqrt(np.maximum(unit, 0.0))


def fit_range(irf, width_ns, channels):
    """docs/decay.md: from max(5 channels, 1 FWHM) before the IRF rise (≥ 1 % of its peak) to the last channel (ml)."""
    peak = irf.max()
    rise = int(np.argmax(irf >= 0.01 * peak))
    above = np.where(irf >= peak / 2)[0]
    fwhm_channels = above[-1] - above[0] + 1
    first = max(0, rise - max(5, int(math.ceil(fwhm_channels))))
    return first, channels


def refit_decay(path):
    header, names, table = read_columns(path)
    assert names[:3] == ['time (ns)', 'counts', 'irf'], names
    width_ns = float(header['channel width (ns)'])
    counts, irf = table[:, 1], table[:, 2]
    irf_unit = irf / irf.sum()
    first, end = fit_range(irf, width_ns, counts.size)
    data = counts[first:end]
    tail = counts[-20:].mean()
    tau0 = 3.0
    start = np.array([tau0, (counts.sum() - tail * counts.size) * width_ns / tau0, 0.0, max(tail, 0.1)])

    def residuals(p):
        return deviance_residuals(data, model_counts(p[0], p[1], p[2], p[3], irf_unit, width_ns)[first:end])

    fit = least_squares(residuals, start, bounds=([0.01, 0, -1.0, 0], [100, np.inf, 1.0, np.inf]),
                        method='trf', x_scale='jac', ftol=1e-12, xtol=1e-12, gtol=1e-12, max_nfev=5000)
    tau, amplitude, shift, background = fit.x
    model = model_counts(tau, amplitude, shift, background, irf_unit, width_ns)[first:end]
    dof = data.size - 4
    return {
        'tauNs': float(tau),
        'amplitude': float(amplitude),
        'shiftNs': float(shift),
        'backgroundPerChannel': float(background),
        'chi2Reduced': float(np.sum((data - model) ** 2 / model) / dof),
        'rangeChannels': [int(first), int(end)],
        'success': bool(fit.success),
    }


def chi2_from_parameters(path, parameters):
    """Pearson χ²/dof of the result's own parameters over its own range, by this file's model."""
    header, _names, table = read_columns(path)
    width_ns = float(header['channel width (ns)'])
    counts, irf = table[:, 1], table[:, 2]
    first = int(round(parameters['rangeNs'][0] / width_ns))
    end = int(round(parameters['rangeNs'][1] / width_ns)) + 1  # rangeNs names the last fitted channel
    model = model_counts(parameters['tauNs'], parameters['amplitude'], parameters['shiftNs'],
                         parameters['backgroundPerChannel'], irf / irf.sum(), width_ns)[first:end]
    data = counts[first:end]
    return float(np.sum((data - model) ** 2 / model) / parameters['degreesOfFreedom'])


def main():
    result_path, archive_dir, curve_dir = sys.argv[1:4]
    with open(result_path, encoding='utf-8') as handle:
        result = json.load(handle)
    files = {}
    hashes = []
    for entry in result['provenance']['inputs']:
        path = find_file(entry['file'], [curve_dir] if entry.get('origin') == 'config' else [archive_dir])
        files[entry['part']] = path
        hashes.append({'file': entry['file'], 'part': entry['part'], 'stated': entry['sha256'],
                       'recomputed': sha256_of(path)})
    out = {'hashes': hashes}
    excitation_nm = float(result['excitationNm'])
    if 'quantumYield' in result:
        low, high = result['quantumYield']['inputs']['windowNm']
        sx, sy, sample_steps = corrected_emission(result, 'emission', files)
        rx, ry, reference_steps = corrected_emission(result, 'reference-emission', files)
        ax, ay, _ = read_spectrum(files['absorbance'])
        rax, ray, _ = read_spectrum(files['reference-absorbance'])
        fx, fy = corrected_emission_full_chain('emission', files, excitation_nm)
        gx, gy = corrected_emission_full_chain('reference-emission', files, excitation_nm)
        # docs/photophysics.md: the window is the common range, from 15 nm above λex to 15 nm below 2·λex.
        default_window = [max(sx[0], rx[0], excitation_nm + 15), min(sx[-1], rx[-1], 2 * excitation_nm - 15)]
        out['yield'] = {
            'sampleSteps': sample_steps,
            'referenceSteps': reference_steps,
            'defaultWindowNm': [float(v) for v in default_window],
            'sampleIntegral': integrate_window(sx, sy, low, high),
            'referenceIntegral': integrate_window(rx, ry, low, high),
            'sampleIntegralFullChain': integrate_window(fx, fy, low, high),
            'referenceIntegralFullChain': integrate_window(gx, gy, low, high),
            'sampleAbsorbance': float(np.interp(excitation_nm, ax, ay)),
            'referenceAbsorbance': float(np.interp(excitation_nm, rax, ray)),
            'sampleAbsorbanceNearestPoint': float(ay[np.argmin(np.abs(ax - excitation_nm))]),
        }
    if 'decay' in files and 'decayFit' in result:
        out['decay'] = refit_decay(files['decay'])
        fit = result['decayFit']
        if all(key in fit for key in ('shiftNs', 'backgroundPerChannel', 'rangeNs', 'degreesOfFreedom')):
            component = fit['components'][0]
            out['decay']['chi2FromResultParameters'] = chi2_from_parameters(files['decay'], {
                'tauNs': component['tauNs'], 'amplitude': component['amplitude'], 'shiftNs': fit['shiftNs'],
                'backgroundPerChannel': fit['backgroundPerChannel'], 'rangeNs': fit['rangeNs'],
                'degreesOfFreedom': fit['degreesOfFreedom']})
    json.dump(out, sys.stdout, indent=1)


if __name__ == '__main__':
    sys.dont_write_bytecode = True
    main()
