// Taking changed inputs again (issue 20; the checks are in input-versions.ts): an input found
// changed on disk at commit is taken again once it has been stable for the stability window, and a
// file moved to the archive is looked at once more archiveRecheckMs later (a writer that held it
// open and paused goes on writing into the archived copy; after a restart, files archived shortly
// before are looked at). Either way the new bytes become the file's new version and its set runs
// again; a new version that intake rejects (or a file gone) makes the set run without that input.
import { readFileSync, statSync } from 'node:fs';
import type { Logger } from 'pino';
import type { DriftlightConfig } from '../config/resolve.js';
import type { Ledger } from '../store/ledger.js';
import { filesByPath, getFile, setFileError, setFileLocation, type FileFacts } from '../store/files.js';
import { getSet } from '../store/sets.js';
import { recentlyArchivedFiles, replaceFileVersion } from '../store/file-versions.js';
import type { ArchivedFile } from './commit.js';
import {
  archiveRecheckMs,
  changedSinceArchived,
  replacementReason,
  sha256OfPath,
  statArchived,
} from './input-versions.js';
import type { JobDispatcher } from './job-dispatcher.js';
import type { OpenSet } from './open-sets.js';
import type { SetAssembly } from './set-assembly.js';
import { StableFiles } from './stable-files.js';

export interface VersionWatchOptions {
  readonly config: DriftlightConfig;
  readonly ledger: Ledger;
  readonly logger: Logger;
  readonly clock: () => Date;
  readonly assembly: SetAssembly;
  readonly dispatcher: JobDispatcher;
  /** The coordinator's intake (records the new version through set assembly, dispatches). */
  readonly intake: (paths: readonly string[]) => Promise<unknown>;
}

export class VersionWatch {
  /** Inputs found changed at commit, until stable. */
  private readonly retakes: StableFiles;
  /** Intakes of retaken inputs under way. */
  private retaking = 0;
  /** Archived copies that changed after their move, until stable; the file id of each. */
  private readonly archivedChanges: StableFiles;
  private readonly archivedIds = new Map<string, number>();

  constructor(private readonly options: VersionWatchOptions) {
    const { watch } = options.config;
    this.retakes = new StableFiles(
      watch.stabilityWindowMs,
      watch.pollIntervalMs,
      (path) => {
        this.retaking += 1;
        this.retake(path)
          .catch((error: unknown) =>
            options.logger.error(
              { file: path, err: error },
              'intake of a changed input failed; it is taken at the next start',
            ),
          )
          .finally(() => {
            this.retaking -= 1;
          });
      },
      Date.now,
      (error, path) =>
        options.logger.error(
          { file: path, err: error },
          'a changed input could not be looked at; it is taken at the next start',
        ),
    );
    this.archivedChanges = new StableFiles(
      watch.stabilityWindowMs,
      watch.pollIntervalMs,
      (path) => this.takeArchivedVersion(path),
      Date.now,
      (error, path) =>
        options.logger.error({ file: path, err: error }, 'a changed archived copy could not be looked at'),
    );
  }

  /** Whether changed inputs wait to be taken again (drain waits for them: their sets are still queued). */
  get busy(): boolean {
    return this.retakes.size > 0 || this.retaking > 0;
  }

  /** Takes `paths` again once each has been stable for the stability window. */
  retakeWhenStable(paths: readonly string[]): void {
    for (const path of paths) this.retakes.touch(path);
  }

  /** Looks once more at files just archived, archiveRecheckMs later: a copy changed since is taken as a new version once stable. */
  recheckLater(moves: readonly ArchivedFile[]): void {
    if (moves.length === 0) return;
    const stats = statArchived(moves);
    const timer = setTimeout(() => {
      for (const changed of changedSinceArchived(stats)) this.watchArchived(changed.path, changed.fileId);
    }, archiveRecheckMs(this.options.config.watch.stabilityWindowMs));
    timer.unref();
  }

  /**
   * At start: files archived within archiveRecheckMs before a crash or stop lost their pending look
   * (recheckLater is in memory). One whose size is no longer the recorded one is taken as a new
   * version once stable; the others are looked at once more later.
   */
  recheckRecentlyArchived(): void {
    const since = new Date(
      this.options.clock().getTime() - archiveRecheckMs(this.options.config.watch.stabilityWindowMs),
    ).toISOString();
    const unchanged: ArchivedFile[] = [];
    for (const file of recentlyArchivedFiles(this.options.ledger, since)) {
      const path = file.archivePath ?? '';
      const stat = statSync(path, { throwIfNoEntry: false });
      if (stat === undefined) continue;
      if (stat.size !== file.sizeBytes) this.watchArchived(path, file.id);
      else unchanged.push({ id: file.id, archivePath: path });
    }
    this.recheckLater(unchanged);
  }

