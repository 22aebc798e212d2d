// Outbox artifacts of a set: the corrected emission spectrum (CSV and JCAMP-DX) and the decay with its
// IRF, as text for the coordinator to write. Values are rounded to READABLE_DIGITS significant digits (far
// finer than any detector's precision) so a person reads 1234.568, not 1234.5678901234567; the axis is
// written exactly, and the result JSON keeps full precision.
import type { Decay } from '../model/decay.js';
import type { Spectrum } from '../model/spectrum.js';
import { writeDecayCsv, writeSpectrumCsv, writeSpectrumJcamp } from '../formats/index.js';
import type { AnalysisArtifact } from './payload.js';
import { withValues } from '../model/spectrum.js';
import { attempt, type StepContext } from './step-context.js';

/** Significant digits of values in written data files (7: well below detector noise, ~1e-7 relative). */
export const READABLE_DIGITS = 7;

/** Each value rounded to `digits` significant digits (the shortest text of the result then has at most that many). */
function readableValues(values: ArrayLike<number>, digits = READABLE_DIGITS): Float64Array {
  return Float64Array.from(values, (v) => (Number.isFinite(v) && v !== 0 ? Number(v.toPrecision(digits)) : v));
}

/** Text files for the outbox; a writer failure is reported as a missing artifact, not fatal. */
export function buildArtifacts(
  setId: string,
  parts: { correctedEmission?: Spectrum; decay?: Decay; fitColumns?: Readonly<Record<string, ArrayLike<number>>> },
  context: StepContext,
): AnalysisArtifact[] {
  const artifacts: AnalysisArtifact[] = [];
  const emission =
    parts.correctedEmission === undefined
      ? undefined
      : withValues(parts.correctedEmission, readableValues(parts.correctedEmission.values));
  if (emission !== undefined) {
    const csv = attempt(context, 'outbox: corrected emission CSV', () => writeSpectrumCsv(emission));
    if (csv !== undefined) artifacts.push({ name: `${setId}.emission.corrected.csv`, content: csv });
    const jcamp = attempt(context, 'outbox: corrected emission JCAMP-DX', () => writeSpectrumJcamp(emission));
    if (jcamp !== undefined) artifacts.push({ name: `${setId}.emission.corrected.jdx`, content: jcamp });
  }
  const decay = parts.decay;
  if (decay !== undefined) {
    const fitColumns =
      parts.fitColumns === undefined
        ? undefined
        : Object.fromEntries(Object.entries(parts.fitColumns).map(([name, column]) => [name, readableValues(column)]));
    const csv = attempt(context, 'outbox: fitted decay CSV', () => writeDecayCsv(decay, fitColumns));
    if (csv !== undefined) artifacts.push({ name: `${setId}.decay.fit.csv`, content: csv });
  }
  return artifacts;
}
