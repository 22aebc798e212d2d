// Taking changed inputs again (issue 20; the checks are in input-versions.ts): an input found
// changed on disk at commit is taken again once it has been stable for the stability window, and a
// file moved to the archive is looked at for archiveRecheckMs of running time after its move (a
// writer that held it open and paused goes on writing into the archived copy). The files to look at
// are listed in the ledger (archive_rechecks, written in the commit's transaction before the move),
// so a crash or stop loses none: at start each file still listed gets a full window again. Either
// way the new bytes become the file's new version and its set runs again; a new version that intake
// rejects (or a file gone) makes the set run without that input.
import { readFileSync, statSync } from 'node:fs';
import type { Logger } from 'pino';
import type { DriftlightConfig } from '../config/resolve.js';
import type { Ledger } from '../store/ledger.js';
import { filesByPath, getFile, setFileError, setFileLocation, type FileFacts } from '../store/files.js';
import { getSet } from '../store/sets.js';
import { archiveRechecks, removeArchiveRechecks, replaceFileVersion } from '../store/file-versions.js';
import type { ArchivedFile } from './commit.js';
import { archiveRecheckIntervalMs, archiveRecheckMs, replacementReason, sha256OfPath } from './input-versions.js';
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
  /** End of the re-check window of each listed archived file (epoch ms), by file id, with the listing it belongs to. */
  private readonly windows = new Map<number, { addedAt: string; untilMs: number }>();
  private recheckTimer: NodeJS.Timeout | undefined;
  private closed = false;

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

  /** Whether changed inputs (in the inbox or the archive) wait to be taken again (drain waits for them: their sets may still be queued). */
  get busy(): boolean {
    return this.retakes.size > 0 || this.retaking > 0 || this.archivedChanges.size > 0;
  }

  /** Takes `paths` again once each has been stable for the stability window. */
  retakeWhenStable(paths: readonly string[]): void {
    for (const path of paths) this.retakes.touch(path);
  }

  /**
   * Starts looking at the files listed for an archive re-check (at start: each gets a full window
   * from now), every archiveRecheckIntervalMs: one stat each while its window lasts. A file whose
   * size is no longer the recorded one is taken, once stable, as a new version; when its window
   * ends, its sha256 is compared too (a change of the same size) and the listing is removed.
   */
  startArchiveRechecks(): void {
    if (this.closed || this.recheckTimer !== undefined) return;
    const { watch } = this.options.config;
    this.recheckArchived();
    this.recheckTimer = setInterval(
      () => this.recheckArchived(),
      archiveRecheckIntervalMs(watch.stabilityWindowMs, watch.pollIntervalMs),
    );
    this.recheckTimer.unref();
  }

  /** Archived inputs found changed at commit (taken again from their archived copy): taken as a new version once stable. */
  takeArchivedWhenStable(files: readonly ArchivedFile[]): void {
    for (const file of files) this.watchArchived(file.archivePath, file.id);
  }

  /** Stops the timers (the files listed for a re-check stay listed: the next start looks at them). */
  close(): void {
    this.closed = true;
    if (this.recheckTimer !== undefined) clearInterval(this.recheckTimer);
    this.recheckTimer = undefined;
    this.retakes.close();
    this.archivedChanges.close();
  }

  /** One look at every file listed for an archive re-check (see startArchiveRechecks); a failure is logged and the next look tries again. */
  private recheckArchived(): void {
    if (this.closed) return;
    const { ledger, config, logger } = this.options;
    try {
      const nowMs = Date.now();
      const windowMs = archiveRecheckMs(config.watch.stabilityWindowMs);
      const finished: { id: number; addedAt: string }[] = [];
      const listed = new Set<number>();
      for (const file of archiveRechecks(ledger)) {
        listed.add(file.id);
        // Taken again (a new version, a rejection): its set's next commit lists it again if it is archived then.
        if (file.state !== 'done') {
          finished.push(file);
          continue;
        }
        // Not moved yet (an archive outage): its window starts once the move is recorded.
        if (file.archivePath === null || this.archivedIds.has(file.archivePath)) continue;
        let window = this.windows.get(file.id);
        if (window?.addedAt !== file.addedAt) {
          window = { addedAt: file.addedAt, untilMs: nowMs + windowMs };
          this.windows.set(file.id, window);
        }
        const stat = statSync(file.archivePath, { throwIfNoEntry: false });
        if (stat === undefined) {
          finished.push(file);
        } else if (stat.size !== file.sizeBytes) {
          this.watchArchived(file.archivePath, file.id);
        } else if (nowMs >= window.untilMs) {
          if (sha256OfPath(file.archivePath) === file.sha256) finished.push(file);
          else this.watchArchived(file.archivePath, file.id);
        }
      }
      for (const id of this.windows.keys()) if (!listed.has(id)) this.windows.delete(id);
      for (const file of finished) this.windows.delete(file.id);
      removeArchiveRechecks(ledger, finished);
    } catch (error) {
      logger.error({ err: error }, 'archived inputs could not be looked at again; tried again shortly');
    }
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
