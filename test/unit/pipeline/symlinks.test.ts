// Nothing outside the inbox is read or moved (issue 20, item 2): symbolic links are not followed by
// default (each is refused with its reason and the link itself quarantined, what it points to left
// alone); watch.symlinks: inside-inbox takes a link whose real path lies inside the inbox as that
// file. Both watchers report a link as a link and never descend into a linked folder.
import { existsSync, lstatSync, mkdirSync, readFileSync, readdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { openPipeline, type Pipeline } from '../../../src/pipeline/runtime.js';
import { watchInboxWithEvents } from '../../../src/pipeline/watcher-events.js';
import { watchInboxByPolling } from '../../../src/pipeline/watcher-polling.js';
import { generateSet } from '../../integration/pipeline-helpers.js';
import { tempDir } from '../../helpers/temp-dir.js';

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));
const opened: Pipeline[] = [];
afterEach(async () => {
  for (const p of opened.splice(0)) await p.close();
});

function start(symlinks?: 'refuse' | 'inside-inbox'): { pipeline: Pipeline; dir: string; inbox: string } {
  const dir = tempDir('dl-link-');
  const config = resolveConfig(
    {
      assembly: { setTimeoutMs: 600_000 },
      queue: { concurrency: 1 },
      logging: { level: 'warn', stdout: 'off' },
      watch: { stabilityWindowMs: 50, pollIntervalMs: 20, ...(symlinks === undefined ? {} : { symlinks }) },
    },
    { baseDir: dir },
  );
  const pipeline = openPipeline(config, { softwareVersion: 'test', logger: pino({ level: 'silent' }) });
  opened.push(pipeline);
  return { pipeline, dir, inbox: config.folders.inbox };
}

function filesUnder(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => !e.isDirectory())
    .map((e) => e.name)
    .sort();
}

function quarantineRecords(dir: string): { file: string; code: string; message: string }[] {
  const root = join(dir, 'quarantine');
  return readdirSync(root, { recursive: true, withFileTypes: true })
    .filter((e) => e.name.endsWith('.error.json'))
    .map(
      (e) =>
        JSON.parse(readFileSync(join(e.parentPath, e.name), 'utf8')) as { file: string; code: string; message: string },
    );
}

/** A folder outside the inbox with one export, a link to it and a link to its file in the inbox, and a dangling link. */
function outsideWithLinks(dir: string, inbox: string): { outside: string; content: string } {
  const outside = join(dir, 'elsewhere');
  mkdirSync(outside);
  const content = generateSet('out-01', 7, { parts: ['emission'] }).files[0]?.content ?? '';
  writeFileSync(join(outside, 'out-01_em.csv'), content);
  symlinkSync(outside, join(inbox, 'linked-folder'));
  symlinkSync(join(outside, 'out-01_em.csv'), join(inbox, 'linked-file.csv'));
  symlinkSync(join(dir, 'no-such-file.csv'), join(inbox, 'dangling.csv'));
  return { outside, content };
}

describe('symbolic links in the inbox', () => {
  it('event watcher: reports links as links and never watches a linked folder', async () => {
    const { dir, inbox, pipeline } = start();
    outsideWithLinks(dir, inbox);
    const reported: string[] = [];
    const watcher = watchInboxWithEvents(inbox, pipeline.config.watch, { onFile: (p) => reported.push(p) });
    await sleep(400);
    await watcher.close();
    expect(reported.sort()).toEqual(['dangling.csv', 'linked-file.csv', 'linked-folder'].map((n) => join(inbox, n)));
  });

  it('polling watcher: does not descend into a linked folder, and reports a dangling link', async () => {
    const { dir, inbox, pipeline } = start();
    outsideWithLinks(dir, inbox);
    const reported: string[] = [];
    const watcher = watchInboxByPolling(inbox, pipeline.config.watch, { onFile: (p) => reported.push(p) });
    await sleep(600);
    await watcher.close();
    expect(reported.filter((p) => p.includes('out-01_em.csv'))).toEqual([]);
    // A dangling link is reported too (intake then refuses it), not passed over unseen.
    expect(reported).toContain(join(inbox, 'dangling.csv'));
  });

  it('refuses every link by default: quarantines the link with SYMLINK_REFUSED and its reason, leaves the outside files where they are', async () => {
    const { dir, inbox, pipeline } = start();
    const { outside, content } = outsideWithLinks(dir, inbox);
    await pipeline.coordinator.intakeMany(
      ['linked-folder', 'linked-file.csv', 'dangling.csv'].map((n) => join(inbox, n)),
    );
    expect(pipeline.coordinator.counts.filesRejected).toBe(3);
    expect(readdirSync(inbox)).toEqual([]);
    expect(readFileSync(join(outside, 'out-01_em.csv'), 'utf8')).toBe(content);
    const records = quarantineRecords(dir);
    expect(records.map((r) => r.code)).toEqual(['SYMLINK_REFUSED', 'SYMLINK_REFUSED', 'SYMLINK_REFUSED']);
    expect(records.find((r) => r.file === 'dangling.csv')?.message).toContain('does not exist');
    expect(records.find((r) => r.file === 'linked-file.csv')?.message).toContain('not followed');
    // The quarantine holds the links themselves, not copies of what they point to.
    const day = readdirSync(join(dir, 'quarantine'))[0] ?? '';
    expect(lstatSync(join(dir, 'quarantine', day, 'linked-file.csv')).isSymbolicLink()).toBe(true);
    expect(filesUnder(join(dir, 'archive'))).toEqual([]);
  });

  it('inside-inbox: takes a link to a file inside the inbox as that file (archived as the file), and still refuses a link leading outside', async () => {
    const { dir, inbox, pipeline } = start('inside-inbox');
    const { outside } = outsideWithLinks(dir, inbox);
    const staging = join(inbox, '.staging');
    mkdirSync(staging);
    const set = generateSet('in-01', 9);
    for (const f of set.files) {
      writeFileSync(join(staging, f.name), f.content);
      symlinkSync(join(staging, f.name), join(inbox, f.name));
    }
    await pipeline.coordinator.intakeMany([
      ...set.files.map((f) => join(inbox, f.name)),
      join(inbox, 'linked-file.csv'),
      join(inbox, 'linked-folder'),
    ]);
    await pipeline.coordinator.drain();
    expect(pipeline.coordinator.counts).toMatchObject({ setsDone: 1, filesRejected: 2 });
    expect(readdirSync(staging)).toEqual([]);
    const archived = filesUnder(join(dir, 'archive'));
    expect(archived).toEqual(set.files.map((f) => f.name).sort());
    const day = readdirSync(join(dir, 'archive'))[0] ?? '';
    for (const f of set.files) {
      const path = join(dir, 'archive', day, f.name);
      expect(lstatSync(path).isFile()).toBe(true);
      expect(readFileSync(path, 'utf8')).toBe(f.content);
    }
    expect(existsSync(join(outside, 'out-01_em.csv'))).toBe(true);
    expect(
      quarantineRecords(dir)
        .map((r) => r.message)
        .join('\n'),
    ).toMatch(/outside the inbox[\s\S]*|folder/);
  });
});
