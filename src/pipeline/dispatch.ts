// Turning a ready set into a job: choose pairings for missing parts (most recent valid IRF, blank,
// absorbance, reference standard within their windows) and build the self-contained payload.
import { readFileSync } from 'node:fs';
import { InputRejected } from '../model/errors.js';
import type { MeasurementRole } from '../model/spectrum.js';
import type { AnalysisJobPayload, PayloadFile } from '../analysis/payload.js';
import type { Reanalysis, SetPart } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { Ledger } from '../store/ledger.js';
import {
  decayIrfCandidates,
  filesOfSet,
  getFile,
  pairingCandidates,
  type AcquiredSource,
  type FileRecord,
  type PairingFile,
} from '../store/files.js';
import { acquisitionEpochMs, isoFromEpochMs } from '../model/acquisition-time.js';
import {
  getSet,
  pairingsOfSet,
  recentReferenceSetIds,
  referenceSetIdsMeasuredBetween,
  type PairingRecord,
} from '../store/sets.js';
import { choosePairing, requiredPartsFor, type AssemblyRules, type PairingCandidate } from './assemble.js';
import type { StoredManifest } from './open-sets.js';
import { findArchivedCopy } from './recovery.js';
import { analysisSettingsFrom } from './settings.js';
import { decodeInputText } from '../formats/index.js';

const SAMPLE_ROLES = new Set<string>(['sample', 'control']);

/** When a file was measured: its stored acquisition time (read by the one reader), else when it was first seen (rows recorded before acquisition times were stored canonically). */
function measuredAt(file: PairingFile): Date {
  const acquired = file.acquiredAt === null ? undefined : acquisitionEpochMs(file.acquiredAt);
  return new Date(acquired ?? acquisitionEpochMs(file.firstSeenAt) ?? 0);
}

function toCandidate(file: PairingFile): PairingCandidate {
  return { fileId: file.id, setId: file.setId, sampleId: file.sampleId, measuredAt: measuredAt(file) };
}

/** Parts to borrow for a set and the required parts that stay missing (with reasons); `own` is the set's own files when the caller has already read them. */
export function choosePairings(
  ledger: Ledger,
  config: DriftlightConfig,
  rules: AssemblyRules,
  set: { id: string; sampleId: string; role: MeasurementRole },
  present: ReadonlySet<SetPart>,
  now: Date,
  own: readonly FileRecord[] = filesOfSet(ledger, set.id),
): { pairings: PairingRecord[]; missing: { part: SetPart; reason: string }[] } {
  const pairings: PairingRecord[] = [];
  const windows = config.assembly.pairingWindowHours;
  const referenceTime = setMeasuredAt(own) ?? now;
  const borrow = (
    part: SetPart,
    candidates: readonly PairingFile[],
    windowHours: number,
    sameSample = false,
  ): boolean => {
    const chosen = choosePairing(candidates.map(toCandidate), referenceTime, windowHours, {
      excludeSetId: set.id,
      ...(sameSample ? { sampleId: set.sampleId } : {}),
    });
    if (chosen === undefined) return false;
    pairings.push({ setId: set.id, part, fileId: chosen.fileId, fromSetId: chosen.setId });
    return true;
  };
  const borrowed = new Set<SetPart>();
  if (SAMPLE_ROLES.has(set.role) || set.role === 'reference') {
    if (!present.has('irf') && present.has('decay')) {
      const hours = config.instrument.irfValidityHours;
      const candidates = [...pairingCandidates(ledger, 'irf'), ...decayIrfCandidates(ledger)];
      if (borrow('irf', candidates, hours)) borrowed.add('irf');
    }
    if (!present.has('blank') && windows.blank > 0 && present.has('emission')) {
      if (borrow('blank', pairingCandidates(ledger, 'blank'), windows.blank)) borrowed.add('blank');
    }
    if (!present.has('absorbance') && windows.absorbance > 0) {
      if (borrow('absorbance', pairingCandidates(ledger, 'absorbance'), windows.absorbance, true))
        borrowed.add('absorbance');
    }
  }
  if (SAMPLE_ROLES.has(set.role) && !present.has('reference-emission') && windows.reference > 0) {
    // The reference of the set's own session first (issue 16.4), else the most recent within the window.
    const sessionHours = Math.min(config.assembly.referenceSessionHours, windows.reference);
    const reference =
      (sessionHours > 0 ? referenceSetNear(ledger, referenceTime, sessionHours, set.id) : undefined) ??
      referenceSetNear(ledger, referenceTime, windows.reference, set.id);
    if (reference !== undefined) {
      pairings.push({
        setId: set.id,
        part: 'reference-emission',
        fileId: reference.emission.id,
        fromSetId: reference.setId,
      });
      borrowed.add('reference-emission');
      if (!present.has('reference-absorbance') && reference.absorbance !== undefined) {
        pairings.push({
          setId: set.id,
          part: 'reference-absorbance',
          fileId: reference.absorbance.id,
          fromSetId: reference.setId,
        });
        borrowed.add('reference-absorbance');
      }
    }
  }
  const missing = requiredPartsFor(set.role, rules)
    .filter((p) => !present.has(p) && !borrowed.has(p))
    .map((part) => ({
      part,
      reason: `no ${part} arrived with the set${part === 'irf' || part === 'blank' ? ' and none valid was recorded within the pairing window' : ''}`,
    }));
  return { pairings, missing };
}

