// `driftlight watch` as a real child process on a real inbox: files one by one and in bursts, a file
// written slowly, duplicates, manifests before and after their files, a missing IRF that times out,
// a start-up scan of files that arrived while it was down, and a clean stop on SIGTERM.
import { appendFileSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ChildProcess } from 'node:child_process';
import {
  dropSet,
  generateIrf,
  generateSet,
  listFiles,
  makeWorkspace,
  readResults,
  removeWorkspaces,
  startWatch,
  stopWatch,
  waitFor,
} from './pipeline-helpers.js';

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

describe('driftlight watch', () => {
  let dir: string;
  let inbox: string;
  let child: ChildProcess;
  let stderr = '';
  const resultsFor = (sampleId: string) => readResults(dir).filter((r) => r.result.sampleId === sampleId);

  beforeAll(async () => {
    dir = makeWorkspace('', { stabilityWindowMs: 150, setTimeoutMs: 2500 });
    inbox = join(dir, 'inbox');
    // Arrived while driftlight was down: found by the start-up scan.
    dropSet(inbox, generateSet('early-01', 1));
    child = startWatch(dir);
    child.stderr?.on('data', (chunk: Buffer) => {
      stderr += chunk.toString();
    });
    await waitFor('the start-up scan result', () => resultsFor('early-01').length === 1);
  });

  afterAll(async () => {
    if (child.exitCode === null) await stopWatch(child);
  });

  it('processes files dropped one by one', async () => {
    for (const file of generateSet('single-01', 2).files) {
      writeFileSync(join(inbox, file.name), file.content);
      await sleep(300);
    }
    await waitFor('single-01', () => resultsFor('single-01').length === 1);
    expect(resultsFor('single-01')[0]?.result.partial).toBe(false);
  });

  it('processes a burst of sets, in a nested folder too', async () => {
    const ids = Array.from({ length: 12 }, (_u, i) => `burst-${String(i).padStart(2, '0')}`);
    mkdirSync(join(inbox, 'nested'), { recursive: true });
    ids.forEach((id, i) => dropSet(i % 2 === 0 ? inbox : join(inbox, 'nested'), generateSet(id, 100 + i)));
    await waitFor('12 burst results', () => ids.every((id) => resultsFor(id).length === 1));
  });

  it('never reads a file still being written (slow writer over ~2.5 s)', async () => {
    const set = generateSet('slow-01', 3);
    for (const f of set.files.slice(0, 2)) writeFileSync(join(inbox, f.name), f.content);
    const decay = set.files[2];
    if (decay === undefined) throw new Error('no decay');
    const chunks = 30;
    const size = Math.ceil(decay.content.length / chunks);
    writeFileSync(join(inbox, decay.name), '');
    for (let i = 0; i < chunks; i++) {
      appendFileSync(join(inbox, decay.name), decay.content.slice(i * size, (i + 1) * size));
      await sleep(80);
    }
    await waitFor('slow-01', () => resultsFor('slow-01').length === 1);
    expect(resultsFor('slow-01')[0]?.result.partial).toBe(false);
    expect(listFiles(join(dir, 'quarantine')).filter((p) => p.includes('slow-01'))).toEqual([]);
  });

  it('quarantines a duplicate (same content, new name) and keeps one result', async () => {
    const set = generateSet('dup-01', 4);
    dropSet(inbox, set);
    await waitFor('dup-01', () => resultsFor('dup-01').length === 1);
    writeFileSync(join(inbox, 'dup-01-again_em.csv'), set.files[0]?.content ?? '');
    await waitFor('duplicate quarantined', () =>
      listFiles(join(dir, 'quarantine')).some((p) => p.endsWith('dup-01-again_em.csv.error.json')),
    );
    const record = JSON.parse(
      readFileSync(
        join(
          dir,
          'quarantine',
          listFiles(join(dir, 'quarantine')).find((p) => p.endsWith('dup-01-again_em.csv.error.json')) ?? '',
        ),
        'utf8',
      ),
    ) as { code: string };
    expect(record.code).toBe('DUPLICATE_INPUT');
    expect(resultsFor('dup-01')).toHaveLength(1);
  });

  it('assembles a set from a manifest that arrives before its files, and one that arrives after', async () => {
    const manifest = (id: string): string =>
      `sampleId: ${id}\nrole: sample\nexcitationNm: 480\nfiles:\n  - { file: ${id}-e.csv, part: emission }\n  - { file: ${id}-a.csv, part: absorbance }\n  - { file: ${id}-d.csv, part: decay }\n`;
    writeFileSync(join(inbox, 'mf-before.set.yaml'), manifest('mf-before'));
    await sleep(400);
    dropSet(inbox, generateSet('mf-before', 5, { nameStyle: 'opaque' }));
    dropSet(inbox, generateSet('mf-after', 6, { nameStyle: 'opaque' }));
    await sleep(600);
    writeFileSync(join(inbox, 'mf-after.set.yaml'), manifest('mf-after'));
    await waitFor(
      'both manifest sets',
      () => resultsFor('mf-before').length === 1 && resultsFor('mf-after').length === 1,
    );
    for (const id of ['mf-before', 'mf-after']) {
      const result = resultsFor(id)[0]?.result as unknown as {
        partial: boolean;
        provenance: { inputs: { file: string }[] };
      };
      expect(result.partial, id).toBe(false);
      expect(result.provenance.inputs.map((i) => i.file).sort()).toEqual([`${id}-a.csv`, `${id}-d.csv`, `${id}-e.csv`]);
    }
    expect(readResults(dir).filter((r) => r.result.sampleId.startsWith('mf-after-'))).toEqual([]);
  });

  it('pairs a decay without IRF with a recent IRF after the timeout, or reports the IRF missing', async () => {
    dropSet(inbox, generateSet('noirf-01', 7, { irfColumn: false }));
    await waitFor('noirf-01 timed out', () => resultsFor('noirf-01').length === 1, 15_000);
    const lonely = resultsFor('noirf-01')[0]?.result;
    // The earlier sets carry IRF columns recorded at the same time: the most recent one is paired.
    expect(lonely?.partial).toBe(false);
    expect(JSON.stringify(lonely)).toContain('"origin": "paired"'.replace(': ', ':'));
  });

  it('stops cleanly on SIGTERM with every input archived or quarantined', async () => {
    const code = await stopWatch(child);
    expect(code).toBe(0);
    expect(stderr).toBe('');
    expect(listFiles(inbox)).toEqual([]);
  });
});

describe('driftlight watch without any IRF', () => {
  it('processes the set as partial after its timeout, saying the IRF is missing', async () => {
    const dir = makeWorkspace('', { stabilityWindowMs: 100, setTimeoutMs: 1000 });
    dropSet(join(dir, 'inbox'), generateSet('lonely-01', 8, { irfColumn: false }));
    writeFileSync(join(dir, 'inbox', 'old-irf.csv'), generateIrf('old-irf.csv', 9, '2026-03-01T08:00:00Z').content);
    const child = startWatch(dir);
    try {
      await waitFor('lonely-01', () => readResults(dir).some((r) => r.result.sampleId === 'lonely-01'), 20_000);
      const result = readResults(dir).find((r) => r.result.sampleId === 'lonely-01')?.result;
      expect(result?.partial).toBe(true);
      expect(result?.missing.find((m) => m.what === 'irf')?.reason).toContain('pairing window');
    } finally {
      expect(await stopWatch(child)).toBe(0);
    }
  });
});

afterAll(() => removeWorkspaces());
