// The standards and refractive-index tables carry the values of REFERENCES.md.
import { describe, expect, it } from 'vitest';
import { findStandard, standardWarnings, STANDARDS } from '../../../src/photophysics/standards.js';
import { findSolvent } from '../../../src/photophysics/refractive-indices.js';

describe('quantum-yield standards', () => {
  it.each([
    ['quinine-h2so4-0.5m', 0.546, 1.339], // Melhuish 1961 (from memory); n 0.5 M H2SO4 ≈ 1.339 (from memory)
    ['quinine-hclo4-0.1m', 0.6, 1.334], // Brouwer 2011 (from memory)
    ['fluorescein-naoh-0.1m', 0.925, 1.334], // Magde et al. 2002 (from memory)
    ['cresyl-violet-methanol', 0.54, 1.329], // Magde et al. 1979 (confirmed); n methanol 1.3290 (confirmed)
  ])('%s has Φ = %s and n = %s (REFERENCES.md)', (id, phi, n) => {
    const standard = findStandard(id);
    expect(standard.quantumYield).toBe(phi);
    expect(standard.refractiveIndex).toBe(n);
  });

  it('warns outside the excitation range and for memory values; rejects unknown ids', () => {
    const warnings = standardWarnings(findStandard('fluorescein-naoh-0.1m'), 350);
    expect(warnings.join(' ')).toMatch(/outside the range 470–496 nm/);
    expect(() => findStandard('no-such-dye')).toThrow(/known: quinine-h2so4-0.5m/);
    expect(STANDARDS.every((s) => s.standardUncertainty > 0)).toBe(true);
  });

  it('shows for every standard its value, uncertainty, solvent, temperature and a citable source (issue 15 item 8)', () => {
    for (const s of STANDARDS) {
      expect(s.quantumYield).toBeGreaterThan(0);
      expect(s.standardUncertainty).toBeGreaterThan(0);
      expect(s.solvent).not.toBe('');
      expect(s.temperature).toMatch(/°C/);
      // Authors, journal, volume, first page (year): a reference a lab can look up.
      expect(s.source).toMatch(/^[A-Z].*, [A-Z][A-Za-z. ]+ \d+, \d+ \(\d{4}\)/);
    }
    // A value not yet re-read in its source says so, names the source to check and how to state one's own value.
    const warning = standardWarnings(findStandard('rhodamine-6g-ethanol'), 480).join(' ');
    expect(warning).toContain('Kubin & Fletcher, J. Lumin. 27, 455 (1982)');
    expect(warning).toContain('references[].quantumYield');
    expect(standardWarnings(findStandard('cresyl-violet-methanol'), 580)).toEqual([]);
  });

  it('finds solvents by common name (n from REFERENCES.md, confirmed)', () => {
    expect(findSolvent('Ethanol')?.refractiveIndex).toBe(1.3618);
    expect(findSolvent('0.1M NaOH')?.id).toBe('naoh-0.1m');
    expect(findSolvent('unobtainium')).toBeUndefined();
  });
});