/** When a set was measured: the earliest acquisition time of its own files (`own`), if any says. */
function setMeasuredAt(own: readonly FileRecord[]): Date | undefined {
  const acquisition = setAcquisition(own);
  return acquisition === undefined ? undefined : new Date(acquisition.epochMs);
}

/** A set's acquisition time: the earliest of its own files' (metadata before modification times), with where it came from. */
export function setAcquisition(
  own: readonly FileRecord[],
): { epochMs: number; acquiredAt: string; source: AcquiredSource } | undefined {
  let chosen: { epochMs: number; acquiredAt: string; source: AcquiredSource } | undefined;
  for (const file of own) {
    if (file.acquiredAt === null || file.dataType === 'manifest' || file.state === 'rejected') continue;
    const epochMs = acquisitionEpochMs(file.acquiredAt);
    if (epochMs === undefined) continue;
    const source: AcquiredSource = file.acquiredSource ?? 'metadata';
    const better =
      chosen === undefined ||
      (source === 'metadata' && chosen.source !== 'metadata') ||
      (source === chosen.source && epochMs < chosen.epochMs);
    if (better) chosen = { epochMs, acquiredAt: isoFromEpochMs(epochMs), source };
  }
  return chosen;
}

/**
 * Whether a set of `role` with these parts borrows a reference standard and so waits for the one of
 * its session (issue 16.4): a sample or control with an emission and no reference of its own, when
 * references are configured and assembly.referenceSessionHours and pairingWindowHours.reference are on.
 */
export function needsSessionReference(config: DriftlightConfig, role: string, present: ReadonlySet<SetPart>): boolean {
  return (
    SAMPLE_ROLES.has(role) &&
    present.has('emission') &&
    !present.has('reference-emission') &&
    config.references.length > 0 &&
    config.assembly.referenceSessionHours > 0 &&
    config.assembly.pairingWindowHours.reference > 0
  );
}

/** The reference set (queued or done) measured within assembly.referenceSessionHours of `measuredAt`, nearest before it, else nearest after; undefined when none. */
export function sessionReferenceSetId(
  ledger: Ledger,
  config: DriftlightConfig,
  measuredAt: Date,
  excludeSetId: string,
): string | undefined {
  const hours = Math.min(config.assembly.referenceSessionHours, config.assembly.pairingWindowHours.reference);
  return hours > 0 ? referenceSetNear(ledger, measuredAt, hours, excludeSetId)?.setId : undefined;
}

