// Empty day folders in the inbox are removed once their files were taken (issue 20, item 9): never
// the inbox root, never a folder with anything left in it, never one still being written into (its
// modification time within the stability window), never one driftlight took nothing from; each
// removal logged once. Real folders in a temp dir; the clock and folder times are set by the test.
import { existsSync, mkdirSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EmptyInboxFolders } from '../../../src/pipeline/empty-folders.js';
import { tempDir } from '../../helpers/temp-dir.js';

const WINDOW_MS = 1_000;
const NOW_MS = Date.parse('2026-03-14T12:00:00Z');

/** Sets the modification time of `path` to `ageMs` before NOW_MS. */
function age(path: string, ageMs: number): void {
  const at = new Date(NOW_MS - ageMs);
  utimesSync(path, at, at);
}

function setup(): { inbox: string; lines: string[]; folders: EmptyInboxFolders } {
  const inbox = join(tempDir('dl-empty-'), 'inbox');
  mkdirSync(inbox, { recursive: true });
  const lines: string[] = [];
  const folders = new EmptyInboxFolders(inbox, WINDOW_MS, {
    info: (fields, message) => lines.push(`${message} ${JSON.stringify(fields)}`),
    warn: (fields, message) => lines.push(`WARN ${message} ${JSON.stringify(fields)}`),
  });
  return { inbox, lines, folders };
}

describe('empty inbox folders', () => {
  it('removes a day folder (and its empty sub-folder) once its files were taken and it is quiet; logs each once', () => {
    const { inbox, lines, folders } = setup();
    const day = join(inbox, '2026-03-14');
    const run = join(day, 'run-7');
    mkdirSync(run, { recursive: true });
    writeFileSync(join(run, 'a_em.csv'), 'x');
    folders.taken(join(run, 'a_em.csv'));
    rmSync(join(run, 'a_em.csv')); // moved to the archive
    age(run, 5_000);
    age(day, 5_000);
    expect(folders.sweep(NOW_MS)).toEqual([run, day]);
    expect(existsSync(day)).toBe(false);
    expect(existsSync(inbox)).toBe(true);
    expect(folders.sweep(NOW_MS)).toEqual([]);
    expect(lines.filter((l) => l.includes(run))).toHaveLength(1);
    expect(lines.filter((l) => l.includes(`"${day}"`))).toHaveLength(1);
  });

  it('never removes the inbox root, a folder with anything left, or a folder still being written into', () => {
    const { inbox, folders } = setup();
    // A file directly in the inbox: the root stays.
    folders.taken(join(inbox, 'root.csv'));
    age(inbox, 5_000);
    // Something left (a file not taken yet).
    const busy = join(inbox, 'busy');
    mkdirSync(busy);
    writeFileSync(join(busy, 'left.csv'), 'x');
    folders.taken(join(busy, 'taken.csv'));
    age(busy, 5_000);
    // Emptied, but changed within the stability window (a writer may be about to add a file).
    const fresh = join(inbox, 'fresh');
    mkdirSync(fresh);
    folders.taken(join(fresh, 'taken.csv'));
    age(fresh, WINDOW_MS / 2);
    expect(folders.sweep(NOW_MS)).toEqual([]);
    expect([inbox, busy, fresh].every((p) => existsSync(p))).toBe(true);
    // Once quiet it goes; the busy one stays while its file is there.
    age(fresh, WINDOW_MS * 2);
    expect(folders.sweep(NOW_MS)).toEqual([fresh]);
    expect(existsSync(busy)).toBe(true);
  });

  it('leaves an empty folder it took nothing from (one an instrument made ahead of time), and hidden folders', () => {
    const { inbox, folders } = setup();
    const ahead = join(inbox, '2026-03-15');
    mkdirSync(ahead);
    age(ahead, 5_000);
    const hidden = join(inbox, '.staging');
    mkdirSync(hidden);
    folders.taken(join(hidden, 'x.csv'));
    age(hidden, 5_000);
    expect(folders.sweep(NOW_MS)).toEqual([]);
    expect(existsSync(ahead) && existsSync(hidden)).toBe(true);
  });
});
