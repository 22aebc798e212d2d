// The outbox writer on real files: a set's folder appears whole (filled hidden, renamed into place),
// a re-run replaces the files of an existing folder, and a failed write leaves neither a set folder
// nor a temporary one behind.
import { mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeOutbox } from '../../../src/output/index.js';
import { tempDir } from '../../helpers/temp-dir.js';

const CREATED = new Date('2026-03-14T10:00:00Z');

describe('writeOutbox', () => {
  it('writes a new set folder with all its files and leaves no temporary folder', () => {
    const outbox = tempDir('dl-outbox-');
    const paths = writeOutbox(outbox, 'set-a', CREATED, [
      { name: 'set-a.emission.corrected.csv', content: 'wavelength (nm),intensity\n500,1\n' },
      { name: 'set-a.decay.fit.csv', content: 'time (ns),counts\n0,5\n' },
    ]);
    const day = join(outbox, '2026-03-14');
    expect(readdirSync(day)).toEqual(['set-a']);
    expect(readdirSync(join(day, 'set-a')).sort()).toEqual(['set-a.decay.fit.csv', 'set-a.emission.corrected.csv']);
    expect(paths).toEqual([
      join(day, 'set-a', 'set-a.emission.corrected.csv'),
      join(day, 'set-a', 'set-a.decay.fit.csv'),
    ]);
    expect(readFileSync(paths[1] ?? '', 'utf8')).toBe('time (ns),counts\n0,5\n');
  });

  it('replaces the files of a set folder that exists (a re-run) and keeps the others', () => {
    const outbox = tempDir('dl-outbox-');
    const dir = join(outbox, '2026-03-14', 'set-b');
    mkdirSync(dir, { recursive: true });
    writeFileSync(join(dir, 'set-b.decay.fit.csv'), 'old\n');
    writeFileSync(join(dir, 'notes.txt'), 'kept\n');
    writeOutbox(outbox, 'set-b', CREATED, [{ name: 'set-b.decay.fit.csv', content: 'new\n' }]);
    expect(readFileSync(join(dir, 'set-b.decay.fit.csv'), 'utf8')).toBe('new\n');
    expect(readFileSync(join(dir, 'notes.txt'), 'utf8')).toBe('kept\n');
    expect(readdirSync(join(outbox, '2026-03-14'))).toEqual(['set-b']);
    expect(readdirSync(dir).sort()).toEqual(['notes.txt', 'set-b.decay.fit.csv']);
  });

  it('keeps path separators of an artifact name inside the set folder', () => {
    const outbox = tempDir('dl-outbox-');
    const [path] = writeOutbox(outbox, 'set-c', CREATED, [{ name: '../escape.csv', content: 'x\n' }]);
    expect(path).toBe(join(outbox, '2026-03-14', 'set-c', '.._escape.csv'));
    expect(readdirSync(join(outbox, '2026-03-14'))).toEqual(['set-c']);
  });

  it('leaves no set folder and no temporary folder when a file cannot be written', () => {
    const outbox = tempDir('dl-outbox-');
    // An empty name makes the file path the temporary folder itself: the open fails (EISDIR).
    expect(() =>
      writeOutbox(outbox, 'set-d', CREATED, [
        { name: 'ok.csv', content: 'x\n' },
        { name: '', content: 'y\n' },
      ]),
    ).toThrow();
    expect(readdirSync(join(outbox, '2026-03-14'))).toEqual([]);
  });

  it('writes nothing, not even the day folder, for a set without artifacts', () => {
    const outbox = tempDir('dl-outbox-');
    expect(writeOutbox(outbox, 'set-e', CREATED, [])).toEqual([]);
    expect(readdirSync(outbox)).toEqual([]);
  });
});
