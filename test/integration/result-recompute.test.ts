// The result a lab signs, recomputed from its own inputs. An invented day (test/integration/result-recompute-day.ts:
// a reference standard, a sample, the daily control, a solvent blank and the detector correction curve) goes
// through the real `driftlight process`; then, for the sample's and the control's result JSON, an independent
// numpy/scipy implementation (test/reference/signoff/recompute_result.py) reads ONLY that JSON and the files it
// names (provenance: archived inputs with their sha256, the paired blank and reference, the config's curve) and
// recomputes every number a signature covers. No driftlight function computes any expected value here.
//
// Tolerances: the files are the same bytes on both sides and every step is double-precision arithmetic, so
// recomputed spectra quantities agree to rounding (observed ≤ 5e−9 relative: summation order, and a product of
// interpolated factors formed in another order); we allow 1e−6 relative. Formulas that only rearrange the
// result's own numbers (Φ from its inputs, rate constants) are held to 1e−12. The decay is re-fitted by an
// independent reconvolution of the model docs/decay.md states (written differently: np.convolve with the
// channel-integrated kernel, its own Keys resampling; see the script) and Poisson maximum likelihood: two fits of
// one model to the same counts differ only where their optimisers stop (issue 17's audit: < 0.001 SE; observed
// 2e−4 SE), so τ must agree within 0.01 of the result's own SE and the refit's χ²_red within 1e−3 (its sampling
// spread √(2/dof) ≈ 0.06 is irrelevant: same counts). The χ²_red of the result's own parameters by our model must
// equal the stated one within 1e−4 (observed 1e−6): a model or range differing from the one documented would not.
import { spawnSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { runDriftlight } from '../helpers/cli.js';
import { tempDir } from '../helpers/temp-dir.js';
import { DAY_EXCITATION_NM, generateRecomputeDay, RECOMPUTE_CONFIG } from './result-recompute-day.js';
import { readResults } from './pipeline-helpers.js';

const SCRIPT = fileURLToPath(new URL('../reference/signoff/recompute_result.py', import.meta.url));

/** shared/REFERENCES.md, "Quantum-yield standards": rhodamine 6G in ethanol, Φ = 0.95 (Kubin & Fletcher, J. Lumin. 27, 455 (1982); from memory there). */
const R6G_ETHANOL_YIELD = 0.95;
/** shared/REFERENCES.md, "Refractive indices": ethanol, 20 °C, sodium D line, 1.3618 (confirmed). */
const ETHANOL_N = 1.3618;
/** The correction chain docs/pipeline.md states for both emission spectra, in order. */
const CHAIN = ['subtractBlank', 'applyDetectorCorrection', 'correctInnerFilter'];

interface SignedResult {
  setId: string;
  role: string;
  sampleId: string;
  excitationNm: number;
  spectra: { emission: { integratedIntensity: number; rangeNm: [number, number] } };
  corrections: { name: string; target: string }[];
  quantumYield: {
    value: number;
    standardUncertainty: number;
    standardId: string;
    inputs: {
      sampleIntegral: number;
      referenceIntegral: number;
      sampleAbsorbance: number;
      referenceAbsorbance: number;
      sampleRefractiveIndex: number;
      referenceRefractiveIndex: number;
      referenceYield: number;
      lightAbsorbed: 'absorbance' | 'absorptance';
      windowNm: [number, number];
      sampleCorrections: string[];
      referenceCorrections: string[];
    };
  };
  decayFit: {
    components: { tauNs: number; tauNsStdErr: number; amplitude: number }[];
    tauMeanIntensityNs: number;
    tauMeanAmplitudeNs: number;
    chi2Reduced: number;
    degreesOfFreedom: number;
    rangeNs: [number, number];
    acceptable: boolean;
  };
  rates: {
    krPerS: number;
    knrPerS: number;
    tau0Ns: number;
    totalDecayRatePerS: number;
    quantumYield: number;
    tauNs: number;
    tauBasis: string;
  };
  qc: { flags: { rule: string; severity: string; quantity?: string; value?: number }[] };
  provenance: { inputs: { file: string; part: string; sha256: string; origin: string }[] };
}

interface Recomputed {
  hashes: { file: string; part: string; stated: string; recomputed: string }[];
  yield: {
    sampleSteps: string[];
    referenceSteps: string[];
    defaultWindowNm: [number, number];
    sampleIntegral: number;
    referenceIntegral: number;
    sampleIntegralFullChain: number;
    referenceIntegralFullChain: number;
    sampleAbsorbance: number;
    referenceAbsorbance: number;
    sampleAbsorbanceNearestPoint: number;
  };
  decay: {
    tauNs: number;
    amplitude: number;
    shiftNs: number;
    backgroundPerChannel: number;
    chi2Reduced: number;
    success: boolean;
    chi2FromResultParameters?: number;
  };
}

const relative = (a: number, b: number): number => Math.abs(a / b - 1);

let workspace = '';
let truth: ReturnType<typeof generateRecomputeDay>['truth'] = {};
const signed = new Map<string, { path: string; result: SignedResult; recomputed: Recomputed }>();

beforeAll(() => {
  workspace = tempDir('dl-recompute-');
  const day = generateRecomputeDay();
  truth = day.truth;
  mkdirSync(join(workspace, 'inbox'));
  for (const file of day.files) writeFileSync(join(workspace, 'inbox', file.name), file.content);
  writeFileSync(join(workspace, 'detector-curve.csv'), day.detectorCurve);
  writeFileSync(join(workspace, 'driftlight.yaml'), RECOMPUTE_CONFIG);
  const run = runDriftlight(['process', join(workspace, 'inbox'), '--config', join(workspace, 'driftlight.yaml')], {
    timeoutMs: 120_000,
  });
  expect(run.status, run.stderr).toBe(0);
  for (const { path, result } of readResults(workspace)) {
    const typed = result as unknown as SignedResult;
    if (typed.role !== 'sample' && typed.role !== 'control') continue;
    const script = spawnSync(
      'python3',
      [SCRIPT, join(workspace, 'results', path), join(workspace, 'archive'), workspace],
      { encoding: 'utf8', timeout: 120_000 },
    );
    expect(script.status, script.stderr).toBe(0);
    const recomputed = JSON.parse(script.stdout) as Recomputed;
    signed.set(typed.role, { path, result: typed, recomputed });
    const q = typed.quantumYield.inputs;
    const [component] = typed.decayFit.components;
    console.log(
      `recompute ${typed.role}: integrals Δ ${relative(recomputed.yield.sampleIntegral, q.sampleIntegral).toExponential(1)} / ` +
        `${relative(recomputed.yield.referenceIntegral, q.referenceIntegral).toExponential(1)} rel, ` +
        `A Δ ${Math.abs(recomputed.yield.sampleAbsorbance - q.sampleAbsorbance).toExponential(1)}, ` +
        `Φ ${typed.quantumYield.value.toFixed(4)} (truth ${truth[typed.sampleId]?.quantumYield ?? '?'}), ` +
        `τ Δ ${((recomputed.decay.tauNs - (component?.tauNs ?? NaN)) / (component?.tauNsStdErr ?? NaN)).toExponential(1)} SE, ` +
        `χ²red ${typed.decayFit.chi2Reduced.toFixed(6)} vs refit ${recomputed.decay.chi2Reduced.toFixed(6)}, ` +
        `from its parameters ${recomputed.decay.chi2FromResultParameters?.toFixed(6) ?? 'n/a'}`,
    );
  }
}, 300_000);

describe.each(['sample', 'control'])('the %s result, recomputed from the inputs it names', (role) => {
  const get = (): { result: SignedResult; recomputed: Recomputed } => {
    const entry = signed.get(role);
    if (entry === undefined) throw new Error(`no ${role} result`);
    return entry;
  };

  it('names every input with the sha256 of the archived file (FIPS 180-4), blank, reference and curve included', () => {
    const { result, recomputed } = get();
    expect(result.provenance.inputs.map((input) => input.part).sort()).toEqual(
      [
        'absorbance',
        'blank',
        'decay',
        'detector-curve',
        'emission',
        'reference-absorbance',
        'reference-emission',
      ].sort(),
    );
    for (const hash of recomputed.hashes) expect(hash.recomputed, hash.file).toBe(hash.stated);
    // The detector curve named is the config's file itself.
    const curve = result.provenance.inputs.find((input) => input.part === 'detector-curve');
    expect(curve?.file).toBe('detector-curve.csv');
  });

  it('corrects sample and reference alike, in the documented order, and lists exactly that', () => {
    const { result, recomputed } = get();
    // Brouwer 2011: sample and standard measured and corrected the same way; order from docs/pipeline.md.
    expect(recomputed.yield.sampleSteps).toEqual(CHAIN);
    expect(recomputed.yield.referenceSteps).toEqual(CHAIN);
    expect(result.quantumYield.inputs.sampleCorrections).toEqual(CHAIN);
    expect(result.quantumYield.inputs.referenceCorrections).toEqual(CHAIN);
  });

  it('integrates the corrected emission of sample and reference as stated (trapezoid, window per docs)', () => {
    const { result, recomputed } = get();
    const inputs = result.quantumYield.inputs;
    // docs/photophysics.md: the common range, 15 nm above λex to 15 nm below 2·λex.
    expect(inputs.windowNm).toEqual(recomputed.yield.defaultWindowNm);
    expect(relative(recomputed.yield.sampleIntegral, inputs.sampleIntegral)).toBeLessThan(1e-6);
    expect(relative(recomputed.yield.referenceIntegral, inputs.referenceIntegral)).toBeLessThan(1e-6);
    // The chain the docs state, applied to the named raw files whatever the result lists, gives the same.
    expect(relative(recomputed.yield.sampleIntegralFullChain, inputs.sampleIntegral)).toBeLessThan(1e-6);
    expect(relative(recomputed.yield.referenceIntegralFullChain, inputs.referenceIntegral)).toBeLessThan(1e-6);
  });

  it('reads A(λex) from the named absorbance files by linear interpolation', () => {
    const { result, recomputed } = get();
    expect(result.excitationNm).toBe(DAY_EXCITATION_NM);
    // The files hold A to 6 decimals at half-nanometre offsets from λex: interpolation, not the nearest point.
    expect(Math.abs(result.quantumYield.inputs.sampleAbsorbance - recomputed.yield.sampleAbsorbance)).toBeLessThan(
      1e-9,
    );
    expect(
      Math.abs(result.quantumYield.inputs.referenceAbsorbance - recomputed.yield.referenceAbsorbance),
    ).toBeLessThan(1e-9);
    expect(recomputed.yield.sampleAbsorbance).not.toBe(recomputed.yield.sampleAbsorbanceNearestPoint);
  });

  it('gives Φ = Φr·(F/Fr)·(fr/f)·(n²/nr²) with the standard, indices and absorbed fraction it names', () => {
    const { result, recomputed } = get();
    const q = result.quantumYield;
    expect(q.standardId).toBe('rhodamine-6g-ethanol');
    expect(q.inputs.referenceYield).toBe(R6G_ETHANOL_YIELD);
    expect(q.inputs.sampleRefractiveIndex).toBe(ETHANOL_N);
    expect(q.inputs.referenceRefractiveIndex).toBe(ETHANOL_N);
    // docs/photophysics.md: both spectra corrected for the inner filter (centred model), so f = A; the result says so.
    expect(q.inputs.lightAbsorbed).toBe('absorbance');
    const f = (a: number): number => a;
    // Brouwer, Pure Appl. Chem. 83, 2213 (2011), confirmed; from the recomputed integrals and absorbances.
    const phi =
      R6G_ETHANOL_YIELD *
      (recomputed.yield.sampleIntegral / recomputed.yield.referenceIntegral) *
      (f(recomputed.yield.referenceAbsorbance) / f(recomputed.yield.sampleAbsorbance)) *
      (ETHANOL_N ** 2 / ETHANOL_N ** 2);
    expect(relative(phi, q.value)).toBeLessThan(2e-6);
    // And the generator's truth lies within the stated k = 2 expanded uncertainty.
    expect(Math.abs(q.value - (truth[result.sampleId]?.quantumYield ?? NaN))).toBeLessThan(2 * q.standardUncertainty);
  });

  it('re-fits the decay by an independent reconvolution: τ within 0.01 SE, χ²_red as stated', () => {
    const { result, recomputed } = get();
    const [component] = result.decayFit.components;
    if (component === undefined) throw new Error('no component');
    expect(recomputed.decay.success).toBe(true);
    expect(Math.abs(recomputed.decay.tauNs - component.tauNs)).toBeLessThan(0.01 * component.tauNsStdErr);
    expect(Math.abs(recomputed.decay.chi2Reduced - result.decayFit.chi2Reduced)).toBeLessThan(1e-3);
    // χ² of the result's own parameters (τ, amplitude, shift, background over its range and dof) by our model.
    expect(Math.abs((recomputed.decay.chi2FromResultParameters ?? NaN) - result.decayFit.chi2Reduced)).toBeLessThan(
      1e-4,
    );
    // Truth of the generator within 3 SE.
    expect(Math.abs(component.tauNs - (truth[result.sampleId]?.tauNs ?? NaN))).toBeLessThan(3 * component.tauNsStdErr);
    // Means of one component are its τ (Σaτ²/Σaτ and Σaτ/Σa).
    expect(result.decayFit.tauMeanIntensityNs).toBe(component.tauNs);
    expect(result.decayFit.tauMeanAmplitudeNs).toBe(component.tauNs);
  });

  it('gives k_r = Φ/τ, k_nr = (1 − Φ)/τ, τ0 = τ/Φ with the Φ and the τ it names (Birks 1976; Lakowicz ch. 2)', () => {
    const { result } = get();
    const r = result.rates;
    expect(result.decayFit.acceptable).toBe(true);
    // docs/pipeline.md: the intensity-weighted mean τ; the result says which and which Φ.
    expect(r.tauBasis).toBe('intensity-weighted mean');
    expect(r.tauNs).toBe(result.decayFit.tauMeanIntensityNs);
    expect(r.quantumYield).toBe(Math.min(result.quantumYield.value, 1));
    const tauS = r.tauNs * 1e-9;
    expect(relative(r.krPerS, r.quantumYield / tauS)).toBeLessThan(1e-12);
    expect(relative(r.knrPerS, (1 - r.quantumYield) / tauS)).toBeLessThan(1e-12);
    expect(relative(r.tau0Ns, r.tauNs / r.quantumYield)).toBeLessThan(1e-12);
    expect(relative(r.tau0Ns * 1e-9, 1 / r.krPerS)).toBeLessThan(1e-12);
    expect(relative(r.totalDecayRatePerS, r.krPerS + r.knrPerS)).toBeLessThan(1e-12);
  });
});

describe('the control verdict', () => {
  it("flags the control's yield and lifetime exactly when they lie 2 SD or more from its declared targets", () => {
    const entry = signed.get('control');
    if (entry === undefined) throw new Error('no control result');
    const { result } = entry;
    // Config: targetYield 0.8, sdYield 0.03, targetTauNs 4.1, sdTauNs 0.1. On a first run the only checks that can
    // fire are 1-2s / 1-3s (Westgard et al., Clin. Chem. 27, 493 (1981), confirmed), the first EWMA point (its
    // limit is then Lσ·λ/λ = 3σ: Roberts 1959) and CUSUM at (k + h)σ ≥ 4.5σ (Page 1954): all at 2 SD or beyond.
    const checks = [
      { quantity: 'controlQuantumYield', value: result.quantumYield.value, target: 0.8, sd: 0.03 },
      { quantity: 'meanLifetimeNs', value: result.decayFit.tauMeanIntensityNs, target: 4.1, sd: 0.1 },
    ];
    for (const check of checks) {
      const flags = result.qc.flags.filter((flag) => flag.quantity === check.quantity);
      const sdUnits = Math.abs(check.value - check.target) / check.sd;
      expect(flags.length > 0, `${check.quantity} at ${sdUnits.toFixed(2)} SD`).toBe(sdUnits >= 2);
      for (const flag of flags) expect(flag.value).toBe(check.value);
    }
    for (const flag of result.qc.flags) expect(flag.severity).not.toBe('critical');
  });
});
