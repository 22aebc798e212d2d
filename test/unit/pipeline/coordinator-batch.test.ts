// The coordinator's batched paths, in process (no CLI): stable files taken many at a time, the
// payload built from the bytes hashed at intake, finished sets committed as a group.
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { openPipeline, type Pipeline } from '../../../src/pipeline/runtime.js';
import { generateSet } from '../../integration/pipeline-helpers.js';

const opened: { pipeline: Pipeline; dir: string }[] = [];

afterEach(async () => {
  for (const { pipeline, dir } of opened.splice(0)) {
    await pipeline.close();
    if (dir !== '') rmSync(dir, { recursive: true, force: true });
  }
});

/** A pipeline on a temp workspace (or on `existing` again); dispatch held (batch mode) so a test decides when sets go out. */
function start(existing?: string): { pipeline: Pipeline; inbox: string; dir: string } {
  const dir = existing ?? mkdtempSync(join(tmpdir(), 'dl-coord-'));
  const config = resolveConfig(
    {
      assembly: { setTimeoutMs: 600_000 },
      queue: { concurrency: 2 },
      logging: { level: 'warn', stdout: 'off' },
    },
    { baseDir: dir },
  );
  const pipeline = openPipeline(config, { softwareVersion: 'test', logger: pino({ level: 'silent' }) });
  pipeline.coordinator.holdDispatch = true;
  opened.push({ pipeline, dir: existing === undefined ? dir : '' });
  mkdirSync(config.folders.inbox, { recursive: true });
  return { pipeline, inbox: config.folders.inbox, dir };
}

function drop(inbox: string, files: readonly { name: string; content: string }[]): string[] {
  return files.map((f) => {
    const path = join(inbox, f.name);
    writeFileSync(path, f.content);
    return path;
  });
}

function filesUnder(dir: string): string[] {
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => e.name)
    .sort();
}

