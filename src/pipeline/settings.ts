// The analysis settings snapshot sent with every job, and the config hash recorded in provenance.
import { createHash } from 'node:crypto';
import type { AnalysisSettings } from '../analysis/payload.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { ReferenceConfig } from '../config/sections/references.js';

/** The settings analyze() needs, taken from the resolved config (plus the reference standard used, if any). */
export function analysisSettingsFrom(
  config: DriftlightConfig,
  reference?: { standardId: string; entry?: ReferenceConfig },
): AnalysisSettings {
  const entry = reference?.entry;
  const [windowFromNm, windowToNm] = config.analysis.yieldWindowNm ?? [];
  return {
    components: config.analysis.components,
    estimator: config.analysis.estimator,
    scatter: config.analysis.scatter,
    pileUpCorrection: config.analysis.pileUpCorrection,
    ...(config.instrument.repetitionRateMHz === undefined
      ? {}
      : { repetitionRateHz: config.instrument.repetitionRateMHz * 1e6 }),
    innerFilter: config.analysis.innerFilter,
    maxAbsorbanceForYield: config.analysis.maxAbsorbanceForYield,
    refractiveIndex: { ...config.analysis.refractiveIndex },
    defaultRefractiveIndex: config.analysis.defaultRefractiveIndex,
    cuvette: { ...config.instrument.cuvette },
    detectorCurveMeaning: config.instrument.detectorCurveMeaning,
    maxFileBytes: config.limits.maxFileBytes,
    ...(config.formats.profiles.length === 0 ? {} : { formatProfiles: config.formats.profiles }),
    yieldWindow: {
      ...(windowFromNm === undefined || windowToNm === undefined
        ? {}
        : { windowNm: [windowFromNm, windowToNm] as const }),
      scatterExclusionNm: config.analysis.scatterExclusionNm,
      bandEdgeFraction: config.analysis.bandEdgeFraction,
      bandEdgeAction: config.analysis.bandEdgeAction,
    },
    ...(reference === undefined
      ? {}
      : {
          reference: {
            standardId: reference.standardId,
            ...(entry?.quantumYield === undefined ? {} : { quantumYield: entry.quantumYield }),
            ...(entry?.quantumYieldStdUncertainty === undefined
              ? {}
              : { quantumYieldStdUncertainty: entry.quantumYieldStdUncertainty }),
            ...(entry?.refractiveIndex === undefined ? {} : { refractiveIndex: entry.refractiveIndex }),
          },
        }),
  };
}

function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  if (value !== null && typeof value === 'object') {
    return `{${Object.keys(value)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical((value as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(value) ?? 'null';
}

/** sha256 (hex) of the canonical JSON of the config parts that change results (analysis, instrument, references, assembly). */
export function configHash(config: DriftlightConfig, detectorCurveSha256?: string): string {
  const relevant = {
    analysis: config.analysis,
    instrument: { ...config.instrument, detectorCorrectionFile: detectorCurveSha256 ?? null },
    references: config.references,
    assembly: config.assembly,
  };
  return createHash('sha256').update(canonical(relevant)).digest('hex');
}
