// Measurement-set assembly, pure logic (the clock comes in as `now`): classify a file into a part,
// sample id and role; decide which set it joins; decide when a set is ready; choose pairings.
// The coordinator applies these decisions to the ledger.
import type { MeasurementRole } from '../model/spectrum.js';
import type { SetPart } from '../analysis/result.js';

export type SampleIdSource = 'manifest' | 'metadata' | 'pattern' | 'fallback';

/** What the reader found in a file, as far as assembly cares. */
export interface FileFactsForAssembly {
  readonly name: string;
  readonly dataType: 'spectrum' | 'decay';
  /** Spectrum kind (emission, absorbance, …) for spectra. */
  readonly spectrumKind?: string;
  readonly metadataRole?: MeasurementRole;
  readonly metadataSampleId?: string;
  readonly hasIrfColumn: boolean;
}

export interface AssemblyRules {
  /** Compiled assembly.fileNamePatterns (named groups sampleId, part). */
  readonly fileNamePatterns: readonly RegExp[];
  readonly referencePatterns: readonly RegExp[];
  readonly controlPatterns: readonly RegExp[];
  readonly requiredParts: readonly SetPart[];
  readonly referenceRequiredParts: readonly SetPart[];
  readonly setTimeoutMs: number;
}

export interface FileClassification {
  readonly part: SetPart;
  readonly sampleId: string;
  readonly sampleIdSource: SampleIdSource;
  /** Role of the file itself. */
  readonly role: MeasurementRole;
}

const PART_TOKENS: Readonly<Record<string, SetPart>> = {
  em: 'emission',
  emission: 'emission',
  ex: 'excitation',
  excitation: 'excitation',
  abs: 'absorbance',
  absorbance: 'absorbance',
  decay: 'decay',
  tcspc: 'decay',
  irf: 'irf',
  blank: 'blank',
  raman: 'raman',
  'ref-em': 'reference-emission',
  'ref-abs': 'reference-absorbance',
  detector: 'detector-curve',
};

/** Parts that support a sample measurement rather than being one. */
export const SUPPORTING_PARTS: readonly SetPart[] = ['irf', 'blank', 'raman', 'detector-curve'];

const PART_ROLE: Readonly<Record<SetPart, MeasurementRole>> = {
  emission: 'sample',
  excitation: 'sample',
  absorbance: 'absorbance',
  decay: 'sample',
  irf: 'irf',
  blank: 'blank',
  'reference-emission': 'reference',
  'reference-absorbance': 'reference',
  'detector-curve': 'detector-curve',
  raman: 'raman',
};

function partFromData(facts: FileFactsForAssembly): SetPart {
  const role = facts.metadataRole;
  if (role === 'irf') return 'irf';
  if (role === 'blank') return 'blank';
  if (role === 'raman') return 'raman';
  if (role === 'detector-curve') return 'detector-curve';
  if (facts.dataType === 'decay') return 'decay';
  switch (facts.spectrumKind) {
    case 'absorbance':
    case 'transmittance':
      return 'absorbance';
    case 'blank':
      return 'blank';
    case 'detector-correction':
      return 'detector-curve';
    case 'excitation':
      return 'excitation';
    default:
      return role === 'absorbance' ? 'absorbance' : 'emission';
  }
}

function stem(name: string): string {
  const dot = name.indexOf('.');
  return dot > 0 ? name.slice(0, dot) : name;
}

/** Classifies a file: the part it supplies, its sample id (file metadata, then name patterns, then the file stem) and its role. */
export function classifyFile(facts: FileFactsForAssembly, rules: AssemblyRules): FileClassification {
  let patternSampleId: string | undefined;
  let patternPart: SetPart | undefined;
  for (const pattern of rules.fileNamePatterns) {
    const match = pattern.exec(facts.name);
    if (match?.groups === undefined) continue;
    patternSampleId = match.groups['sampleId'];
    const token = match.groups['part']?.toLowerCase();
    patternPart = token === undefined ? undefined : PART_TOKENS[token];
    break;
  }
  const dataPart = partFromData(facts);
  // The content wins where it is explicit (a decay is a decay); the name decides between lookalikes.
  let part: SetPart = dataPart;
  if (patternPart !== undefined) {
    const compatible =
      (facts.dataType === 'decay') === (patternPart === 'decay' || patternPart === 'irf') &&
      !(
        facts.metadataRole !== undefined &&
        dataPart !== 'emission' &&
        dataPart !== 'decay' &&
        dataPart !== patternPart
      );
    if (compatible) part = patternPart;
  }
  const metadataSampleId = facts.metadataSampleId?.trim();
  const sampleId =
    metadataSampleId !== undefined && metadataSampleId !== ''
      ? { id: metadataSampleId, source: 'metadata' as const }
      : patternSampleId !== undefined && patternSampleId !== ''
        ? { id: patternSampleId, source: 'pattern' as const }
        : { id: stem(facts.name), source: 'fallback' as const };
  return { part, sampleId: sampleId.id, sampleIdSource: sampleId.source, role: facts.metadataRole ?? PART_ROLE[part] };
}

/** The role of a set from its sample id (configured references and controls win) and the file roles. */
export function setRoleFor(
  sampleId: string,
  fileRole: MeasurementRole,
  part: SetPart,
  rules: AssemblyRules,
): MeasurementRole {
  if (rules.controlPatterns.some((p) => p.test(sampleId))) return 'control';
  if (rules.referencePatterns.some((p) => p.test(sampleId))) return 'reference';
  if (fileRole === 'control' || fileRole === 'reference') return fileRole;
  if (SUPPORTING_PARTS.includes(part)) return PART_ROLE[part];
  return 'sample';
}

