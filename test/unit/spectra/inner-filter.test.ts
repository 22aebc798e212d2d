// Inner-filter correction on synthetic samples whose observed signal is simulated independently: Beer–Lambert
// attenuation integrated numerically (midpoint rule) over the viewed zone of a 1 cm right-angle cell.
import { describe, expect, it } from 'vitest';
import { AnalysisFailed } from '../../../src/model/errors.js';
import { correctInnerFilter } from '../../../src/spectra/inner-filter.js';
import { integrateIntensity } from '../../../src/spectra/metrics.js';
import { axisNm, gaussianBand, makeSpectrum } from './synthetic.js';

const excitationNm = 350;
const zoneCm: [number, number] = [0.4, 0.6];
const absorptionShape = (wavelengthNm: number): number => Math.exp(-((wavelengthNm - 350) ** 2) / (2 * 25 ** 2));
const absorbanceAxis = axisNm(300, 560, 1);
const emissionAxis = axisNm(380, 520, 1);
const emissionShape = gaussianBand(emissionAxis, 1, 430, 20);

/** Mean of 10^(−a·x) over x1..x2 by the midpoint rule with 2000 slices (Beer–Lambert along one path). */
function meanTransmission(absorbancePerCm: number, [x1, x2]: [number, number]): number {
  const slices = 2000;
  const h = (x2 - x1) / slices;
  let sum = 0;
  for (let i = 0; i < slices; i++) sum += Math.pow(10, -absorbancePerCm * (x1 + (i + 0.5) * h));
  return sum / slices;
}

/** Observed spectrum of a sample whose absorbance at 350 nm (1 cm) is peakAbsorbance: light absorbed per unit length
 * ∝ a_ex·10^(−a_ex·x), emission attenuated by 10^(−a_em·y), averaged over the viewed zone (x, y in cm). */
function simulate(peakAbsorbance: number): {
  emission: ReturnType<typeof makeSpectrum>;
  absorbance: ReturnType<typeof makeSpectrum>;
} {
  const aEx = peakAbsorbance * absorptionShape(excitationNm);
  const excitationPart = aEx * meanTransmission(aEx, zoneCm);
  const observed = emissionAxis.map(
    (l, i) =>
      1e6 *
      (emissionShape[i] as number) *
      excitationPart *
      meanTransmission(peakAbsorbance * absorptionShape(l), zoneCm),
  );
  return {
    emission: makeSpectrum('emission', emissionAxis, observed, { metadata: { excitationNm } }),
    absorbance: makeSpectrum(
      'absorbance',
      absorbanceAxis,
      absorbanceAxis.map((l) => peakAbsorbance * absorptionShape(l)),
      { metadata: { pathLengthCm: 1 } },
    ),
  };
}

const peakAbsorbances = [0.01, 0.05, 0.1, 0.3, 0.6, 1.0, 1.5];
const samples = peakAbsorbances.map((a) => ({ a, ...simulate(a) }));
const perAbsorbance = (values: number[]): number[] => values.map((v, i) => v / (peakAbsorbances[i] as number));

describe('correctInnerFilter', () => {
  it('makes the integrated intensity linear in concentration up to A_ex = 1.5 (geometric form, Parker & Rees 1962)', () => {
    const corrected = samples.map((s) =>
      integrateIntensity(
        correctInnerFilter(s.emission, s.absorbance, {
          method: 'geometric',
          excitationZoneCm: zoneCm,
          emissionZoneCm: zoneCm,
        }).spectrum,
      ),
    );
    const uncorrected = samples.map((s) => integrateIntensity(s.emission));
    const correctedSlopes = perAbsorbance(corrected);
    const uncorrectedSlopes = perAbsorbance(uncorrected);
    const first = correctedSlopes[0] as number;
    for (const slope of correctedSlopes) expect(Math.abs(slope / first - 1)).toBeLessThan(1e-3);
    // Uncorrected: the signal per unit absorbance falls by far more than 30 % at A = 1.5.
    expect((uncorrectedSlopes[uncorrectedSlopes.length - 1] as number) / (uncorrectedSlopes[0] as number)).toBeLessThan(
      0.3,
    );
  });

  it('centred form 10^((A_ex + A_em)/2) (Lakowicz ch. 2) agrees with the thin central zone to 2 % up to A = 1', () => {
    const corrected = samples
      .filter((s) => s.a <= 1)
      .map((s) => integrateIntensity(correctInnerFilter(s.emission, s.absorbance).spectrum));
    const slopes = perAbsorbance(corrected);
    for (const slope of slopes) expect(Math.abs(slope / (slopes[0] as number) - 1)).toBeLessThan(0.02);
  });

  it('records its parameters and warns above A_ex = 0.05', () => {
    const moderate = simulate(0.3);
    const { record } = correctInnerFilter(moderate.emission, moderate.absorbance);
    expect(record.name).toBe('correctInnerFilter');
    expect(record.parameters['absorbanceAtExcitation']).toBeCloseTo(0.3, 10);
    expect(record.inputs['absorbance']).toMatch(/^[0-9a-f]{64}$/);
    expect(record.warnings.join(' ')).toMatch(/> 0.05/);
  });

  it('refuses beyond the validity limit (A > 1.5) with OUT_OF_RANGE', () => {
    const heavy = simulate(1.6);
    let caught: unknown;
    try {
      correctInnerFilter(heavy.emission, heavy.absorbance);
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(AnalysisFailed);
    expect((caught as AnalysisFailed).code).toBe('OUT_OF_RANGE');
  });
});
