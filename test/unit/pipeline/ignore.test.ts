// Which inbox files the watcher and `process` skip: hidden, temporary, partial downloads, our sidecars.
import { describe, expect, it } from 'vitest';
import { compileGlobs, isIgnoredFile, isInHiddenFolder } from '../../../src/pipeline/ignore.js';

describe('ignored inbox files', () => {
  it('skips hidden, temporary and partial files and extra globs, and reads the rest', () => {
    for (const name of [
      '.x.csv',
      'run.csv.tmp',
      'run.csv~',
      '~$run.csv',
      'run.csv.part',
      'run.crdownload',
      'run.csv.error.json',
    ]) {
      expect(isIgnoredFile(`/inbox/${name}`), name).toBe(true);
    }
    expect(isIgnoredFile('/inbox/orchid-01_em.csv')).toBe(false);
    expect(isIgnoredFile('/inbox/notes.txt', compileGlobs(['*.txt']))).toBe(true);
    expect(isInHiddenFolder('/inbox/.sync/a.csv', '/inbox')).toBe(true);
    expect(isInHiddenFolder('/inbox/day/a.csv', '/inbox')).toBe(false);
  });
});
