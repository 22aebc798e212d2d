// The yield budget against a Monte Carlo propagation (JCGM 101:2008, "propagation of distributions"): the first-order
// budget's u_c must match the spread of Φ when every input is drawn from its stated distribution, and the integral's u
// estimated from a spectrum's own noise must match the spread of integrals over repeated noisy scans.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, sampleStandardNormal } from '../../../src/decay/index.js';
import { createSpectrum } from '../../../src/model/spectrum.js';
import { quantumYieldFromSpectra, relativeQuantumYield } from '../../../src/photophysics/index.js';
import { trapezoid } from '../../../src/spectra/integrate.js';

const standardDeviation = (xs: readonly number[]): number => {
  const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
  return Math.sqrt(xs.reduce((s, x) => s + (x - mean) ** 2, 0) / (xs.length - 1));
};

/** Brouwer, Pure Appl. Chem. 83, 2213 (2011), written out independently of the code under test. */
const brouwer = (phiR: number, fx: number, fr: number, ax: number, ar: number, nx: number, nr: number): number =>
  phiR * (fx / fr) * ((1 - 10 ** -ar) / (1 - 10 ** -ax)) * ((nx * nx) / (nr * nr));

describe('relative-yield budget vs Monte Carlo (issue 15 item 2)', () => {
  it('gives u_c within 3 % of the Monte Carlo standard deviation (20 000 draws, seeded)', () => {
    const x = { phiR: 0.546, fx: 2.1e6, fr: 1.6e6, ax: 0.04, ar: 0.05, nx: 1.334, nr: 1.339 };
    const u = { phiR: 0.022, fx: 2.1e4, fr: 2.4e4, ax: 0.001, ar: 0.001, nx: 0.0005, nr: 0.0005 };
    const budget = relativeQuantumYield({
      sampleIntegral: x.fx,
      referenceIntegral: x.fr,
      sampleAbsorbance: x.ax,
      referenceAbsorbance: x.ar,
      sampleRefractiveIndex: x.nx,
      referenceRefractiveIndex: x.nr,
      referenceYield: x.phiR,
      uncertainties: {
        referenceYield: u.phiR,
        sampleIntegral: u.fx,
        referenceIntegral: u.fr,
        sampleAbsorbance: u.ax,
        referenceAbsorbance: u.ar,
        sampleRefractiveIndex: u.nx,
        referenceRefractiveIndex: u.nr,
      },
    });
    const random = createSeededRandom(15);
    const draw = (mean: number, sd: number): number => mean + sd * sampleStandardNormal(random);
    const phis: number[] = [];
    for (let i = 0; i < 20_000; i++) {
      phis.push(
        brouwer(
          draw(x.phiR, u.phiR),
          draw(x.fx, u.fx),
          draw(x.fr, u.fr),
          draw(x.ax, u.ax),
          draw(x.ar, u.ar),
          draw(x.nx, u.nx),
          draw(x.nr, u.nr),
        ),
      );
    }
    expect(budget.quantumYield).toBeCloseTo(brouwer(x.phiR, x.fx, x.fr, x.ax, x.ar, x.nx, x.nr), 12);
    expect(budget.standardUncertainty / standardDeviation(phis)).toBeGreaterThan(0.97);
    expect(budget.standardUncertainty / standardDeviation(phis)).toBeLessThan(1.03);
  });

  it("estimates u(integral) from one scan's noise within 10 % of the spread over 400 repeated scans", () => {
    const axis = Float64Array.from({ length: 301 }, (_u, i) => 450 + i);
    const band = (nm: number, peak: number, centre: number): number =>
      peak * Math.exp(-((nm - centre) ** 2) / (2 * 18 ** 2));
    const random = createSeededRandom(16);
    const sigma = 40; // counts per point, white
    const scan = (peak: number, centre: number): Float64Array =>
      axis.map((nm) => band(nm, peak, centre) + sigma * sampleStandardNormal(random));
    const window = [470, 740] as const;
    const integrals: number[] = [];
    for (let i = 0; i < 400; i++) integrals.push(trapezoid(axis, scan(1e4, 560), window[0], window[1]));
    const emission = (values: Float64Array) =>
      createSpectrum({
        kind: 'emission',
        wavelengthNm: axis,
        values,
        valueUnit: 'counts',
        valueColumn: 'intensity',
        metadata: {},
      });
    const result = quantumYieldFromSpectra({
      sampleEmission: emission(scan(1e4, 560)),
      referenceEmission: emission(scan(2e4, 570)),
      windowNm: window,
      sampleAbsorbance: 0.04,
      referenceAbsorbance: 0.05,
      sampleRefractiveIndex: 1.3618,
      referenceRefractiveIndex: 1.3618,
      referenceYield: 0.95,
    });
    const line = result.budget.find((l) => l.quantity === 'sampleIntegral');
    expect(line?.basis).toMatch(/^estimated from noise/);
    const ratio = (line?.standardUncertainty ?? 0) / standardDeviation(integrals);
    expect(ratio).toBeGreaterThan(0.9);
    expect(ratio).toBeLessThan(1.1);
  });
});
