// Relative quantum yield (Brouwer 2011): a hand-worked example, the GUM budget against finite differences,
// and one standard measured against another on simulated spectra.
import { describe, expect, it } from 'vitest';
import { relativeQuantumYield } from '../../../src/photophysics/relative-yield.js';
import { findStandard } from '../../../src/photophysics/standards.js';
import { integralWithUncertainty } from '../../../src/spectra/metrics.js';
import { axisNm, gaussianBand, makeSpectrum } from '../spectra/synthetic.js';

describe('relativeQuantumYield', () => {
  it('follows Φ = Φr·(F/Fr)·(fr/f)·(n²/nr²), f = 1 − 10^(−A) (Brouwer, Pure Appl. Chem. 83, 2213 (2011)), by hand', () => {
    const result = relativeQuantumYield({
      sampleIntegral: 2.0e6,
      referenceIntegral: 1.5e6,
      sampleAbsorbance: 0.04,
      referenceAbsorbance: 0.05,
      sampleRefractiveIndex: 1.3618,
      referenceRefractiveIndex: 1.339,
      referenceYield: 0.546,
    });
    // By hand: f = 1 − 10^−0.04 = 0.0879889, fr = 1 − 10^−0.05 = 0.1087491;
    // Φ = 0.546 · 1.333333 · (0.1087491/0.0879889) · (1.854499/1.792921) = 0.546 · 1.333333 · 1.235941 · 1.034345 = 0.930661.
    expect(result.quantumYield).toBeCloseTo(0.546 * (2.0 / 1.5) * 1.2359413 * 1.0343451, 5);
    expect(result.quantumYield).toBeCloseTo(0.930661, 4);
  });

  it('combines the budget as √Σ(c·u)² with sensitivities equal to finite differences (JCGM 100:2008 eq. 10)', () => {
    const base = {
      sampleIntegral: 2.0e6,
      referenceIntegral: 1.5e6,
      sampleAbsorbance: 0.04,
      referenceAbsorbance: 0.05,
      sampleRefractiveIndex: 1.3618,
      referenceRefractiveIndex: 1.339,
      referenceYield: 0.546,
    };
    const uncertainties = {
      referenceYield: 0.02,
      sampleIntegral: 2e4,
      referenceIntegral: 1e4,
      sampleAbsorbance: 0.001,
      referenceAbsorbance: 0.001,
      sampleRefractiveIndex: 0.0005,
      referenceRefractiveIndex: 0.002,
      detectorCorrectionRelative: 0.02,
    };
    const result = relativeQuantumYield({ ...base, uncertainties });
    const phi = (over: Partial<typeof base>): number => relativeQuantumYield({ ...base, ...over }).quantumYield;
    for (const line of result.budget) {
      if (line.quantity === 'detectorCorrection') {
        expect(line.sensitivityCoefficient).toBeCloseTo(result.quantumYield, 12);
        continue;
      }
      const key = line.quantity as keyof typeof base;
      const h = base[key] * 1e-6;
      const numeric = (phi({ [key]: base[key] + h }) - phi({ [key]: base[key] - h })) / (2 * h);
      expect(line.sensitivityCoefficient / numeric).toBeCloseTo(1, 6);
    }
    const rss = Math.sqrt(
      result.budget.reduce((s, l) => s + (l.sensitivityCoefficient * l.standardUncertainty) ** 2, 0),
    );
    expect(result.standardUncertainty).toBeCloseTo(rss, 14);
    // The 0.02 on 0.546 (3.7 %) dominates the 2 % detector, 1 % integral and absorbance terms.
    expect(result.dominantContribution).toBe('referenceYield');
  });

  it('reproduces fluorescein (0.1 M NaOH) against quinine sulfate (0.5 M H2SO4) within the stated budget on simulated spectra', () => {
    const quinine = findStandard('quinine-h2so4-0.5m'); // Φ 0.546, Melhuish 1961 (from memory)
    const fluorescein = findStandard('fluorescein-naoh-0.1m'); // Φ 0.925 ± 0.015, Magde 2002 (from memory)
    const absorbanceQuinine = 0.045;
    const absorbanceFluorescein = 0.038;
    // Detected emission ∝ Φ·f/n² (the physics the relative equation inverts; Brouwer 2011).
    const detected = (phi: number, a: number, n: number): number => (1e7 * phi * (1 - 10 ** -a)) / (n * n);
    const quinineAxis = axisNm(380, 620, 1);
    const fluoresceinAxis = axisNm(460, 680, 1);
    const quinineSpectrum = makeSpectrum(
      'emission',
      quinineAxis,
      gaussianBand(quinineAxis, detected(quinine.quantumYield, absorbanceQuinine, quinine.refractiveIndex), 455, 30),
      { noiseSigma: 40, seed: 7 },
    );
    const fluoresceinSpectrum = makeSpectrum(
      'emission',
      fluoresceinAxis,
      gaussianBand(
        fluoresceinAxis,
        detected(fluorescein.quantumYield, absorbanceFluorescein, fluorescein.refractiveIndex),
        520,
        15,
      ),
      { noiseSigma: 40, seed: 8 },
    );
    const sample = integralWithUncertainty(fluoresceinSpectrum);
    const reference = integralWithUncertainty(quinineSpectrum);
    const result = relativeQuantumYield({
      sampleIntegral: sample.integral,
      referenceIntegral: reference.integral,
      sampleAbsorbance: absorbanceFluorescein,
      referenceAbsorbance: absorbanceQuinine,
      sampleRefractiveIndex: fluorescein.refractiveIndex,
      referenceRefractiveIndex: quinine.refractiveIndex,
      referenceYield: quinine.quantumYield,
      uncertainties: {
        referenceYield: quinine.standardUncertainty,
        ...(sample.standardUncertainty === undefined ? {} : { sampleIntegral: sample.standardUncertainty }),
        ...(reference.standardUncertainty === undefined ? {} : { referenceIntegral: reference.standardUncertainty }),
      },
    });
    // Published ratio Φ_fluorescein/Φ_quinine = 0.925/0.546 = 1.694 (both from memory); agreement within 2 u_c.
    expect(Math.abs(result.quantumYield - fluorescein.quantumYield)).toBeLessThan(2 * result.standardUncertainty);
    expect(result.quantumYield / quinine.quantumYield).toBeCloseTo(0.925 / 0.546, 1);
    expect(result.standardUncertainty / result.quantumYield).toBeLessThan(0.06);
  });

  it('warns above A = 0.05 and refuses above 0.1 (Brouwer 2011 / practice)', () => {
    const input = {
      sampleIntegral: 1,
      referenceIntegral: 1,
      referenceAbsorbance: 0.03,
      sampleRefractiveIndex: 1.333,
      referenceRefractiveIndex: 1.333,
      referenceYield: 0.5,
    };
    expect(relativeQuantumYield({ ...input, sampleAbsorbance: 0.07 }).warnings.join(' ')).toMatch(/> 0.05/);
    expect(() => relativeQuantumYield({ ...input, sampleAbsorbance: 0.2 })).toThrow(/above 0.1/);
  });
});
