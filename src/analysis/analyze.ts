// analyze(payload): the pure composition of readers, corrections, lifetime fit, quantum yield and
// rate constants into one AnalysisResult. A partial set gives a partial result that says what is
// missing and why; nothing here reads files, the clock or the environment.
import type { Spectrum } from '../model/spectrum.js';
import { readAcquisitionTime } from '../model/acquisition-time.js';
import { ramanTest } from '../spectra/index.js';
import { buildArtifacts } from './artifacts.js';
import { fitSetDecay, type DecayStepOutcome } from './decay-step.js';
import { absorbanceSummary, correctEmission, emissionMetrics, type CorrectedEmission } from './emission-step.js';
import {
  decayOf,
  FAN_OUT_PARTS,
  parseInputs,
  spectrumOf,
  type MeasurementOrigin,
  type ParsedSet,
} from './parse-inputs.js';
import type { AnalysisJobPayload, AnalysisOutput, MeasurementOutput, RejectedInput } from './payload.js';
import {
  RESULT_SCHEMA,
  type AbsorbanceSummary,
  type AnalysisResult,
  type QuantumYieldSummary,
  type RamanSummary,
  type SetPart,
} from './result.js';
import { attempt, createStepContext, markMissing, type StepContext } from './step-context.js';
import { computeQuantumYield, computeRates } from './yield-step.js';
import { itemAt } from '../model/item-at.js';

const SAMPLE_ROLES = new Set(['sample', 'control']);

/**
 * Analyses one measurement set; never throws for bad or missing parts (they are reported in `missing`).
 * A file holding several measurements of a decay or spectrum part (several decay columns, spectra on one
 * axis, x,y pairs) gives one result per measurement: the first under the set's id, each further one
 * under `setId.column` in `measurements` (issue 18.3).
 */
export function analyze(payload: AnalysisJobPayload): AnalysisOutput {
  const base = createStepContext();
  for (const m of payload.missingParts) markMissing(base, m.part, m.reason);
  const rejectedInputs: RejectedInput[] = [];
  const { parsed, further } = parseInputs(payload, base, rejectedInputs);
  const taken = new Set<string>([payload.setId]);
  const furtherIds = further.map(({ input }) => measurementSetId(payload.setId, input.origin, taken));
  const fanned = [...new Set(further.map((f) => f.part))]
    .map((part) => parsed.get(part))
    .filter((input) => input !== undefined);
  for (const input of fanned) {
    const others = further.flatMap((f, i) =>
      f.input.file === input.file ? [`${f.input.origin?.id ?? f.part} → ${itemAt(furtherIds, i)}`] : [],
    );
    base.warnings.push(
      `${input.file.name} holds ${others.length + 1} measurements, each with a result of its own: ${input.origin?.id ?? input.file.name} → ${payload.setId}, ${others.join(', ')}`,
    );
  }
  const primary = analyzeMeasurements(payload, parsed, copyContext(base), undefined);
  const measurements = further.map(({ part, input }, i) => {
    const own = new Map(parsed);
    own.set(part, input);
    // Whether QC judges this measurement is decided by the QC stage (qc.judgement), which knows the controls.
    const context = copyContext(base);
    return analyzeMeasurements({ ...payload, setId: itemAt(furtherIds, i) }, own, context, payload.setId);
  });
  return { ...primary, rejectedInputs, ...(measurements.length === 0 ? {} : { measurements }) };
}

/** A result id for a further measurement: the set id, a dot and the column name made id-safe (unique within the set). */
export function measurementSetId(setId: string, origin: MeasurementOrigin | undefined, taken: Set<string>): string {
  const slug =
    (origin?.column ?? '').replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-+|-+$/g, '') || `m${(origin?.index ?? 0) + 1}`;
  let id = `${setId}.${slug}`;
  for (let n = 2; taken.has(id); n++) id = `${setId}.${slug}-${n}`;
  taken.add(id);
  return id;
}

function copyContext(context: StepContext): StepContext {
  return {
    partial: context.partial,
    warnings: [...context.warnings],
    missing: [...context.missing],
    corrections: [...context.corrections],
  };
}

