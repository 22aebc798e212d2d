// Set assembly against the ledger: takes a chunk of stable files (intake.ts hashes, reads and
// records or quarantines each), classifies the accepted ones and places them in open sets
// (assemble.ts decides, this module records the decision), all in one ledger transaction; a
// manifest opens its set and claims listed files waiting in other open sets. Keeps the in-memory
// view of open sets (open-sets.ts), rebuilt from the ledger when a transaction rolls back.
import { dirname } from 'node:path';
import type { Logger } from 'pino';
import type { MeasurementRole } from '../model/spectrum.js';
import type { SetPart } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { ParsedData } from '../formats/index.js';
import type { Ledger } from '../store/ledger.js';
import {
  assembleRecordedFile,
  getFile,
  insertAssembledFile,
  insertFileId,
  moveFileToSet,
  type FileFacts,
  type FileRecord,
} from '../store/files.js';
import { deleteOpenSet, getSet, insertSet } from '../store/sets.js';
import { reopenSet, replaceFileVersion, type NewContent } from '../store/file-versions.js';
import { findEarlierVersion, replacementReason } from './input-versions.js';
import { classifyFile, makeSetId, placeFile, type AssemblyRules } from './assemble.js';
import type { ContentCache } from './content-cache.js';
import { intakeFile, type Acquisition, type IntakeFile, type IntakeResult } from './intake.js';
import type { SetManifest } from './manifest.js';
import { fromRecord, OpenSets, toView, type OpenSet } from './open-sets.js';
import type { RunReport } from './run-report.js';

/** Files read per ledger transaction at intake; the event loop is yielded between chunks. */
export const INTAKE_CHUNK_FILES = 64;

/** Compiles the config's assembly rules (file-name, reference and control patterns; required parts; set timeout). */
export function assemblyRulesFrom(config: DriftlightConfig): AssemblyRules {
  return {
    fileNamePatterns: config.assembly.fileNamePatterns.map((p) => new RegExp(p, 'i')),
    referencePatterns: config.references.map((r) => new RegExp(r.sampleIdPattern)),
    controlPatterns: config.controls.map((r) => new RegExp(r.sampleIdPattern)),
    requiredParts: config.assembly.requiredParts,
    referenceRequiredParts: config.assembly.referenceRequiredParts,
    setTimeoutMs: config.assembly.setTimeoutMs,
  };
}

/** What one intake chunk did: the files to take again later (I/O or ledger error, logged) and the open sets it touched. */
export interface IntakeChunkResult {
  readonly failed: string[];
  readonly touched: OpenSet[];
}

export interface SetAssemblyOptions {
  readonly config: DriftlightConfig;
  readonly ledger: Ledger;
  readonly logger: Logger;
  readonly rules: AssemblyRules;
  /** Keeps the bytes of accepted data files until their set is dispatched. */
  readonly contents: ContentCache;
  readonly report: RunReport;
}

type AcceptedFile = Extract<IntakeResult, { kind: 'data' | 'manifest' }>;

export class SetAssembly {
  private openSets: OpenSets;

  constructor(private readonly options: SetAssemblyOptions) {
    this.openSets = OpenSets.load(options.ledger);
  }

  /** Open sets still assembling. */
  get size(): number {
    return this.openSets.size;
  }

  get(id: string): OpenSet | undefined {
    return this.openSets.get(id);
  }

  /** Forgets an open set (dispatched, or deleted empty). */
  delete(id: string): void {
    this.openSets.delete(id);
  }

  /** Rebuilds the view of open sets from the ledger. */
  reload(): void {
    this.openSets = OpenSets.load(this.options.ledger);
  }

  /** Every open set in dispatch order: supporting sets, then references, then samples (so samples of one batch can pair with the others), oldest first within each. */
  inDispatchOrder(): OpenSet[] {
    const order = (s: OpenSet): number => (s.standalone ? 0 : s.role === 'reference' ? 1 : 2);
    return this.openSets.all().sort((a, b) => order(a) - order(b));
  }

