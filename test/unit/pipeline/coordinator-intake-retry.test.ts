// A file whose intake fails for a reason other than the file (an I/O or ledger error) is not lost
// and not quarantined: intakeMany returns it, it stays in the inbox, and taking it again later
// completes its set (`watch` does so every watch.rescanIntervalMs).
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { pino } from 'pino';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { runBatch } from '../../../src/cli/process.js';
import { resolveConfig } from '../../../src/config/resolve.js';
import { openPipeline, type Pipeline } from '../../../src/pipeline/runtime.js';
import { generateSet } from '../../integration/pipeline-helpers.js';
import { tempDir } from '../../helpers/temp-dir.js';

const failOnce = vi.hoisted(() => new Set<string>());

vi.mock('../../../src/pipeline/intake.js', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../../src/pipeline/intake.js')>();
  return {
    ...real,
    intakeFile: (...args: Parameters<typeof real.intakeFile>) => {
      if (failOnce.delete(args[2]))
        throw Object.assign(new Error(`EIO: i/o error, read '${args[2]}'`), { code: 'EIO' });
      return real.intakeFile(...args);
    },
  };
});

const opened: Pipeline[] = [];
afterEach(async () => {
  for (const pipeline of opened.splice(0)) await pipeline.close();
});

describe('intake failures that are not the file’s fault', () => {
  it('returns the file, leaves it in the inbox unrecorded, and a second intake completes its set', async () => {
    const dir = tempDir('dl-intake-retry-');
    const config = resolveConfig(
      { assembly: { setTimeoutMs: 600_000 }, queue: { concurrency: 1 }, logging: { level: 'warn', stdout: 'off' } },
      { baseDir: dir },
    );
    const pipeline = openPipeline(config, { softwareVersion: 'test', logger: pino({ level: 'silent' }) });
    opened.push(pipeline);
    pipeline.coordinator.holdDispatch = true;
    mkdirSync(config.folders.inbox, { recursive: true });
    const set = generateSet('retry-01', 21);
    const paths = set.files.map((f) => {
      const path = join(config.folders.inbox, f.name);
      writeFileSync(path, f.content);
      return path;
    });
    const troubled = paths[1] ?? '';
    failOnce.add(troubled);
    expect(await pipeline.coordinator.intakeMany(paths)).toEqual([troubled]);
    expect(existsSync(troubled)).toBe(true);
    const recorded = pipeline.ledger.database
      .prepare(`SELECT COUNT(*) AS n FROM files WHERE path = ?`)
      .get(troubled) as { n: number };
    expect(recorded.n).toBe(0);
    expect(await pipeline.coordinator.intakeMany([troubled])).toEqual([]);
    let resultPath: string | undefined;
    pipeline.coordinator.onCommitted((_id, path) => {
      resultPath = path;
    });
    await pipeline.coordinator.tick(true);
    await pipeline.coordinator.drain();
    const result = JSON.parse(readFileSync(resultPath ?? '', 'utf8')) as {
      partial: boolean;
      provenance: { inputs: { file: string }[] };
    };
    expect(result.partial).toBe(false);
    expect(result.provenance.inputs.map((i) => i.file).sort()).toEqual(set.files.map((f) => f.name).sort());
  });

  it('`process` reports such a file as not taken (exit 3 in the CLI), and the next run takes it', async () => {
    const dir = tempDir('dl-intake-retry-cli-');
    writeFileSync(join(dir, 'driftlight.yaml'), 'logging: { stdout: "off" }\nqueue: { concurrency: 1 }\n');
    mkdirSync(join(dir, 'inbox'));
    const set = generateSet('retry-02', 22);
    for (const f of set.files) writeFileSync(join(dir, 'inbox', f.name), f.content);
    const troubled = join(dir, 'inbox', set.files[0]?.name ?? '');
    failOnce.add(troubled);
    let printed = '';
    const out = new Writable({
      write(chunk: Buffer, _enc, done) {
        printed += chunk.toString();
        done();
      },
    });
    const first = await runBatch([join(dir, 'inbox')], { config: join(dir, 'driftlight.yaml') }, out);
    expect(first).toMatchObject({ files: 3, accepted: 2, notTaken: 1 });
    expect(printed).toContain(`not taken:  1 file(s)`);
    expect(printed).toContain(troubled);
    expect(existsSync(troubled)).toBe(true);
    const second = await runBatch([join(dir, 'inbox')], { config: join(dir, 'driftlight.yaml') }, out);
    expect(second).toMatchObject({ files: 1, accepted: 1, notTaken: 0, done: 1, failed: 0 });
  });
});
