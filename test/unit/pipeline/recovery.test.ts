// Finding a moved file whose new location the ledger lost: by name, then by the ~N names a move
// takes when the name is in use, matched by sha256 (never a same-named file with other content), or
// with `grown` by the sha256 of its first bytes (a file a writer went on writing after its move).
import { createHash } from 'node:crypto';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { findMovedCopy } from '../../../src/pipeline/recovery.js';
import { tempDir } from '../../helpers/temp-dir.js';

const sha256 = (text: string): string => createHash('sha256').update(text).digest('hex');

describe('findMovedCopy', () => {
  it('returns the copy with the same content under the name or a ~N name, and nothing when none matches', () => {
    const dir = tempDir('dl-recovery-');
    writeFileSync(join(dir, 'irf.csv'), 'the IRF of Monday\n');
    writeFileSync(join(dir, 'irf~1.csv'), 'the IRF of Tuesday\n');
    writeFileSync(join(dir, 'irf~2.csv'), 'the IRF of Wednesday\n');
    expect(findMovedCopy(dir, { name: 'irf.csv', sha256: sha256('the IRF of Monday\n') })).toBe(join(dir, 'irf.csv'));
    expect(findMovedCopy(dir, { name: 'irf.csv', sha256: sha256('the IRF of Wednesday\n') })).toBe(
      join(dir, 'irf~2.csv'),
    );
    expect(findMovedCopy(dir, { name: 'irf.csv', sha256: sha256('the IRF of Thursday\n') })).toBeUndefined();
    // The name itself taken by nothing (its holder was deleted by hand): the ~N names are still searched.
    writeFileSync(join(dir, 'blank~1.csv'), 'blank\n');
    expect(findMovedCopy(dir, { name: 'blank.csv', sha256: sha256('blank\n') })).toBe(join(dir, 'blank~1.csv'));
    expect(findMovedCopy(join(dir, 'no-such-day'), { name: 'irf.csv', sha256: sha256('x') })).toBeUndefined();
  });

  it('with `grown`, also returns a longer copy whose first bytes are the recorded content (a writer that held the file open)', () => {
    const dir = tempDir('dl-recovery-');
    const head = 'time,counts\n0,1\n';
    writeFileSync(join(dir, 'decay.csv'), 'time,counts\n0,7\n');
    writeFileSync(join(dir, 'decay~1.csv'), `${head}1,2\n2,3\n`);
    const recorded = { name: 'decay.csv', sha256: sha256(head), sizeBytes: Buffer.byteLength(head) };
    expect(findMovedCopy(dir, recorded)).toBeUndefined();
    expect(findMovedCopy(dir, recorded, { grown: true })).toBe(join(dir, 'decay~1.csv'));
    // A shorter or same-size copy with other bytes is never taken for it.
    expect(findMovedCopy(dir, { ...recorded, sha256: sha256('time,counts\n0,9\n') }, { grown: true })).toBeUndefined();
  });
});