  /** Stops the timers (pending rechecks are dropped: the next start looks at recent archive moves). */
  close(): void {
    this.retakes.close();
    this.archivedChanges.close();
  }

  private watchArchived(path: string, fileId: number): void {
    this.archivedIds.set(path, fileId);
    this.archivedChanges.touch(path);
  }

  /**
   * Takes an input found changed at commit again, now that it is stable: intake records it as the
   * new version of its file and its set runs again. When the new content is not usable (rejected and
   * quarantined by intake, or gone), the file's earlier version is replaced by that: the file is
   * recorded rejected with the reason and the set runs again without it (a partial result that
   * names the part missing), instead of waiting forever for a version that will not come.
   */
  private async retake(path: string): Promise<void> {
    const { ledger, assembly, dispatcher, clock, logger } = this.options;
    const earlier = filesByPath(ledger, path);
    const before = new Set(earlier.map((f) => f.id));
    const setIds = new Set(earlier.map((f) => f.setId).filter((id) => id !== null));
    await this.options.intake([path]);
    // Taken as a new version: its set is open again; batch mode (holdDispatch) dispatches it here.
    const reopened = [...setIds].map((id) => assembly.get(id)).filter((s) => s !== undefined);
    if (reopened.length > 0) {
      await dispatcher.dispatchReady(reopened, clock(), true);
      return;
    }
    const records = filesByPath(ledger, path);
    const waiting = records.find(
      (f) => f.setId !== null && f.state === 'queued' && f.archivePath === null && f.quarantinePath === null,
    );
    const set = waiting?.setId === null || waiting?.setId === undefined ? undefined : getSet(ledger, waiting.setId);
    if (waiting === undefined || set === undefined || set.state !== 'queued') return;
    if (sha256OfPath(path) === waiting.sha256) return;
    const rejected = records.find((f) => !before.has(f.id) && f.state === 'rejected');
    const error =
      rejected === undefined
        ? { code: 'INPUT_MISSING', message: `${waiting.name} changed after it was read and is no longer at ${path}` }
        : {
            code: rejected.errorCode ?? 'INPUT_REJECTED',
            message: `${waiting.name} changed after it was read and its new version was rejected: ${rejected.errorMessage ?? ''}`,
          };
    const now = clock();
    const touched = new Set<OpenSet>();
    try {
      ledger.transaction(() => {
        replaceFileVersion(
          ledger,
          waiting,
          { sha256: rejected?.sha256 ?? waiting.sha256, sizeBytes: rejected?.sizeBytes ?? 0 },
          replacementReason('queued'),
          now,
        );
        setFileError(ledger, waiting.id, 'rejected', error, now);
        if (rejected !== undefined && rejected.quarantinePath !== null)
          setFileLocation(ledger, waiting.id, { quarantinePath: rejected.quarantinePath }, now);
        touched.add(assembly.reopen(set.id, set.state, now));
      });
    } catch (failure) {
      assembly.reload();
      throw failure;
    }
    logger.warn(
      { setId: set.id, file: waiting.name, code: error.code },
      'an input changed after it was read and its new version is not usable: the set runs again without it',
    );
    await dispatcher.dispatchReady([...touched], now, true);
  }

  /** Takes an archived copy that changed after its move (a writer that held the file open) as the new version of its file. */
  private takeArchivedVersion(path: string): void {
    const { ledger, assembly, dispatcher, clock, logger } = this.options;
    const fileId = this.archivedIds.get(path);
    this.archivedIds.delete(path);
    if (fileId === undefined) return;
    try {
      const earlier = getFile(ledger, fileId);
      if (
        earlier === undefined ||
        earlier.archivePath !== path ||
        earlier.setId === null ||
        earlier.dataType === null ||
        earlier.dataType === 'manifest'
      )
        return;
      const sha256 = sha256OfPath(path);
      if (sha256 === undefined || sha256 === earlier.sha256) return;
      const sizeBytes = readFileSync(path).byteLength;
      const now = clock();
      const touched = new Set<OpenSet>();
      const facts: FileFacts = {
        dataType: earlier.dataType,
        part: earlier.part,
        role: earlier.role,
        sampleId: earlier.sampleId,
        acquiredAt: earlier.acquiredAt,
        acquiredSource: earlier.acquiredSource,
        excitationNm: earlier.excitationNm,
        solvent: earlier.solvent,
        hasIrfColumn: earlier.hasIrfColumn,
      };
      ledger.transaction(() =>
        assembly.placeNewVersion(earlier, { sha256, sizeBytes }, facts, now, touched, { archivePath: path }),
      );
      void dispatcher
        .dispatchReady([...touched], now, true)
        .catch((error: unknown) =>
          logger.error({ err: error }, 'dispatch after a new input version failed; it is dispatched at the next tick'),
        );
    } catch (error) {
      assembly.reload();
      logger.error({ file: path, err: error }, 'an archived input changed after its move but could not be taken again');
    }
  }
}
