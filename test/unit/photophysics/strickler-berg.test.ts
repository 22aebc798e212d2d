// Strickler–Berg radiative rate against closed-form band integrals (Strickler & Berg, J. Chem. Phys. 37, 814 (1962)).
import { describe, expect, it } from 'vitest';
import { stricklerBergRate } from '../../../src/photophysics/strickler-berg.js';
import { axisNm, makeSpectrum } from '../spectra/synthetic.js';

describe('stricklerBergRate', () => {
  // Absorption: ε Gaussian in ln ν̃ → ∫ε d ln ν̃ = ε_max·s·√(2π) exactly (Gaussian integral).
  const epsilonMaxPerMPerCm = 50000;
  const centrePerCm = 25000;
  const lnWidth = 0.04;
  const absorptionAxis = axisNm(290, 550, 0.05);
  const epsilon = absorptionAxis.map(
    (l) => epsilonMaxPerMPerCm * Math.exp(-((Math.log(1e7 / l) - Math.log(centrePerCm)) ** 2) / (2 * lnWidth ** 2)),
  );
  // Emission per unit wavenumber F(ν̃) = ν̃³·G(ν̃; μ, σ) → ⟨ν̃⁻³⟩⁻¹ = ∫F/∫ν̃⁻³F = μ³ + 3μσ² (Gaussian moments);
  // on the nm axis F(λ) = F(ν̃)·1e7/λ² (Jacobian, Mooney & Kambhampati 2013).
  const muPerCm = 20000;
  const sigmaPerCm = 800;
  const emissionAxis = axisNm(395, 670, 0.05);
  const emission = emissionAxis.map((l) => {
    const nu = 1e7 / l;
    return nu ** 3 * Math.exp(-((nu - muPerCm) ** 2) / (2 * sigmaPerCm ** 2)) * (1e7 / (l * l));
  });
  const absorptivity = makeSpectrum('absorbance', absorptionAxis, epsilon, { valueUnit: 'M-1 cm-1' });
  const emissionSpectrum = makeSpectrum('emission', emissionAxis, emission);

  it('matches 2.880e-9·n²·⟨ν̃⁻³⟩⁻¹·∫ε d ln ν̃ computed in closed form', () => {
    const n = 1.3618; // ethanol, REFERENCES.md (confirmed)
    const result = stricklerBergRate({ absorptivity, emission: emissionSpectrum, refractiveIndex: n });
    const integral = epsilonMaxPerMPerCm * lnWidth * Math.sqrt(2 * Math.PI);
    const meanInverseCube = muPerCm ** 3 + 3 * muPerCm * sigmaPerCm ** 2;
    expect(result.integratedAbsorptivityPerMPerCm / integral).toBeCloseTo(1, 5);
    expect(result.meanInverseCubeWavenumberPerCm3 / meanInverseCube).toBeCloseTo(1, 5);
    const expectedKr = 2.88e-9 * n * n * meanInverseCube * integral;
    expect(result.krPerS / expectedKr).toBeCloseTo(1, 5);
    expect(result.tau0Ns).toBeCloseTo(1e9 / expectedKr, 3);
    expect(result.warnings).toEqual([]);
  });

  it('reports measured/predicted k_r and warns when they disagree by more than 2×', () => {
    const predicted = stricklerBergRate({ absorptivity, emission: emissionSpectrum, refractiveIndex: 1.333 }).krPerS;
    const close = stricklerBergRate({
      absorptivity,
      emission: emissionSpectrum,
      refractiveIndex: 1.333,
      measuredKrPerS: 0.9 * predicted,
    });
    expect(close.measuredToPredictedRatio).toBeCloseTo(0.9, 10);
    const far = stricklerBergRate({
      absorptivity,
      emission: emissionSpectrum,
      refractiveIndex: 1.333,
      measuredKrPerS: 0.2 * predicted,
    });
    expect(far.warnings.join(' ')).toMatch(/measured\/predicted/);
  });
});