/** The analysis of one choice of measurements (one per part); `ofSetId` is set for a further measurement's result. */
function analyzeMeasurements(
  payload: AnalysisJobPayload,
  parsed: ParsedSet['parsed'],
  context: StepContext,
  ofSetId: string | undefined,
): MeasurementOutput {
  const settings = payload.settings;

  const emissionRaw =
    spectrumOf(parsed, 'emission', context) ??
    (payload.role === 'raman' ? spectrumOf(parsed, 'raman', context) : undefined);
  const decay = decayOf(parsed, 'decay', context);
  const primaryMetadata = emissionRaw?.metadata ?? decay?.metadata ?? firstMetadata(parsed);
  const excitationNm =
    payload.sampleInfo.excitationNm ?? emissionRaw?.metadata.excitationNm ?? decay?.metadata.excitationNm;
  const solvent = payload.sampleInfo.solvent ?? primaryMetadata?.solvent;
  const blank = spectrumOf(parsed, 'blank', context);
  const detectorCurve = spectrumOf(parsed, 'detector-curve', context);
  const absorbance = spectrumOf(parsed, 'absorbance', context);

  // Emission: corrections in order, then metrics.
  let correctedEmission: Spectrum | undefined;
  let sampleCorrection: CorrectedEmission | undefined;
  if (emissionRaw !== undefined && payload.role !== 'raman') {
    const done = correctEmission(
      emissionRaw,
      {
        ...(blank ? { blank } : {}),
        ...(detectorCurve ? { detectorCurve } : {}),
        ...(absorbance ? { absorbance } : {}),
        ...(excitationNm === undefined ? {} : { excitationNm }),
      },
      settings,
      'emission',
      context,
    );
    correctedEmission = done.corrected;
    sampleCorrection = done;
  }
  const emission =
    correctedEmission === undefined
      ? undefined
      : attempt(context, 'emission metrics', () => emissionMetrics(correctedEmission));
  let absorbanceInfo: AbsorbanceSummary | undefined;
  if (absorbance !== undefined) {
    if (excitationNm === undefined)
      markMissing(
        context,
        'absorbance at excitation',
        'the excitation wavelength is not given by the files or the manifest',
      );
    else {
      absorbanceInfo = absorbanceSummary(absorbance, excitationNm, settings.cuvette.pathLengthCm);
      if (absorbanceInfo === undefined)
        markMissing(context, 'absorbance at excitation', `the absorbance spectrum does not cover ${excitationNm} nm`);
    }
  }

  // Lifetime.
  let decayOutcome: DecayStepOutcome | undefined;
  if (decay !== undefined) {
    const irf = parsed.get('irf')?.type === 'decay' ? decayOf(parsed, 'irf', context) : undefined;
    decayOutcome = attempt(context, 'decayFit', () => fitSetDecay(decay, irf, settings, context));
  }

  // Reference standard (sample and control sets).
  let quantumYield: QuantumYieldSummary | undefined;
  let referenceEmissionMetrics: AnalysisResult['spectra']['referenceEmission'];
  let referenceAbsorbanceInfo: AbsorbanceSummary | undefined;
  if (SAMPLE_ROLES.has(payload.role)) {
    const refEmissionRaw = spectrumOf(parsed, 'reference-emission', context);
    const refAbsorbance = spectrumOf(parsed, 'reference-absorbance', context);
    const standardId = settings.reference?.standardId;
    const refFile = parsed.get('reference-emission')?.file;
    let referenceCorrection: CorrectedEmission | undefined;
    if (refEmissionRaw !== undefined) {
      const refExcitationNm = refEmissionRaw.metadata.excitationNm ?? excitationNm;
      // The reference goes through the sample's chain (docs/pipeline.md): the set's blank too, unless the blank
      // says it is of another solvent than the reference's (then the yield is refused as corrected unalike).
      const blankSolvent = blank?.metadata.solvent?.trim().toLowerCase();
      const referenceSolvent = refEmissionRaw.metadata.solvent?.trim().toLowerCase();
      const referenceBlank =
        blank !== undefined &&
        (blankSolvent === undefined || referenceSolvent === undefined || blankSolvent === referenceSolvent)
          ? blank
          : undefined;
      if (blank !== undefined && referenceBlank === undefined)
        context.warnings.push(
          `the blank (${blank.metadata.solvent ?? '?'}) is not of the reference standard's solvent (${refEmissionRaw.metadata.solvent ?? '?'}): it is not subtracted from the reference emission`,
        );
      const done = correctEmission(
        refEmissionRaw,
        {
          ...(referenceBlank ? { blank: referenceBlank } : {}),
          ...(detectorCurve ? { detectorCurve } : {}),
          ...(refAbsorbance ? { absorbance: refAbsorbance } : {}),
          ...(refExcitationNm === undefined ? {} : { excitationNm: refExcitationNm }),
        },
        settings,
        'reference-emission',
        context,
      );
      referenceCorrection = done;
      referenceEmissionMetrics = attempt(context, 'reference emission metrics', () => emissionMetrics(done.corrected));
      if (refAbsorbance !== undefined && refExcitationNm !== undefined) {
        referenceAbsorbanceInfo = absorbanceSummary(refAbsorbance, refExcitationNm, settings.cuvette.pathLengthCm);
      }
    }
    const refusedCorrection = [
      ...(sampleCorrection?.refused ?? []).map(
        (r) => `the ${r.name} correction of the sample emission was refused (${r.reason})`,
      ),
      ...(referenceCorrection?.refused ?? []).map(
        (r) => `the ${r.name} correction of the reference emission was refused (${r.reason})`,
      ),
    ][0];
    const why =
      sampleCorrection === undefined
        ? 'no sample emission spectrum'
        : absorbanceInfo === undefined
          ? 'no sample absorbance at the excitation wavelength'
          : referenceCorrection === undefined
            ? 'no reference-standard emission in the set or paired within the window'
            : referenceAbsorbanceInfo === undefined
              ? 'no reference-standard absorbance at its excitation wavelength'
              : standardId === undefined
                ? 'the reference standard is not named (references[].standardId or the manifest standardId)'
                : undefined;
    if (why !== undefined) markMissing(context, 'quantumYield', why, false);
    else if (refusedCorrection !== undefined)
      markMissing(
        context,
        'quantumYield',
        `not computed: ${refusedCorrection}; a yield from uncorrected data would be wrong`,
      );
    else if (
      sampleCorrection !== undefined &&
      absorbanceInfo !== undefined &&
      referenceCorrection !== undefined &&
      referenceAbsorbanceInfo !== undefined &&
      standardId !== undefined
    ) {
      const inputs = {
        sampleEmission: sampleCorrection.corrected,
        sampleCorrections: sampleCorrection.applied,
        sampleAbsorbance: absorbanceInfo,
        sampleSolvent: solvent,
        referenceEmission: referenceCorrection.corrected,
        referenceCorrections: referenceCorrection.applied,
        referenceAbsorbance: referenceAbsorbanceInfo,
        standardId,
        referenceSetId: refFile?.pairedFromSetId,
        excitationNm,
      };
      quantumYield = attempt(context, 'quantumYield', () => computeQuantumYield(inputs, settings, context));
    }
  }
  let rates: AnalysisResult['rates'];
  if (quantumYield !== undefined && decayOutcome !== undefined && !decayOutcome.fit.acceptable) {
    markMissing(
      context,
      'rates',
      `the lifetime fit is not acceptable: ${decayOutcome.fit.unacceptableReasons.join('; ')}`,
      false,
    );
  } else if (quantumYield !== undefined && decayOutcome !== undefined) {
    const q = quantumYield;
    const tauNs = decayOutcome.summary.tauMeanIntensityNs;
    rates = attempt(context, 'rates', () => computeRates(q, tauNs));
  } else if (SAMPLE_ROLES.has(payload.role)) {
    const yieldReason = context.missing.find((m) => m.what === 'quantumYield')?.reason;
    markMissing(
      context,
      'rates',
      quantumYield === undefined
        ? `no quantum yield${yieldReason === undefined ? '' : ` (${yieldReason})`}`
        : 'no lifetime',
      false,
    );
  }

  // Raman sensitivity (raman sets).
  let raman: RamanSummary | undefined;
  const ramanSpectrum = payload.role === 'raman' ? (spectrumOf(parsed, 'raman', context) ?? emissionRaw) : undefined;
  if (ramanSpectrum !== undefined) {
    raman = attempt(context, 'raman', () => {
      const test = ramanTest(ramanSpectrum);
      const snr = test.signalToNoisePoisson ?? test.signalToNoiseRms;
      return { peakWavelengthNm: test.measuredPeakNm, signalToNoise: snr ?? 0, passed: test.positionWithinTolerance };
    });
  }

  const fitColumns =
    decayOutcome === undefined || decay === undefined ? undefined : fitColumnsOf(decayOutcome, decay.counts.length);
  const artifacts = buildArtifacts(
    payload.setId,
    {
      ...(correctedEmission ? { correctedEmission } : {}),
      ...(decay ? { decay } : {}),
      ...(fitColumns ? { fitColumns } : {}),
    },
    context,
  );
  for (const w of quantumYield?.warnings ?? []) context.warnings.push(`quantum yield: ${w}`);

  const acquisition = acquisitionOfSet(payload, primaryMetadata?.acquiredAt, context.warnings);
  const measurement = fannedMeasurementOf(parsed);
  const result: AnalysisResult = {
    schema: RESULT_SCHEMA,
    setId: payload.setId,
    role: payload.role,
    sampleId: payload.sampleId,
    ...(acquisition === undefined ? {} : { acquiredAt: acquisition.acquiredAt }),
    ...(solvent === undefined ? {} : { solvent }),
    ...(excitationNm === undefined ? {} : { excitationNm }),
    ...(measurement === undefined
      ? {}
      : {
          measurement: {
            id: measurement.origin.id,
            column: measurement.origin.column,
            part: measurement.part,
            index: measurement.origin.index,
            of: measurement.origin.count,
            ...(ofSetId === undefined ? {} : { setId: ofSetId }),
          },
        }),
    partial: context.partial,
    missing: context.missing,
    spectra: {
      ...(emission === undefined ? {} : { emission }),
      ...(absorbanceInfo === undefined ? {} : { absorbance: absorbanceInfo }),
      ...(referenceEmissionMetrics === undefined ? {} : { referenceEmission: referenceEmissionMetrics }),
      ...(referenceAbsorbanceInfo === undefined ? {} : { referenceAbsorbance: referenceAbsorbanceInfo }),
    },
    corrections: context.corrections,
    ...(decayOutcome === undefined ? {} : { decayFit: decayOutcome.summary }),
    ...(quantumYield === undefined ? {} : { quantumYield }),
    ...(rates === undefined ? {} : { rates }),
    ...(raman === undefined ? {} : { raman }),
    warnings: context.warnings,
    qc: { flags: [] },
    provenance: {
      inputs: payload.files.map((f) => ({
        file: f.name,
        sha256: f.sha256,
        part: f.part,
        role: f.role,
        origin: f.origin,
        ...(f.pairedFromSetId === undefined ? {} : { pairedFromSetId: f.pairedFromSetId }),
      })),
      configHash: payload.configHash,
      softwareVersion: payload.softwareVersion,
      corrections: context.corrections.map((c) => `${c.name}:${c.target}`),
      analyzedAt: payload.analyzedAt,
      ...(acquisition === undefined ? {} : { acquiredAtSource: acquisition.source }),
      ...(payload.reanalysis === undefined ? {} : { reanalysis: payload.reanalysis }),
    },
  };
  return { result, artifacts };
}