  /**
   * Takes stable files in order: each is hashed and read (bad ones quarantined), then the accepted
   * ones are recorded and placed in their sets in one ledger transaction. A crash leaves either
   * nothing of the chunk (the start-up scan reads its files again) or all of it.
   */
  intakeChunk(paths: readonly string[], now: Date): IntakeChunkResult {
    const { ledger, config, logger, report } = this.options;
    const failed: string[] = [];
    const accepted: AcceptedFile[] = [];
    const pending = new Map<string, { name: string; path: string }>();
    let rejected = 0;
    for (const path of paths) {
      let outcome: IntakeResult;
      try {
        outcome = intakeFile(ledger, config, path, now, pending);
      } catch (error) {
        logger.error({ file: path, err: error }, 'intake failed; the file stays in the inbox and is tried again later');
        failed.push(path);
        continue;
      }
      if (outcome.kind === 'rejected') {
        rejected += 1;
        logger.warn({ file: path }, 'input rejected and quarantined');
      } else if (outcome.kind === 'data' || outcome.kind === 'manifest') {
        accepted.push(outcome);
        pending.set(outcome.file.sha256, { name: outcome.file.name, path: outcome.file.path });
      }
    }
    report.filesTaken(0, rejected);
    if (accepted.length === 0) return { failed, touched: [] };
    const touched = new Set<OpenSet>();
    const recordedIds: number[] = [];
    try {
      ledger.transaction(() => {
        for (const item of accepted) {
          const fileId =
            item.kind === 'manifest'
              ? this.placeManifest(item.file, item.manifest, now, touched)
              : this.placeData(item.file, item.parsed, item.acquisition, now, touched);
          recordedIds.push(fileId);
        }
      });
    } catch (error) {
      // Rolled back: the in-memory view is rebuilt from the ledger; the files stay in the inbox.
      this.reload();
      logger.error(
        { files: accepted.map((a) => a.file.path), err: error },
        'intake failed; the files stay in the inbox and are tried again later',
      );
      return { failed: [...failed, ...accepted.map((a) => a.file.path)], touched: [] };
    }
    accepted.forEach((item, index) => {
      const fileId = recordedIds[index];
      if (fileId !== undefined && item.kind === 'data') this.options.contents.put(fileId, item.bytes);
    });
    report.filesTaken(accepted.length, 0);
    return { failed, touched: [...touched] };
  }

  /** Records a data file and places it in an open set (inside the intake transaction); returns its file id. */
  private placeData(
    file: IntakeFile,
    parsed: ParsedData,
    acquisition: Acquisition,
    now: Date,
    touched: Set<OpenSet>,
  ): number {
    const { ledger, rules } = this.options;
    const metadata = parsed.type === 'spectrum' ? parsed.spectrum.metadata : parsed.decay.metadata;
    const hasIrfColumn = parsed.type === 'decay' && parsed.decay.irfCounts !== undefined;
    const classification = classifyFile(
      {
        name: file.name,
        dataType: parsed.type,
        hasIrfColumn,
        ...(parsed.type === 'spectrum' ? { spectrumKind: parsed.spectrum.kind } : {}),
        ...(metadata.role === undefined ? {} : { metadataRole: metadata.role }),
        ...(metadata.sampleId === undefined ? {} : { metadataSampleId: metadata.sampleId }),
      },
      rules,
    );
    if (file.id === undefined) {
      // New bytes at the path of a recorded input of the same measurement: its new version (issue 20).
      const earlier = findEarlierVersion(
        ledger,
        { path: file.path, sampleId: classification.sampleId, dataType: parsed.type, acquisition },
        now,
        rules.setTimeoutMs,
      );
      if (earlier !== undefined) {
        const facts: FileFacts = {
          dataType: parsed.type,
          part: earlier.part,
          role: earlier.role,
          sampleId: classification.sampleId,
          acquiredAt: acquisition.acquiredAt,
          acquiredSource: acquisition.source,
          excitationNm: metadata.excitationNm ?? null,
          solvent: metadata.solvent ?? null,
          hasIrfColumn,
        };
        return this.placeNewVersion(earlier, file, facts, now, touched);
      }
    }
    const candidates = this.openSets
      .candidatesFor(classification.sampleId)
      .filter((s) => s.manifest === undefined || s.manifest.dir === dirname(file.path));
    const placement = placeFile({ name: file.name, classification }, candidates.map(toView), rules);
    let set: OpenSet;
    if (placement.kind === 'join') {
      const found = this.openSets.get(placement.setId);
      if (found === undefined) throw new Error(`open set ${placement.setId} vanished`);
      set = found;
    } else {
      const id = makeSetId(placement.sampleId, file.sha256);
      set = {
        id,
        sampleId: placement.sampleId,
        role: placement.role,
        createdAt: now,
        deadlineAt: new Date(now.getTime() + rules.setTimeoutMs),
        files: [],
        standalone: placement.standalone,
      };
      insertSet(ledger, {
        id: set.id,
        sampleId: set.sampleId,
        role: set.role,
        source: classification.sampleIdSource,
        createdAt: now,
        deadlineAt: set.deadlineAt,
      });
      this.openSets.add(set);
    }
    const listed = set.manifest?.manifest.files.find((f) => f.file === file.name);
    const part: SetPart = listed?.part ?? classification.part;
    const role: MeasurementRole = listed?.role ?? classification.role;
    const facts = {
      dataType: parsed.type,
      part,
      role,
      sampleId: classification.sampleId,
      acquiredAt: acquisition.acquiredAt,
      acquiredSource: acquisition.source,
      excitationNm: metadata.excitationNm ?? null,
      solvent: metadata.solvent ?? null,
      hasIrfColumn,
    };
    let fileId: number;
    if (file.id === undefined) {
      fileId = insertAssembledFile(ledger, file, facts, set.id, now);
    } else {
      fileId = file.id;
      assembleRecordedFile(ledger, fileId, facts, set.id, now);
    }
    set.files.push({ fileId, name: file.name, path: file.path, part, hasIrfColumn });
    touched.add(set);
    this.options.logger.debug({ setId: set.id, file: file.name, part }, 'file assembled');
    return fileId;
  }

