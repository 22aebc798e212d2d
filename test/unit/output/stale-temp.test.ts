// Stale temporary files of interrupted atomic writes are removed at start (issue 20 item 9), unless
// their writer (the pid in the name) is this process or still alive.
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { tempPathFor } from '../../../src/output/atomic-write.js';
import { removeStaleTempFiles, tempWriterPid } from '../../../src/output/stale-temp.js';

const dirs: string[] = [];
afterEach(() => {
  for (const dir of dirs.splice(0)) rmSync(dir, { recursive: true, force: true });
});

describe('removeStaleTempFiles', () => {
  it('reads the writer pid from the names atomic-write gives its temporary files', () => {
    const name = tempPathFor('/results/2026-03-14/set-1.json').split('/').pop() ?? '';
    expect(tempWriterPid(name)).toBe(process.pid);
    expect(tempWriterPid('set-1.json')).toBeUndefined();
    expect(tempWriterPid('.hidden.csv')).toBeUndefined();
  });

  it('removes files and folders of dead writers in the folders and their day folders, and keeps the rest', () => {
    const root = mkdtempSync(join(tmpdir(), 'dl-stale-'));
    dirs.push(root);
    const day = join(root, 'results', '2026-03-14');
    mkdirSync(day, { recursive: true });
    const deadPid = 999_999_001;
    const livePid = 999_999_002;
    const dead = join(day, `.set-1.json.${deadPid}.3.tmp`);
    const deadFolder = join(root, 'results', `.set-2.${deadPid}.4.tmp`);
    const live = join(day, `.set-3.json.${livePid}.1.tmp`);
    const own = join(day, `.set-4.json.${process.pid}.1.tmp`);
    const result = join(day, 'set-5.json');
    for (const path of [dead, live, own, result]) writeFileSync(path, '{}');
    mkdirSync(deadFolder);
    writeFileSync(join(deadFolder, 'emission.csv'), 'x');
    const removed = removeStaleTempFiles([join(root, 'results'), join(root, 'missing')], (pid) => pid === livePid);
    expect(removed.sort()).toEqual([dead, deadFolder].sort());
    expect([dead, deadFolder, live, own, result].map((p) => existsSync(p))).toEqual([false, false, true, true, true]);
  });
});
