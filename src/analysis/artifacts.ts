// Outbox artifacts of a set: the corrected emission spectrum (CSV and JCAMP-DX) and the decay with its
// IRF, as text for the coordinator to write.
import type { Decay } from '../model/decay.js';
import type { Spectrum } from '../model/spectrum.js';
import { writeDecayCsv, writeSpectrumCsv, writeSpectrumJcamp } from '../formats/index.js';
import type { AnalysisArtifact } from './payload.js';
import { attempt, type StepContext } from './step-context.js';

/** Text files for the outbox; a writer failure is reported as a missing artifact, not fatal. */
export function buildArtifacts(
  setId: string,
  parts: { correctedEmission?: Spectrum; decay?: Decay; fitColumns?: Readonly<Record<string, ArrayLike<number>>> },
  context: StepContext,
): AnalysisArtifact[] {
  const artifacts: AnalysisArtifact[] = [];
  const emission = parts.correctedEmission;
  if (emission !== undefined) {
    const csv = attempt(context, 'outbox: corrected emission CSV', () => writeSpectrumCsv(emission));
    if (csv !== undefined) artifacts.push({ name: `${setId}.emission.corrected.csv`, content: csv });
    const jcamp = attempt(context, 'outbox: corrected emission JCAMP-DX', () => writeSpectrumJcamp(emission));
    if (jcamp !== undefined) artifacts.push({ name: `${setId}.emission.corrected.jdx`, content: jcamp });
  }
  const decay = parts.decay;
  if (decay !== undefined) {
    const csv = attempt(context, 'outbox: fitted decay CSV', () => writeDecayCsv(decay, parts.fitColumns));
    if (csv !== undefined) artifacts.push({ name: `${setId}.decay.fit.csv`, content: csv });
  }
  return artifacts;
}