  /**
   * Takes new content at the path of a recorded input (`earlier`) as that input's new version, inside
   * the caller's transaction: the earlier version is kept in file_versions, the file's row describes
   * the new content (at `keptAt` when it lies in the archive already), and its set is opened again
   * (when it was queued or done) to run once more. Returns the file id.
   */
  placeNewVersion(
    earlier: FileRecord,
    content: NewContent,
    facts: FileFacts,
    now: Date,
    touched: Set<OpenSet>,
    keptAt?: { archivePath: string },
  ): number {
    const { ledger, logger } = this.options;
    const setId = earlier.setId ?? '';
    const record = getSet(ledger, setId);
    if (record === undefined) throw new Error(`ledger: set ${setId} of file ${earlier.name} does not exist`);
    replaceFileVersion(ledger, earlier, content, replacementReason(record.state), now, keptAt);
    assembleRecordedFile(ledger, earlier.id, facts, setId, now);
    touched.add(this.reopen(setId, record.state, now));
    logger.warn(
      { setId, file: earlier.name, earlierSha256: earlier.sha256, sha256: content.sha256, setWas: record.state },
      'an input changed at its path after it was read: taken as a new version, the set runs again',
    );
    return earlier.id;
  }

  /** Opens set `setId` again (it was `state`), in the ledger and in the view (inside the caller's transaction); returns its open set. */
  reopen(setId: string, state: string, now: Date): OpenSet {
    const { ledger, rules } = this.options;
    if (state !== 'open') reopenSet(ledger, setId, new Date(now.getTime() + rules.setTimeoutMs));
    const known = this.openSets.get(setId);
    if (known !== undefined) return known;
    const reopened = getSet(ledger, setId);
    if (reopened === undefined) throw new Error(`ledger: set ${setId} vanished`);
    const set = fromRecord(ledger, reopened);
    this.openSets.add(set);
    return set;
  }

  /** Records a manifest, opens its set and claims listed files waiting in other open sets (inside the intake transaction); returns its file id. */
  private placeManifest(file: IntakeFile, manifest: SetManifest, now: Date, touched: Set<OpenSet>): number {
    const { ledger, rules } = this.options;
    const dir = dirname(file.path);
    const id = makeSetId(manifest.sampleId, file.sha256);
    const set: OpenSet = {
      id,
      sampleId: manifest.sampleId,
      role: manifest.role,
      createdAt: now,
      deadlineAt: new Date(now.getTime() + rules.setTimeoutMs),
      files: [],
      manifest: { dir, manifest },
      standalone: false,
    };
    const manifestJson = JSON.stringify(set.manifest);
    const fileId = file.id ?? insertFileId(ledger, file, now);
    insertSet(ledger, {
      id,
      sampleId: manifest.sampleId,
      role: manifest.role,
      source: 'manifest',
      createdAt: now,
      deadlineAt: set.deadlineAt,
      manifestJson,
    });
    assembleRecordedFile(
      ledger,
      fileId,
      {
        dataType: 'manifest',
        part: null,
        role: manifest.role,
        sampleId: manifest.sampleId,
        acquiredAt: null,
        excitationNm: manifest.excitationNm ?? null,
        solvent: manifest.solvent ?? null,
        hasIrfColumn: false,
      },
      id,
      now,
    );
    // Claim listed files already waiting in other open sets. Only plain sets give files up: a
    // manifest set keeps what its own manifest lists, and lives until complete or timed out, even
    // while it has no files yet (issue 20: a second manifest deleted the first's empty set).
    for (const other of this.openSets.all()) {
      if (other.manifest !== undefined) continue;
      let claimed = 0;
      for (const member of [...other.files]) {
        const listed = manifest.files.find((f) => f.file === member.name);
        if (listed === undefined || dirname(member.path) !== dir) continue;
        const record = getFile(ledger, member.fileId);
        if (record === undefined) continue;
        moveFileToSet(ledger, member.fileId, id, listed.part, listed.role ?? null);
        other.files.splice(other.files.indexOf(member), 1);
        set.files.push({ ...member, part: listed.part });
        claimed += 1;
      }
      if (claimed > 0 && other.files.length === 0) {
        deleteOpenSet(ledger, other.id);
        this.openSets.delete(other.id);
        touched.delete(other);
      }
    }
    this.openSets.add(set);
    touched.add(set);
    this.options.logger.info({ setId: id, files: manifest.files.length }, 'manifest received');
    return fileId;
  }
}
