// Folder fsync after an atomic rename: skipped only for the codes with which platforms refuse to
// fsync a folder (Windows EISDIR/EPERM, some file systems EINVAL/ENOTSUP); any other failure is
// thrown with its path, since the rename is then not known to be durable.
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { fsyncDirectory, fsyncDirectoryAsync } from '../../../src/output/atomic-write.js';
import { FOLDER_FSYNC_UNSUPPORTED_CODES, isGoneError } from '../../../src/output/fs-errors.js';
import { tempDir } from '../../helpers/temp-dir.js';

describe('folder fsync errors', () => {
  it('fsyncs an existing folder', async () => {
    const dir = tempDir('dl-fsync-');
    expect(() => fsyncDirectory(dir)).not.toThrow();
    await expect(fsyncDirectoryAsync(dir)).resolves.toBeUndefined();
  });

  it('throws for a folder that is gone, with its path, instead of swallowing it', async () => {
    const missing = join(tempDir('dl-fsync-'), 'no-such-folder');
    expect(() => fsyncDirectory(missing)).toThrow(
      expect.objectContaining({ code: 'ENOENT', message: expect.stringContaining(missing) }),
    );
    await expect(fsyncDirectoryAsync(missing)).rejects.toMatchObject({ code: 'ENOENT' });
  });

  it('names the codes it skips and the codes meaning gone', () => {
    expect([...FOLDER_FSYNC_UNSUPPORTED_CODES].sort()).toEqual(['EINVAL', 'EISDIR', 'ENOTSUP', 'EOPNOTSUPP', 'EPERM']);
    expect(isGoneError(Object.assign(new Error('x'), { code: 'ENOTDIR' }))).toBe(true);
    expect(isGoneError(Object.assign(new Error('x'), { code: 'EACCES' }))).toBe(false);
  });
});