/** When a set was measured (its own files), else `fallback`. */
export function setMeasuredAtOr(own: readonly FileRecord[], fallback: Date): Date {
  return setMeasuredAt(own) ?? fallback;
}

/** The reference set measured within `windowHours` of `referenceTime`: the most recent at or before it, else the earliest after it (choosePairing). */
function referenceSetNear(
  ledger: Ledger,
  referenceTime: Date,
  windowHours: number,
  excludeSetId: string,
): { setId: string; emission: FileRecord; absorbance?: FileRecord } | undefined {
  const found = new Map<number, { setId: string; emission: FileRecord; absorbance?: FileRecord }>();
  // The newest reference sets (by arrival), and every one measured within the window: in a backlog
  // the reference of a control's own session may be older than the newest few.
  const windowMs = windowHours * 3_600_000;
  const measuredNear = referenceSetIdsMeasuredBetween(
    ledger,
    excludeSetId,
    isoFromEpochMs(referenceTime.getTime() - windowMs),
    isoFromEpochMs(referenceTime.getTime() + windowMs),
  );
  for (const setId of new Set([...recentReferenceSetIds(ledger, excludeSetId), ...measuredNear])) {
    const files = filesOfSet(ledger, setId).filter((f) => f.state !== 'rejected' && f.state !== 'failed');
    const emission = files.find((f) => f.part === 'emission');
    if (emission === undefined) continue;
    const absorbance = files.find((f) => f.part === 'absorbance');
    found.set(emission.id, { setId, emission, ...(absorbance === undefined ? {} : { absorbance }) });
  }
  const chosen = choosePairing(
    [...found.values()].map((r) => toCandidate(r.emission)),
    referenceTime,
    windowHours,
  );
  return chosen === undefined ? undefined : found.get(chosen.fileId);
}

/** A file's text as a payload carries it (decodeInputText: UTF-16 as the readers see it, UTF-8 when valid, else Latin-1). */
export function readText(path: string): string {
  return decodeInputText(readFileSync(path));
}

/**
 * The text of a recorded input where it is now; INPUT_MISSING when it is no longer there (moved or
 * deleted by hand). A done file not at its recorded place may be in the middle of its archive move
 * (moved, the record of where not yet written, as a commit running at the same moment leaves it), so
 * its archive folder is searched for the copy with its sha256 (findArchivedCopy) before giving up.
 */
function readInput(config: DriftlightConfig, file: FileRecord): string {
  const location = currentLocation(file);
  try {
    return readText(location);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
    const moved =
      file.archivePath === null && file.quarantinePath === null ? findArchivedCopy(config, file) : undefined;
    if (moved !== undefined) return readText(moved);
    throw new InputRejected('INPUT_MISSING', `${file.name} is no longer at ${location}`, { file: file.name });
  }
}

/** Where a file is now: its archive copy once moved, else where it was seen. */
export function currentLocation(file: FileRecord): string {
  return file.archivePath ?? file.quarantinePath ?? file.path;
}

/** The reference standard of a reference set: its manifest's standardId or the matching references[] entry. */
export function standardForSet(
  config: DriftlightConfig,
  setId: string,
  ledger: Ledger,
): { standardId: string; entry?: DriftlightConfig['references'][number] } | undefined {
  const set = getSet(ledger, setId);
  if (set === undefined) return undefined;
  const manifest = set.manifestJson === null ? undefined : (JSON.parse(set.manifestJson) as StoredManifest).manifest;
  const entry = config.references.find((r) => new RegExp(r.sampleIdPattern).test(set.sampleId));
  const standardId = manifest?.standardId ?? entry?.standardId;
  return standardId === undefined ? undefined : { standardId, ...(entry === undefined ? {} : { entry }) };
}

