// The event watcher's write-completion tracking: a file is reported once, only after its size and
// mtime have been unchanged for the stability window; a file that keeps growing is held back.
import { appendFileSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { StableFiles } from '../../../src/pipeline/stable-files.js';

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

describe('StableFiles', () => {
  const dirs: string[] = [];
  afterEach(() => {
    for (const dir of dirs.splice(0)) rmSync(dir, { recursive: true, force: true });
  });

  it('reports a file once, after the window, and not while it is still growing', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'dl-stable-'));
    dirs.push(dir);
    const path = join(dir, 'slow.csv');
    const reported: string[] = [];
    const stable = new StableFiles(120, 20, (p) => reported.push(p));
    writeFileSync(path, 'a');
    stable.touch(path);
    for (let i = 0; i < 6; i++) {
      await sleep(60);
      appendFileSync(path, `line ${i}\n`);
      stable.touch(path);
    }
    expect(reported).toEqual([]);
    await sleep(300);
    expect(reported).toEqual([path]);
    expect(stable.size).toBe(0);
    stable.close();
  });

  it('forgets a file that disappears before it settles', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'dl-stable-'));
    dirs.push(dir);
    const path = join(dir, 'gone.csv');
    const reported: string[] = [];
    const stable = new StableFiles(50, 10, (p) => reported.push(p));
    writeFileSync(path, 'x');
    stable.touch(path);
    rmSync(path);
    await sleep(150);
    expect(reported).toEqual([]);
    stable.close();
  });

  it('lets a gone file go quietly, and reports any other stat failure with its path instead of swallowing it', () => {
    const dir = mkdtempSync(join(tmpdir(), 'dl-stable-err-'));
    dirs.push(dir);
    const errors: { code: unknown; path: string; message: string }[] = [];
    const stable = new StableFiles(
      50,
      10,
      () => undefined,
      Date.now,
      (error, path) => errors.push({ code: (error as NodeJS.ErrnoException).code, path, message: error.message }),
    );
    stable.touch(join(dir, 'never-written.csv')); // ENOENT: the file is gone, nothing to say
    expect(errors).toEqual([]);
    // A name longer than NAME_MAX (255 bytes on Linux file systems) makes lstat fail with ENAMETOOLONG.
    const tooLong = join(dir, `${'n'.repeat(300)}.csv`);
    stable.touch(tooLong);
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatchObject({ code: 'ENAMETOOLONG', path: tooLong });
    expect(errors[0]?.message).toContain(tooLong);
    expect(stable.has(tooLong)).toBe(false);
    // Without an error listener the failure is thrown, not dropped.
    const bare = new StableFiles(50, 10, () => undefined);
    expect(() => bare.touch(tooLong)).toThrow(/ENAMETOOLONG/);
    stable.close();
  });
});
