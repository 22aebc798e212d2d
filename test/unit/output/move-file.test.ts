// Durable moves (issue 20, item 4): across file systems the copy and its folder are fsynced before
// the source is unlinked, so a power cut right after the unlink cannot lose the only copy.
// /dev/shm (tmpfs) and the OS temp folder are different file systems on Linux CI machines; where
// they are not, the test says so and checks nothing it cannot see.
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { crossDeviceSteps, moveFile } from '../../../src/output/move-file.js';
import { tempDir } from '../../helpers/temp-dir.js';

const original = { ...crossDeviceSteps };
afterEach(() => Object.assign(crossDeviceSteps, original));

const shm = '/dev/shm';
const crossDevice = existsSync(shm) && statSync(shm).dev !== statSync(tmpdir()).dev;

describe('moveFile across file systems', () => {
  it.runIf(crossDevice)('fsyncs the copy, then its folder, before unlinking the source', () => {
    const source = mkdtempSync(join(shm, 'dl-move-'));
    try {
      const from = join(source, 'a.csv');
      writeFileSync(from, 'x,y\n1,2\n');
      const to = join(tempDir('dl-move-to-'), 'archive', 'a.csv');
      const steps: string[] = [];
      crossDeviceSteps.copy = (f, t) => {
        steps.push('copy');
        original.copy(f, t);
      };
      crossDeviceSteps.fsyncFile = (p) => {
        steps.push(`fsync file ${p === to ? 'copy' : p}`);
        original.fsyncFile(p);
      };
      crossDeviceSteps.fsyncFolder = (d) => {
        steps.push(`fsync folder ${d === dirname(to) ? 'target' : d}`);
        original.fsyncFolder(d);
      };
      crossDeviceSteps.unlink = (p) => {
        steps.push(`unlink ${p === from ? 'source' : p}`);
        expect(readFileSync(to, 'utf8')).toBe('x,y\n1,2\n');
        original.unlink(p);
      };
      expect(moveFile(from, to)).toBe(true);
      expect(steps.slice(0, 4)).toEqual(['copy', 'fsync file copy', 'fsync folder target', 'unlink source']);
      expect(existsSync(from)).toBe(false);
      expect(readFileSync(to, 'utf8')).toBe('x,y\n1,2\n');
    } finally {
      rmSync(source, { recursive: true, force: true });
    }
  });

  it.skipIf(crossDevice)('(skipped: /dev/shm and the temp folder are one file system here)', () => {
    expect(crossDevice).toBe(false);
  });
});