export interface PayloadContext {
  readonly ledger: Ledger;
  readonly config: DriftlightConfig;
  readonly configHash: string;
  readonly softwareVersion: string;
  readonly rules: AssemblyRules;
  readonly detectorCurve?: PayloadFile;
  readonly now: Date;
  /** The bytes of an own file read at intake, if still held (see ContentCache); else the file is read from disk. */
  readonly contentOf?: (file: FileRecord) => Uint8Array | undefined;
  /** The set's own files when the caller has just read them (the dispatch transaction), else they are read here. */
  readonly ownFiles?: readonly FileRecord[];
  /** Set for a re-analysis of a set that already has a result (goes into provenance.reanalysis). */
  readonly reanalysis?: Reanalysis;
}

/** Builds the job payload of a set from the ledger (own files, stored pairings, manifest facts); throws InputRejected INPUT_MISSING when an input is gone. */
export function buildPayload(context: PayloadContext, setId: string): AnalysisJobPayload {
  const { ledger, config } = context;
  const set = getSet(ledger, setId);
  if (set === undefined) throw new Error(`ledger: set ${setId} does not exist`);
  const manifest = set.manifestJson === null ? undefined : (JSON.parse(set.manifestJson) as StoredManifest).manifest;
  const files: PayloadFile[] = [];
  const own = context.ownFiles ?? filesOfSet(ledger, setId);
  for (const file of own) {
    if (file.dataType === 'manifest' || file.part === null || file.state === 'rejected') continue;
    const held = context.contentOf?.(file);
    const content = held === undefined ? readInput(config, file) : decodeInputText(held);
    files.push({
      name: file.name,
      sha256: file.sha256,
      part: file.part as SetPart,
      role: (file.role ?? 'sample') as MeasurementRole,
      origin: 'own',
      content,
    });
  }
  let referenceSetId: string | undefined;
  for (const pairing of pairingsOfSet(ledger, setId)) {
    const file = getFile(ledger, pairing.fileId);
    if (file === undefined) continue;
    if (pairing.part === 'reference-emission') referenceSetId = pairing.fromSetId ?? undefined;
    files.push({
      name: file.name,
      sha256: file.sha256,
      part: pairing.part as SetPart,
      role: (file.role ?? 'sample') as MeasurementRole,
      origin: 'paired',
      ...(pairing.fromSetId === null ? {} : { pairedFromSetId: pairing.fromSetId }),
      content: readInput(config, file),
    });
  }
  if (context.detectorCurve !== undefined && !files.some((f) => f.part === 'detector-curve'))
    files.push(context.detectorCurve);
  const role = set.role as MeasurementRole;
  const have = new Set<SetPart>(files.map((f) => f.part));
  if (own.some((f) => f.part === 'decay' && f.hasIrfColumn)) have.add('irf');
  const missingParts = requiredPartsFor(role, context.rules)
    .filter((part) => !have.has(part))
    .map((part) => ({
      part,
      reason: `no ${part} arrived with the set${part === 'irf' || part === 'blank' ? ' and none valid was recorded within the pairing window' : ''}`,
    }));
  const acquisition = setAcquisition(own);
  const reference =
    referenceSetId !== undefined
      ? standardForSet(config, referenceSetId, ledger)
      : role === 'reference'
        ? standardForSet(config, setId, ledger)
        : undefined;
  return {
    setId,
    role,
    sampleId: set.sampleId,
    sampleInfo: {
      ...(manifest?.solvent === undefined ? {} : { solvent: manifest.solvent }),
      ...(manifest?.excitationNm === undefined ? {} : { excitationNm: manifest.excitationNm }),
      ...(manifest?.standardId === undefined ? {} : { standardId: manifest.standardId }),
    },
    files,
    missingParts,
    settings: analysisSettingsFrom(config, reference),
    ...(acquisition === undefined
      ? {}
      : { acquisition: { acquiredAt: acquisition.acquiredAt, source: acquisition.source } }),
    analyzedAt: context.now.toISOString(),
    ...(context.reanalysis === undefined ? {} : { reanalysis: context.reanalysis }),
    configHash: context.configHash,
    softwareVersion: context.softwareVersion,
  };
}
