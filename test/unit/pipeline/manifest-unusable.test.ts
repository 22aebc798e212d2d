// Manifests that name nothing usable are rejected (issue 20, item 9): a manifest listing no file, an
// unparseable one, one whose files never arrive by its deadline (or by the end of a `process` batch)
// and one whose files are dangling symbolic links are each quarantined with a typed code and a
// reason, never left in the inbox and never turned into an empty result.
import { existsSync, readFileSync, readdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { openPipeline, type Pipeline } from '../../../src/pipeline/runtime.js';
import { tempDir } from '../../helpers/temp-dir.js';

const TIMEOUT_MS = 600_000;
const opened: Pipeline[] = [];
afterEach(async () => {
  for (const p of opened.splice(0)) await p.close();
});

/** A pipeline whose clock the test moves. */
function start(): { pipeline: Pipeline; dir: string; inbox: string; clock: { now: Date } } {
  const dir = tempDir('dl-mfu-');
  const config = resolveConfig(
    {
      assembly: { setTimeoutMs: TIMEOUT_MS },
      queue: { concurrency: 1 },
      logging: { level: 'warn', stdout: 'off' },
    },
    { baseDir: dir },
  );
  const clock = { now: new Date('2026-03-14T10:00:00Z') };
  const pipeline = openPipeline(config, {
    softwareVersion: 'test',
    logger: pino({ level: 'silent' }),
    clock: () => clock.now,
  });
  opened.push(pipeline);
  return { pipeline, dir, inbox: config.folders.inbox, clock };
}

interface QuarantineRecord {
  file: string;
  code: string;
  message: string;
  hint: string;
}

function quarantineRecords(dir: string): QuarantineRecord[] {
  const root = join(dir, 'quarantine');
  if (!existsSync(root)) return [];
  return readdirSync(root, { recursive: true, withFileTypes: true })
    .filter((e) => e.name.endsWith('.error.json'))
    .map((e) => JSON.parse(readFileSync(join(e.parentPath, e.name), 'utf8')) as QuarantineRecord);
}

function resultFiles(dir: string): string[] {
  const root = join(dir, 'results');
  if (!existsSync(root)) return [];
  return readdirSync(root, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && e.name.endsWith('.json'))
    .map((e) => e.name);
}

const listing = (id: string): string =>
  `sampleId: ${id}\nfiles:\n  - { file: ${id}-e.csv, part: emission }\n  - { file: ${id}-d.csv, part: decay }\n`;

describe('manifests that name nothing usable', () => {
  it('quarantines a manifest listing no file and an unparseable one at intake (MANIFEST_INVALID), opening no set', async () => {
    const { pipeline, dir, inbox } = start();
    writeFileSync(join(inbox, 'none.set.yaml'), 'sampleId: none\nfiles: []\n');
    writeFileSync(join(inbox, 'broken.set.yaml'), 'sampleId: [broken\nfiles:\n  - {file: a.csv\n');
    await pipeline.coordinator.intakeMany([join(inbox, 'none.set.yaml'), join(inbox, 'broken.set.yaml')]);
    expect(pipeline.coordinator.openSetCount).toBe(0);
    expect(readdirSync(inbox)).toEqual([]);
    const records = quarantineRecords(dir);
    expect(records.map((r) => `${r.file}:${r.code}`).sort()).toEqual([
      'broken.set.yaml:MANIFEST_INVALID',
      'none.set.yaml:MANIFEST_INVALID',
    ]);
    expect(records.find((r) => r.file === 'none.set.yaml')?.message).toMatch(/files/);
    expect(records.find((r) => r.file === 'broken.set.yaml')?.message).toMatch(/not valid YAML/);
  });

  it('quarantines a manifest whose files never arrive, at its deadline, with MANIFEST_NO_FILES: no result, nothing left in the inbox', async () => {
    const { pipeline, dir, inbox, clock } = start();
    writeFileSync(join(inbox, 'ghost.set.yaml'), listing('ghost'));
    await pipeline.coordinator.intakeMany([join(inbox, 'ghost.set.yaml')]);
    await pipeline.coordinator.tick();
    expect(pipeline.coordinator.openSetCount).toBe(1);
    expect(quarantineRecords(dir)).toEqual([]);

    clock.now = new Date(clock.now.getTime() + TIMEOUT_MS + 1);
    await pipeline.coordinator.tick();
    await pipeline.coordinator.drain();
    expect(pipeline.coordinator.openSetCount).toBe(0);
    expect(pipeline.coordinator.counts).toMatchObject({ setsDispatched: 0, setsDone: 0, setsFailed: 1 });
    expect(resultFiles(dir)).toEqual([]);
    expect(readdirSync(inbox)).toEqual([]);
    const [record, ...others] = quarantineRecords(dir);
    expect(others).toEqual([]);
    expect(record?.file).toBe('ghost.set.yaml');
    expect(record?.code).toBe('MANIFEST_NO_FILES');
    // What (none of its files), where (the names and the folder), how to fix (the hint).
    expect(record?.message).toContain('ghost-e.csv');
    expect(record?.message).toContain('ghost-d.csv');
    expect(record?.message).toContain(inbox);
    expect(record?.hint).toMatch(/drop the manifest in again/);
    const state = pipeline.ledger.database.prepare(`SELECT state, error_code FROM sets`).all();
    expect(state).toEqual([{ state: 'failed', error_code: 'MANIFEST_NO_FILES' }]);
  });

  it('quarantines a manifest whose files are dangling symbolic links: the links SYMLINK_REFUSED, the manifest MANIFEST_NO_FILES naming them', async () => {
    const { pipeline, dir, inbox, clock } = start();
    writeFileSync(join(inbox, 'links.set.yaml'), listing('links'));
    symlinkSync(join(dir, 'nowhere-e.csv'), join(inbox, 'links-e.csv'));
    symlinkSync(join(dir, 'nowhere-d.csv'), join(inbox, 'links-d.csv'));
    await pipeline.coordinator.intakeMany(
      ['links.set.yaml', 'links-e.csv', 'links-d.csv'].map((name) => join(inbox, name)),
    );
    clock.now = new Date(clock.now.getTime() + TIMEOUT_MS + 1);
    await pipeline.coordinator.tick();
    await pipeline.coordinator.drain();
    expect(resultFiles(dir)).toEqual([]);
    expect(readdirSync(inbox)).toEqual([]);
    const records = quarantineRecords(dir);
    expect(records.map((r) => `${r.file}:${r.code}`).sort()).toEqual([
      'links-d.csv:SYMLINK_REFUSED',
      'links-e.csv:SYMLINK_REFUSED',
      'links.set.yaml:MANIFEST_NO_FILES',
    ]);
    const manifest = records.find((r) => r.file === 'links.set.yaml');
    expect(manifest?.message).toMatch(/links-e\.csv[^;]*SYMLINK_REFUSED/);
  });

  it('process: a manifest whose files are not in the batch is quarantined at the end of the batch, not analysed empty', async () => {
    const { pipeline, dir, inbox } = start();
    pipeline.coordinator.holdDispatch = true;
    writeFileSync(join(inbox, 'alone.set.yaml'), listing('alone'));
    await pipeline.coordinator.intakeMany([join(inbox, 'alone.set.yaml')]);
    await pipeline.coordinator.tick(true);
    await pipeline.coordinator.drain();
    expect(pipeline.coordinator.counts).toMatchObject({ setsDispatched: 0, setsFailed: 1 });
    expect(resultFiles(dir)).toEqual([]);
    expect(quarantineRecords(dir).map((r) => `${r.file}:${r.code}`)).toEqual(['alone.set.yaml:MANIFEST_NO_FILES']);
    expect(quarantineRecords(dir)[0]?.message).toMatch(/end of the batch/);
  });
});
