// Parses every file of a payload with the format readers, keyed by the part it supplies.
import type { Decay } from '../model/decay.js';
import type { Spectrum, SpectrumKind } from '../model/spectrum.js';
import { InputRejected } from '../model/errors.js';
import { readMeasurements, type ParsedData } from '../formats/index.js';
import type { AnalysisJobPayload, PayloadFile, RejectedInput } from './payload.js';
import type { SetPart } from './result.js';
import { markMissing, reasonOf, type StepContext } from './step-context.js';

export type ParsedInput =
  | { readonly file: PayloadFile; readonly type: 'spectrum'; readonly spectrum: Spectrum }
  | { readonly file: PayloadFile; readonly type: 'decay'; readonly decay: Decay };

const KIND_HINT: Readonly<Record<SetPart, SpectrumKind | 'decay'>> = {
  emission: 'emission', excitation: 'excitation', absorbance: 'absorbance', decay: 'decay', irf: 'decay',
  blank: 'blank', 'reference-emission': 'emission', 'reference-absorbance': 'absorbance',
  'detector-curve': 'detector-correction', raman: 'emission',
};

const encoder = new TextEncoder();

/** Reads every measurement of one payload file, or throws InputRejected (file, line, hint). */
function readInput(file: PayloadFile, settings: AnalysisJobPayload['settings']): ParsedData[] {
  return readMeasurements(encoder.encode(file.content), {
    fileName: file.name, maxBytes: settings.maxFileBytes, kindHint: KIND_HINT[file.part],
    ...(settings.formatProfiles === undefined ? {} : { profiles: settings.formatProfiles }),
  });
}

/**
 * Parses each payload file (first file per part wins; later ones are reported); unreadable files
 * become missing parts, and unreadable own files are added to `rejected` (to be quarantined).
 */
export function parseInputs(payload: AnalysisJobPayload, context: StepContext, rejected: RejectedInput[] = []): Map<SetPart, ParsedInput> {
  const parsed = new Map<SetPart, ParsedInput>();
  for (const file of payload.files) {
    if (parsed.has(file.part)) {
      context.warnings.push(`${file.name}: a second ${file.part} file in the set was not used`);
      continue;
    }
    let all: ParsedData[];
    try {
      all = readInput(file, payload.settings);
    } catch (error) {
      markMissing(context, file.part, reasonOf(error));
      if (error instanceof InputRejected && file.origin === 'own') {
        rejected.push({ name: file.name, sha256: file.sha256, code: error.code, message: error.message, hint: error.hint, ...(error.line === undefined ? {} : { line: error.line }) });
      }
      continue;
    }
    const data = all[0] as ParsedData;
    if (all.length > 1) {
      // Several measurements in one file (decay columns, spectra sharing an axis, x,y pairs): this
      // result analyses the first; the others are named here so none is dropped unseen.
      context.warnings.push(`${file.name} holds ${all.length} measurements (${all.map((measurement) => measurement.layout.valueColumn).join(', ')}); this result analyses "${data.layout.valueColumn}" (${data.id}); the others were read but not analysed: ${all.slice(1).map((measurement) => measurement.id).join(', ')}`);
    }
    parsed.set(file.part, data.type === 'spectrum' ? { file, type: 'spectrum', spectrum: data.spectrum } : { file, type: 'decay', decay: data.decay });
  }
  return parsed;
}

/** The spectrum of `part`, or undefined (recording a missing item when the part is a decay). */
export function spectrumOf(parsed: Map<SetPart, ParsedInput>, part: SetPart, context: StepContext): Spectrum | undefined {
  const input = parsed.get(part);
  if (input === undefined) return undefined;
  if (input.type !== 'spectrum') {
    markMissing(context, part, `${input.file.name} holds a decay, not a spectrum`);
    return undefined;
  }
  return input.spectrum;
}

/** The decay of `part`, or undefined (recording a missing item when the part is a spectrum). */
export function decayOf(parsed: Map<SetPart, ParsedInput>, part: SetPart, context: StepContext): Decay | undefined {
  const input = parsed.get(part);
  if (input === undefined) return undefined;
  if (input.type !== 'decay') {
    markMissing(context, part, `${input.file.name} holds a spectrum, not a decay histogram`);
    return undefined;
  }
  return input.decay;
}
