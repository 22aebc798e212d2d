// Manifest sets are never lost (issue 20, item 1): a backlog of manifests taken before their files
// (a restart with manifests waiting) gives one right result per manifest, none under invented ids.
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
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

function start(existing?: string): { pipeline: Pipeline; inbox: string; dir: string } {
  const dir = existing ?? mkdtempSync(join(tmpdir(), 'dl-mf-'));
  const config = resolveConfig(
    { assembly: { setTimeoutMs: 600_000 }, queue: { concurrency: 2 }, logging: { level: 'warn', stdout: 'off' } },
    { baseDir: dir },
  );
  const pipeline = openPipeline(config, { softwareVersion: 'test', logger: pino({ level: 'silent' }) });
  opened.push({ pipeline, dir: existing === undefined ? dir : '' });
  mkdirSync(config.folders.inbox, { recursive: true });
  return { pipeline, inbox: config.folders.inbox, dir };
}

const manifestText = (id: string): string =>
  `sampleId: ${id}\nrole: sample\nexcitationNm: 480\nfiles:\n  - { file: ${id}-e.csv, part: emission }\n  - { file: ${id}-a.csv, part: absorbance }\n  - { file: ${id}-d.csv, part: decay }\n`;

function results(dir: string): { sampleId: string; partial: boolean }[] {
  const root = join(dir, 'results');
  return readdirSync(root, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && e.name.endsWith('.json'))
    .map((e) => JSON.parse(readFileSync(join(e.parentPath, e.name), 'utf8')) as { sampleId: string; partial: boolean });
}

describe('manifest sets', () => {
  it('keeps each of 10 manifests taken before their files, across a restart: 10 right results, none invented', async () => {
    const first = start();
    const ids = Array.from({ length: 10 }, (_u, i) => `mfb-${String(i).padStart(2, '0')}`);
    const manifestPaths = ids.map((id) => {
      const path = join(first.inbox, `${id}.set.yaml`);
      writeFileSync(path, manifestText(id));
      return path;
    });
    // One at a time, as the watcher reports them.
    for (const path of manifestPaths) await first.pipeline.coordinator.intakeMany([path]);
    expect(first.pipeline.coordinator.openSetCount).toBe(10);
    await first.pipeline.close();
    opened.splice(0, 1, { pipeline: first.pipeline, dir: first.dir });
    // Restart: the manifests wait; the files arrive (opaque names: only the manifests tie them).
    const again = start(first.dir);
    await again.pipeline.coordinator.recover();
    expect(again.pipeline.coordinator.openSetCount).toBe(10);
    const paths: string[] = [];
    ids.forEach((id, i) => {
      for (const f of generateSet(id, 300 + i, { nameStyle: 'opaque' }).files) {
        const path = join(first.inbox, f.name);
        writeFileSync(path, f.content);
        paths.push(path);
      }
    });
    for (const path of paths) await again.pipeline.coordinator.intakeMany([path]);
    await again.pipeline.coordinator.drain();
    const got = results(first.dir);
    expect(got.map((r) => r.sampleId).sort()).toEqual(ids);
    expect(got.every((r) => !r.partial)).toBe(true);
    expect(readdirSync(first.inbox)).toEqual([]);
    const states = again.pipeline.ledger.database.prepare(`SELECT state, COUNT(*) AS n FROM sets GROUP BY state`).all();
    expect(states).toEqual([{ state: 'done', n: 10 }]);
  });

  it('keeps an open manifest set when another manifest claims files from a plain set', async () => {
    const { pipeline, inbox, dir } = start();
    const a = generateSet('mfc-a', 401, { nameStyle: 'opaque' });
    const b = generateSet('mfc-b', 402, { nameStyle: 'opaque' });
    writeFileSync(join(inbox, 'mfc-a.set.yaml'), manifestText('mfc-a'));
    await pipeline.coordinator.intakeMany([join(inbox, 'mfc-a.set.yaml')]);
    // b's first file arrives before its manifest and waits in a set of its own.
    const [b0, ...bRest] = b.files;
    if (b0 === undefined) throw new Error('no file');
    writeFileSync(join(inbox, b0.name), b0.content);
    await pipeline.coordinator.intakeMany([join(inbox, b0.name)]);
    writeFileSync(join(inbox, 'mfc-b.set.yaml'), manifestText('mfc-b'));
    await pipeline.coordinator.intakeMany([join(inbox, 'mfc-b.set.yaml')]);
    for (const f of [...a.files, ...bRest]) {
      writeFileSync(join(inbox, f.name), f.content);
      await pipeline.coordinator.intakeMany([join(inbox, f.name)]);
    }
    await pipeline.coordinator.drain();
    expect(
      results(dir)
        .map((r) => `${r.sampleId}:${String(r.partial)}`)
        .sort(),
    ).toEqual(['mfc-a:false', 'mfc-b:false']);
    expect(readdirSync(inbox)).toEqual([]);
  });
});