/** An open set as assembly sees it. */
export interface OpenSetView {
  readonly id: string;
  readonly sampleId: string;
  readonly role: MeasurementRole;
  readonly createdAt: Date;
  readonly deadlineAt: Date;
  /** Own files. */
  readonly files: readonly { readonly name: string; readonly part: SetPart; readonly hasIrfColumn: boolean }[];
  /** For manifest sets: the file names the manifest lists. */
  readonly manifestFiles?: readonly string[];
}

export type Placement =
  | { readonly kind: 'join'; readonly setId: string }
  | {
      readonly kind: 'create';
      readonly sampleId: string;
      readonly role: MeasurementRole;
      readonly standalone: boolean;
    };

/** Decides which open set a classified file joins, or that it starts a new one. */
export function placeFile(
  file: { readonly name: string; readonly classification: FileClassification },
  openSets: readonly OpenSetView[],
  rules: AssemblyRules,
): Placement {
  const listing = openSets.find((s) => s.manifestFiles?.includes(file.name) === true);
  if (listing !== undefined) return { kind: 'join', setId: listing.id };
  const { part, sampleId, sampleIdSource, role } = file.classification;
  const supporting = SUPPORTING_PARTS.includes(part);
  const sameSample = openSets.find(
    (s) =>
      s.sampleId === sampleId &&
      s.manifestFiles === undefined &&
      !s.files.some((f) => f.part === part) &&
      !isStandaloneRole(s.role),
  );
  if (supporting && sampleIdSource !== 'pattern') {
    // A supporting measurement that names no sample through its file name stands alone (and is
    // paired later), unless a set of that exact sample id is waiting for it.
    if (sameSample !== undefined) return { kind: 'join', setId: sameSample.id };
    return { kind: 'create', sampleId, role: PART_ROLE[part], standalone: true };
  }
  if (sameSample !== undefined) return { kind: 'join', setId: sameSample.id };
  const setRole = setRoleFor(sampleId, role, supporting ? 'emission' : part, rules);
  return { kind: 'create', sampleId, role: setRole, standalone: false };
}

function isStandaloneRole(role: MeasurementRole): boolean {
  return role === 'irf' || role === 'blank' || role === 'raman' || role === 'detector-curve';
}

/** The parts a set of `role` needs to be complete. */
export function requiredPartsFor(role: MeasurementRole, rules: AssemblyRules): readonly SetPart[] {
  if (role === 'reference') return rules.referenceRequiredParts;
  if (role === 'sample' || role === 'control') return rules.requiredParts;
  return [];
}

/** The parts a set already has (a decay with its own IRF column also supplies the IRF). */
export function partsPresent(files: OpenSetView['files']): Set<SetPart> {
  const parts = new Set<SetPart>();
  for (const f of files) {
    parts.add(f.part);
    if (f.part === 'decay' && f.hasIrfColumn) parts.add('irf');
  }
  return parts;
}

export interface Readiness {
  readonly ready: boolean;
  readonly reason: 'complete' | 'manifest-complete' | 'timeout' | 'waiting';
  /** Required parts the set does not have itself (to be paired, else reported missing). */
  readonly missingParts: readonly SetPart[];
}

/** Whether a set can be dispatched now: complete, its manifest's files all present, or past its deadline. */
export function setReadiness(set: OpenSetView, rules: AssemblyRules, now: Date): Readiness {
  const present = partsPresent(set.files);
  const missingParts = requiredPartsFor(set.role, rules).filter((p) => !present.has(p));
  if (set.manifestFiles !== undefined) {
    const have = new Set(set.files.map((f) => f.name));
    const allListed = set.manifestFiles.every((name) => have.has(name));
    if (allListed) return { ready: true, reason: 'manifest-complete', missingParts };
  } else if (missingParts.length === 0 && set.files.length > 0) {
    return { ready: true, reason: 'complete', missingParts };
  }
  if (now.getTime() >= set.deadlineAt.getTime()) return { ready: true, reason: 'timeout', missingParts };
  return { ready: false, reason: 'waiting', missingParts };
}

/** A candidate for pairing: a valid file of the wanted part from another set. */
export interface PairingCandidate {
  readonly fileId: number;
  readonly setId: string | null;
  readonly sampleId: string | null;
  /** When the measurement was taken (acquiredAt, else first seen). */
  readonly measuredAt: Date;
}

/** Picks the most recent candidate measured at or before `referenceTime` within `windowHours`; failing that, the earliest one after it within the window; undefined when none qualifies. */
export function choosePairing(
  candidates: readonly PairingCandidate[],
  referenceTime: Date,
  windowHours: number,
  options: { excludeSetId?: string; sampleId?: string } = {},
): PairingCandidate | undefined {
  const ref = referenceTime.getTime();
  const windowMs = windowHours * 3_600_000;
  let before: PairingCandidate | undefined;
  let after: PairingCandidate | undefined;
  for (const c of candidates) {
    if (options.excludeSetId !== undefined && c.setId === options.excludeSetId) continue;
    if (options.sampleId !== undefined && c.sampleId !== options.sampleId) continue;
    const t = c.measuredAt.getTime();
    if (!Number.isFinite(t) || Math.abs(t - ref) > windowMs) continue;
    if (t <= ref) {
      if (before === undefined || t > before.measuredAt.getTime()) before = c;
    } else if (after === undefined || t < after.measuredAt.getTime()) {
      after = c;
    }
  }
  return before ?? after;
}

/** A file-system-safe set id from the sample id and the first file's content hash. */
export function makeSetId(sampleId: string, firstSha256: string): string {
  const safe = sampleId.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 60) || 'set';
  return `${safe}-${firstSha256.slice(0, 12)}`;
}
