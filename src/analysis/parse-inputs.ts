// Parses every file of a payload with the format readers, keyed by the part it supplies.
import type { Decay } from '../model/decay.js';
import type { Spectrum, SpectrumKind } from '../model/spectrum.js';
import { InputRejected } from '../model/errors.js';
import { readMeasurements, type ParsedData } from '../formats/index.js';
import type { AnalysisJobPayload, PayloadFile, RejectedInput } from './payload.js';
import type { SetPart } from './result.js';
import { markMissing, reasonOf, type StepContext } from './step-context.js';
import { itemAt } from '../model/item-at.js';

/** Where a measurement came from when its file holds several: its id (file#column), column and position. */
export interface MeasurementOrigin {
  /** The reader's id of the measurement: the file name with "#column". */
  readonly id: string;
  /** The column read as its values (spectrum) or counts (decay). */
  readonly column: string;
  /** 0-based position among the file's measurements. */
  readonly index: number;
  /** How many measurements the file holds. */
  readonly count: number;
}

export type ParsedInput = (
  | { readonly file: PayloadFile; readonly type: 'spectrum'; readonly spectrum: Spectrum }
  | { readonly file: PayloadFile; readonly type: 'decay'; readonly decay: Decay }
) & { readonly origin?: MeasurementOrigin };

/** Parts whose file may hold several measurements that each become a result of their own (issue 18.3). */
export const FAN_OUT_PARTS: readonly SetPart[] = ['decay', 'emission', 'excitation', 'raman'];

/** What parseInputs read: the first measurement of each part, and the further measurements of fan-out parts. */
export interface ParsedSet {
  readonly parsed: Map<SetPart, ParsedInput>;
  /** Further measurements of a file of a FAN_OUT_PARTS part (second and later), in file order. */
  readonly further: readonly { readonly part: SetPart; readonly input: ParsedInput }[];
}

const KIND_HINT: Readonly<Record<SetPart, SpectrumKind | 'decay'>> = {
  emission: 'emission',
  excitation: 'excitation',
  absorbance: 'absorbance',
  decay: 'decay',
  irf: 'decay',
  blank: 'blank',
  'reference-emission': 'emission',
  'reference-absorbance': 'absorbance',
  'detector-curve': 'detector-correction',
  raman: 'emission',
};

const encoder = new TextEncoder();

/** Reads every measurement of one payload file, or throws InputRejected (file, line, hint). */
function readInput(file: PayloadFile, settings: AnalysisJobPayload['settings']): ParsedData[] {
  return readMeasurements(encoder.encode(file.content), {
    fileName: file.name,
    maxBytes: settings.maxFileBytes,
    kindHint: KIND_HINT[file.part],
    ...(settings.formatProfiles === undefined ? {} : { profiles: settings.formatProfiles }),
  });
}

/**
 * Parses each payload file (first file per part wins; later ones are reported); unreadable files
 * become missing parts, and unreadable own files are added to `rejected` (to be quarantined). A file
 * of a FAN_OUT_PARTS part holding several measurements gives its first in `parsed` and the others in
 * `further` (each becomes its own result); for other parts the first is used and the others are named.
 */
export function parseInputs(
  payload: AnalysisJobPayload,
  context: StepContext,
  rejected: RejectedInput[] = [],
): ParsedSet {
  const parsed = new Map<SetPart, ParsedInput>();
  const further: { part: SetPart; input: ParsedInput }[] = [];
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
        rejected.push({
          name: file.name,
          sha256: file.sha256,
          code: error.code,
          message: error.message,
          hint: error.hint,
          ...(error.line === undefined ? {} : { line: error.line }),
        });
      }
      continue;
    }
    const inputs = all.map((data, index): ParsedInput => {
      const origin =
        all.length > 1 ? { origin: { id: data.id, column: data.layout.valueColumn, index, count: all.length } } : {};
      return data.type === 'spectrum'
        ? { file, type: 'spectrum', spectrum: data.spectrum, ...origin }
        : { file, type: 'decay', decay: data.decay, ...origin };
    });
    parsed.set(file.part, itemAt(inputs, 0));
    if (all.length > 1 && FAN_OUT_PARTS.includes(file.part)) {
      for (const input of inputs.slice(1)) further.push({ part: file.part, input });
    } else if (all.length > 1) {
      // A supporting part (absorbance, blank, IRF, reference, detector curve) has one role in the set:
      // the first measurement serves it; the others are named here so none is passed over unseen.
      const first = itemAt(all, 0);
      context.warnings.push(
        `${file.name} holds ${all.length} measurements (${all.map((measurement) => measurement.layout.valueColumn).join(', ')}); as the set's ${file.part} it serves with "${first.layout.valueColumn}" (${first.id}); not used: ${all
          .slice(1)
          .map((measurement) => measurement.id)
          .join(', ')}`,
      );
    }
  }
  return { parsed, further };
}

/** The spectrum of `part`, or undefined (recording a missing item when the part is a decay). */
export function spectrumOf(
  parsed: Map<SetPart, ParsedInput>,
  part: SetPart,
  context: StepContext,
): Spectrum | undefined {
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
