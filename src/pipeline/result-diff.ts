// What changed between two results of the same set (for `driftlight reprocess`): key numbers,
// partial/missing, QC flags and the config hash.
import type { AnalysisResult } from '../analysis/result.js';

export interface ResultChange {
  readonly field: string;
  readonly before: string;
  readonly after: string;
}

const KEY_NUMBERS: readonly [string, (r: AnalysisResult) => number | undefined][] = [
  ['tauMeanIntensityNs', (r) => r.decayFit?.tauMeanIntensityNs],
  ['chi2Reduced', (r) => r.decayFit?.chi2Reduced],
  ['quantumYield', (r) => r.quantumYield?.value],
  ['krPerS', (r) => r.rates?.krPerS],
  ['knrPerS', (r) => r.rates?.knrPerS],
  ['tau0Ns', (r) => r.rates?.tau0Ns],
  ['emission.peakWavelengthNm', (r) => r.spectra.emission?.peakWavelengthNm],
  ['emission.integratedIntensity', (r) => r.spectra.emission?.integratedIntensity],
];

function show(value: number | undefined): string {
  return value === undefined ? '—' : Number(value.toPrecision(5)).toString();
}

/** The changes from `before` to `after` (numbers compared at 5 significant digits). */
export function diffResults(before: AnalysisResult, after: AnalysisResult): ResultChange[] {
  const changes: ResultChange[] = [];
  for (const [field, get] of KEY_NUMBERS) {
    const a = show(get(before));
    const b = show(get(after));
    if (a !== b) changes.push({ field, before: a, after: b });
  }
  if (before.partial !== after.partial)
    changes.push({ field: 'partial', before: String(before.partial), after: String(after.partial) });
  const missing = (r: AnalysisResult): string =>
    r.missing
      .map((m) => m.what)
      .sort()
      .join(',') || '—';
  if (missing(before) !== missing(after))
    changes.push({ field: 'missing', before: missing(before), after: missing(after) });
  const flags = (r: AnalysisResult): string =>
    r.qc.flags
      .map((f) => f.rule)
      .sort()
      .join(',') || '—';
  if (flags(before) !== flags(after)) changes.push({ field: 'qc.flags', before: flags(before), after: flags(after) });
  const corrections = (r: AnalysisResult): string => r.provenance.corrections.join(',') || '—';
  if (corrections(before) !== corrections(after))
    changes.push({ field: 'corrections', before: corrections(before), after: corrections(after) });
  if (before.provenance.configHash !== after.provenance.configHash) {
    changes.push({
      field: 'configHash',
      before: before.provenance.configHash.slice(0, 12),
      after: after.provenance.configHash.slice(0, 12),
    });
  }
  return changes;
}
