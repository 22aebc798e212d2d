// Acquisition times through `process` (runBatch, in-process): the pipeline reads every file's date
// with the one reader, refuses ambiguous or impossible ones with their code, stands in the file's
// modification time (recorded as such) when a file has none, and files results and outbox by the
// acquisition date. Expected instants checked with Python zoneinfo (Europe/Berlin is UTC+1 in December).
import { existsSync, mkdirSync, readdirSync, readFileSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { runBatch } from '../../../src/cli/process.js';
import { generateSet } from '../../integration/pipeline-helpers.js';
import { tempDir } from '../../helpers/temp-dir.js';

const silent = (): Writable =>
  new Writable({
    write(_chunk, _enc, done) {
      done();
    },
  });

/** A generated set whose files say `acquiredAt` (or nothing, when null) instead of their own times. */
function writeSet(inbox: string, sampleId: string, acquiredAt: string | null): string[] {
  mkdirSync(inbox, { recursive: true });
  return generateSet(sampleId, 41).files.map((f) => {
    const content = f.content.replace(
      /^# acquired at: .*\n/m,
      acquiredAt === null ? '' : `# acquired at: ${acquiredAt}\n`,
    );
    const path = join(inbox, f.name);
    writeFileSync(path, content);
    return path;
  });
}

function setup(name: string, yaml: string): { dir: string; inbox: string; config: string } {
  const dir = tempDir(`dl-acq-${name}-`);
  writeFileSync(join(dir, 'driftlight.yaml'), `logging: { stdout: "off" }\nqueue: { concurrency: 1 }\n${yaml}`);
  return { dir, inbox: join(dir, 'inbox'), config: join(dir, 'driftlight.yaml') };
}

function onlyResult(dir: string): {
  day: string;
  result: Record<string, unknown> & { provenance: Record<string, unknown> };
} {
  const days = readdirSync(join(dir, 'results'));
  expect(days).toHaveLength(1);
  const day = days[0] ?? '';
  const files = readdirSync(join(dir, 'results', day));
  expect(files).toHaveLength(1);
  return { day, result: JSON.parse(readFileSync(join(dir, 'results', day, files[0] ?? ''), 'utf8')) as never };
}

describe('acquisition times at intake', () => {
  it('refuses 05.12.2026 without a stated date order: each file quarantined with DATE_AMBIGUOUS and the config hint', async () => {
    const { dir, inbox, config } = setup('ambiguous', '');
    writeSet(inbox, 'acq-amb', '05.12.2026 09:30');
    const summary = await runBatch([inbox], { config }, silent());
    expect(summary).toMatchObject({ done: 0 });
    const quarantined = readdirSync(join(dir, 'quarantine')).flatMap((day) =>
      readdirSync(join(dir, 'quarantine', day)).map((f) => join(dir, 'quarantine', day, f)),
    );
    const reasons = quarantined
      .filter((p) => p.endsWith('.error.json'))
      .map((p) => JSON.parse(readFileSync(p, 'utf8')) as { code: string; hint: string });
    expect(reasons).toHaveLength(3);
    for (const reason of reasons) {
      expect(reason.code).toBe('DATE_AMBIGUOUS');
      expect(reason.hint).toContain('instrument.dateOrder');
    }
  });

  it('reads 05.12.2026 09:30 as 5 December in Berlin when the config says DMY, and files the result and outbox under 2026-12-05', async () => {
    const { dir, inbox, config } = setup('dmy', 'instrument: { dateOrder: DMY, timeZone: Europe/Berlin }\n');
    writeSet(inbox, 'acq-dmy', '05.12.2026 09:30');
    expect(await runBatch([inbox], { config }, silent())).toMatchObject({ done: 1 });
    const { day, result } = onlyResult(dir);
    expect(day).toBe('2026-12-05');
    expect(result['acquiredAt']).toBe('2026-12-05T08:30:00.000Z'); // 09:30 CET = 08:30 UTC (Python zoneinfo)
    expect(result.provenance['acquiredAtSource']).toBe('metadata');
    expect(readdirSync(join(dir, 'outbox'))).toEqual(['2026-12-05']);
  });

  it('refuses an impossible time (25:00) with DATE_INVALID', async () => {
    const { dir, inbox, config } = setup('invalid', '');
    writeSet(inbox, 'acq-bad', '2026-12-05 25:00');
    expect(await runBatch([inbox], { config }, silent())).toMatchObject({ done: 0 });
    const day = readdirSync(join(dir, 'quarantine'))[0] ?? '';
    const reasons = readdirSync(join(dir, 'quarantine', day)).filter((f) => f.endsWith('.error.json'));
    expect(
      reasons.map((f) => (JSON.parse(readFileSync(join(dir, 'quarantine', day, f), 'utf8')) as { code: string }).code),
    ).toEqual(['DATE_INVALID', 'DATE_INVALID', 'DATE_INVALID']);
  });

  it('uses the file modification time when a file has no acquisition time, records it as such, and never the analysis time', async () => {
    const { dir, inbox, config } = setup('mtime', '');
    const modified = new Date('2026-06-01T12:00:00Z');
    for (const path of writeSet(inbox, 'acq-mtime', null)) utimesSync(path, modified, modified);
    expect(await runBatch([inbox], { config }, silent())).toMatchObject({ done: 1 });
    const { day, result } = onlyResult(dir);
    expect(day).toBe('2026-06-01');
    expect(result['acquiredAt']).toBe('2026-06-01T12:00:00.000Z');
    expect(result.provenance['acquiredAtSource']).toBe('file-modified');
    expect(result.provenance['analyzedAt']).not.toBe(result['acquiredAt']);
    expect(existsSync(join(dir, 'outbox', '2026-06-01'))).toBe(true);
  });
});
