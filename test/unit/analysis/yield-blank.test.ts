// The blank is subtracted from the reference standard's emission as from the sample's (found by
// recomputing a signed result from its inputs: test/integration/result-recompute.test.ts). Before, a
// set with a blank had it subtracted from the sample only, so F_ref kept the solvent background and
// Raman band and Φ came out low by their share of the reference integral (−3.5 % on that day).
// Brouwer, Pure Appl. Chem. 83, 2213 (2011): sample and standard are measured and corrected alike.
import { describe, expect, it } from 'vitest';
import { analyze } from '../../../src/analysis/analyze.js';
import { createSeededRandom } from '../../../src/decay/index.js';
import { yieldSet } from '../../helpers/yield-sets.js';

describe('blank subtraction of the reference emission', () => {
  it('subtracts the set blank from both spectra, so Φ is that of the blank-free bands', () => {
    const { result } = analyze(
      yieldSet(
        { sampleYield: 0.8, sampleAbsorbance: 0.04, referenceAbsorbance: 0.045, blank: { solvent: 'ethanol' } },
        createSeededRandom(11),
      ),
    );
    expect(result.corrections.map((c) => `${c.name}:${c.target}`)).toEqual([
      'subtractBlank:emission',
      'correctInnerFilter:emission',
      'subtractBlank:reference-emission',
      'correctInnerFilter:reference-emission',
    ]);
    expect(result.quantumYield?.inputs?.referenceCorrections).toEqual(['subtractBlank', 'correctInnerFilter']);
    // Truth 0.8 (the generator's), within the k = 2 expanded uncertainty the result states.
    const q = result.quantumYield;
    expect(Math.abs((q?.value ?? 0) - 0.8)).toBeLessThan(2 * (q?.standardUncertainty ?? 0));
    // Without the blank at all the same bands give the same Φ (to the noise of the two draws: 1 %).
    const { result: clean } = analyze(
      yieldSet({ sampleYield: 0.8, sampleAbsorbance: 0.04, referenceAbsorbance: 0.045 }, createSeededRandom(11)),
    );
    expect(Math.abs((q?.value ?? 0) / (clean.quantumYield?.value ?? 1) - 1)).toBeLessThan(0.01);
  });

  it('refuses Φ, with the reason, when the blank is of another solvent than the reference standard', () => {
    const { result } = analyze(
      yieldSet(
        { sampleYield: 0.8, sampleAbsorbance: 0.04, referenceAbsorbance: 0.045, blank: { solvent: 'water' } },
        createSeededRandom(12),
      ),
    );
    expect(result.quantumYield).toBeUndefined();
    expect(result.missing.find((m) => m.what === 'quantumYield')?.reason).toContain(
      'the subtractBlank correction was applied to the sample emission only',
    );
    expect(result.warnings.join('\n')).toContain("is not of the reference standard's solvent");
  });
});