/** The set's acquisition time: as read at intake (payload), else the first input's metadata read by readAcquisitionTime (ISO 8601 and unambiguous spellings); a refused one is left out with a warning. */
function acquisitionOfSet(
  payload: AnalysisJobPayload,
  metadataText: string | undefined,
  warnings: string[],
): AnalysisJobPayload['acquisition'] {
  if (payload.acquisition !== undefined) return payload.acquisition;
  if (metadataText === undefined) return undefined;
  const reading = readAcquisitionTime(metadataText);
  if (reading.ok) return { acquiredAt: reading.iso, source: 'metadata' };
  warnings.push(`acquisition time left out: ${reading.message} (${reading.code}; ${reading.hint})`);
  return undefined;
}

/** The measurement of a fan-out part that came from a file holding several, if any (the first such part). */
function fannedMeasurementOf(parsed: ParsedSet['parsed']): { part: SetPart; origin: MeasurementOrigin } | undefined {
  for (const part of FAN_OUT_PARTS) {
    const origin = parsed.get(part)?.origin;
    if (origin !== undefined) return { part, origin };
  }
  return undefined;
}

function firstMetadata(parsed: ParsedSet['parsed']): { acquiredAt?: string; solvent?: string } | undefined {
  for (const input of parsed.values())
    return input.type === 'spectrum' ? input.spectrum.metadata : input.decay.metadata;
  return undefined;
}

/** The fitted model and residuals as full-length columns (0 outside the fit range). */
function fitColumnsOf(
  outcome: DecayStepOutcome,
  channels: number,
): Readonly<Record<string, ArrayLike<number>>> | undefined {
  const [first, end] = outcome.fit.rangeChannels;
  if (end - first !== outcome.fit.fittedCounts.length || end > channels) return undefined;
  const fit = new Float64Array(channels);
  const residual = new Float64Array(channels);
  for (let k = first; k < end; k++) {
    fit[k] = outcome.fit.fittedCounts[k - first] ?? 0;
    residual[k] = outcome.fit.weightedResiduals[k - first] ?? 0;
  }
  return { fit, 'weighted residual': residual };
}