describe('coordinator batches', () => {
  it('quarantines the second of two identical files taken in the same batch as a duplicate of the first', async () => {
    const { pipeline, inbox, dir } = start();
    const set = generateSet('dup-01', 11);
    const emission = set.files[0];
    if (emission === undefined) throw new Error('no emission file');
    const paths = drop(inbox, [...set.files, { name: 'dup-01_em-copy.csv', content: emission.content }]);
    await pipeline.coordinator.intakeMany(paths);
    expect(pipeline.coordinator.counts).toMatchObject({ filesAccepted: 3, filesRejected: 1 });
    const records = filesUnder(join(dir, 'quarantine')).filter((n) => n.endsWith('.error.json'));
    expect(records).toEqual(['dup-01_em-copy.csv.error.json']);
    const record = JSON.parse(
      readFileSync(join(dir, 'quarantine', readdirSync(join(dir, 'quarantine'))[0] ?? '', records[0] ?? ''), 'utf8'),
    ) as { code: string; message: string };
    expect(record.code).toBe('DUPLICATE_INPUT');
    expect(record.message).toContain(emission.name);
  });

  it('does not commit a result from bytes that changed on disk after intake: a usable new version runs the set again, one result', async () => {
    const { pipeline, inbox, dir } = start();
    const set = generateSet('held-02', 13);
    const paths = drop(inbox, set.files);
    await pipeline.coordinator.intakeMany(paths);
    const decayIndex = set.files.findIndex((f) => f.name.includes('decay'));
    const decayPath = paths[decayIndex] ?? '';
    const before = pipeline.ledger.database.prepare(`SELECT sha256 FROM files WHERE path = ?`).get(decayPath) as {
      sha256: string;
    };
    // Re-exported after it was taken (same sample, same acquisition time, new bytes).
    const newer = generateSet('held-02', 14).files[decayIndex]?.content ?? '';
    writeFileSync(decayPath, newer);
    const committed: string[] = [];
    pipeline.coordinator.onCommitted((_id, path) => {
      if (path !== undefined) committed.push(path);
    });
    await pipeline.coordinator.tick(true);
    await pipeline.coordinator.drain();
    expect(committed).toHaveLength(1);
    const result = JSON.parse(readFileSync(committed[0] ?? '', 'utf8')) as {
      partial: boolean;
      provenance: { inputs: { file: string; sha256: string }[]; supersededInputs?: { sha256: string }[] };
    };
    const recorded = pipeline.ledger.database.prepare(`SELECT sha256 FROM files WHERE path = ?`).all(decayPath) as {
      sha256: string;
    }[];
    expect(recorded).toHaveLength(1);
    expect(recorded[0]?.sha256).not.toBe(before.sha256);
    expect(result.provenance.inputs.find((i) => i.file === set.files[decayIndex]?.name)?.sha256).toBe(
      recorded[0]?.sha256,
    );
    expect(result.provenance.supersededInputs?.map((v) => v.sha256)).toEqual([before.sha256]);
    expect(result.partial).toBe(false);
    expect(pipeline.ledger.database.prepare(`SELECT COUNT(*) AS n FROM sets`).get()).toEqual({ n: 1 });
    expect(filesUnder(inbox)).toEqual([]);
    expect(filesUnder(join(dir, 'results')).filter((n) => n.endsWith('.json'))).toHaveLength(1);
  });

  it('does not commit a result from bytes that changed on disk after intake: an unusable new version is quarantined and the set reports the part missing', async () => {
    const { pipeline, inbox, dir } = start();
    const set = generateSet('held-01', 12);
    const paths = drop(inbox, set.files);
    await pipeline.coordinator.intakeMany(paths);
    const hashed = pipeline.ledger.database
      .prepare(`SELECT sha256 FROM files WHERE name = ?`)
      .get(set.files[0]?.name) as { sha256: string };
    // The instrument (or a person) rewrites the emission export after driftlight took it.
    writeFileSync(paths[0] ?? '', 'not a spectrum any more\n');
    let resultPath: string | undefined;
    pipeline.coordinator.onCommitted((_id, path) => {
      resultPath = path;
    });
    await pipeline.coordinator.tick(true);
    await pipeline.coordinator.drain();
    expect(resultPath).toBeDefined();
    const result = JSON.parse(readFileSync(resultPath ?? '', 'utf8')) as {
      partial: boolean;
      missing: { what: string }[];
      spectra: { emission?: unknown };
      provenance: { inputs: { file: string }[]; supersededInputs?: { file: string; sha256: string }[] };
    };
    // Never a result from the bytes the file no longer holds, labelled with their hash.
    expect(result.partial).toBe(true);
    expect(result.spectra.emission).toBeUndefined();
    expect(result.provenance.inputs.map((i) => i.file)).not.toContain(set.files[0]?.name);
    expect(result.provenance.supersededInputs).toEqual([
      expect.objectContaining({ file: set.files[0]?.name, sha256: hashed.sha256 }),
    ]);
    expect(filesUnder(join(dir, 'quarantine'))).toEqual([
      `${set.files[0]?.name ?? ''}`,
      `${set.files[0]?.name ?? ''}.error.json`,
    ]);
    expect(filesUnder(inbox)).toEqual([]);
  });

  it('commits many sets finishing together: one result each, every input archived, ledger done', async () => {
    const { pipeline, inbox, dir } = start();
    const sets = Array.from({ length: 12 }, (_u, i) => generateSet(`grp-${String(i).padStart(2, '0')}`, 100 + i));
    await pipeline.coordinator.intakeMany(
      drop(
        inbox,
        sets.flatMap((s) => s.files),
      ),
    );
    const committed: string[] = [];
    pipeline.coordinator.onCommitted((id, path) => {
      if (path !== undefined) committed.push(id);
    });
    await pipeline.coordinator.tick(true);
    await pipeline.coordinator.drain();
    expect(committed).toHaveLength(12);
    expect(new Set(committed).size).toBe(12);
    expect(filesUnder(join(dir, 'results')).filter((n) => n.endsWith('.json'))).toHaveLength(12);
    expect(filesUnder(inbox)).toEqual([]);
    expect(filesUnder(join(dir, 'archive'))).toHaveLength(36);
    const states = pipeline.ledger.database.prepare(`SELECT state, COUNT(*) AS n FROM sets GROUP BY state`).all();
    expect(states).toEqual([{ state: 'done', n: 12 }]);
    const unarchived = pipeline.ledger.database
      .prepare(`SELECT COUNT(*) AS n FROM files WHERE archive_path IS NULL`)
      .get() as { n: number };
    expect(unarchived.n).toBe(0);
  });

  it('after a power cut lost the record of where done files were archived, the restart finds each archived copy by its sha256 (not a same-named other file) and records it', async () => {
    const first = start();
    const set = generateSet('lost-01', 14);
    await first.pipeline.coordinator.intakeMany(drop(first.inbox, set.files));
    await first.pipeline.coordinator.tick(true);
    await first.pipeline.coordinator.drain();
    const db = first.pipeline.ledger.database;
    const archived = db.prepare(`SELECT id, name, archive_path AS archivePath FROM files ORDER BY id`).all() as {
      id: number;
      name: string;
      archivePath: string;
    }[];
    expect(archived).toHaveLength(set.files.length);
    // The last transaction (archive paths) did not survive; meanwhile the first file's archived copy
    // took a ~1 name because another export of the same name, with other content, holds the name.
    db.prepare(`UPDATE files SET archive_path = NULL`).run();
    const moved = archived[0];
    if (moved === undefined) throw new Error('no archived file');
    const renamed = moved.archivePath.replace(/(\.[^.]+)$/, '~1$1');
    renameSync(moved.archivePath, renamed);
    writeFileSync(moved.archivePath, 'another export that happens to have the same name\n');
    await first.pipeline.close();
    opened.splice(0, 1, { pipeline: first.pipeline, dir: first.dir });
    const again = start(first.dir);
    await again.pipeline.coordinator.recover();
    const after = again.pipeline.ledger.database
      .prepare(`SELECT id, archive_path AS archivePath FROM files ORDER BY id`)
      .all() as { id: number; archivePath: string | null }[];
    expect(after.map((f) => f.archivePath)).toEqual([renamed, ...archived.slice(1).map((f) => f.archivePath)]);
  });

  it('fails a set whose input vanished before dispatch with INPUT_MISSING and quarantines the rest, without stopping', async () => {
    const first = start();
    const set = generateSet('gone-01', 13);
    const paths = drop(first.inbox, set.files);
    await first.pipeline.coordinator.intakeMany(paths);
    await first.pipeline.close();
    opened.splice(0, 1, { pipeline: first.pipeline, dir: first.dir });
    // Someone tidies the inbox while driftlight is down; the restart has no cached bytes.
    rmSync(paths[1] ?? '');
    const again = start(first.dir);
    const failed: string[] = [];
    again.pipeline.coordinator.onCommitted((id, path) => {
      if (path === undefined) failed.push(id);
    });
    await again.pipeline.coordinator.recover();
    await again.pipeline.coordinator.tick(true);
    await again.pipeline.coordinator.drain();
    expect(failed).toHaveLength(1);
    const row = again.pipeline.ledger.database
      .prepare(`SELECT state, error_code AS code, error_message AS message FROM sets`)
      .get() as { state: string; code: string; message: string };
    expect(row).toMatchObject({ state: 'failed', code: 'INPUT_MISSING' });
    expect(row.message).toContain(set.files[1]?.name);
    expect(filesUnder(first.inbox)).toEqual([]);
    const quarantined = filesUnder(join(first.dir, 'quarantine'));
    expect(quarantined).toEqual(expect.arrayContaining([set.files[0]?.name, set.files[2]?.name]));
  });
});
