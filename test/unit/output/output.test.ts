// Durable outputs on real files: atomic writes leave no temp files, quarantine writes NAME.error.json.
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  fsyncDirectoryAsync,
  moveFile,
  quarantineFile,
  uniqueTarget,
  writeFileAtomic,
  writeFileAtomicAsync,
} from '../../../src/output/index.js';
import { tempDir } from '../../helpers/temp-dir.js';

describe('output', () => {
  it('writes atomically, replacing the target, with no temp file left', () => {
    const dir = tempDir('dl-out-');
    const path = join(dir, 'deep', 'r.json');
    writeFileAtomic(path, 'one');
    writeFileAtomic(path, 'two');
    expect(readFileSync(path, 'utf8')).toBe('two');
    expect(readdirSync(join(dir, 'deep'))).toEqual(['r.json']);
  });

  it('creates a missing folder only when a write or move needs it, and reports a vanished source', async () => {
    const dir = tempDir('dl-out-');
    const result = join(dir, 'results', '2026-03-14', 'set-a.json');
    await writeFileAtomicAsync(result, '{"a":1}\n', { syncFolder: false });
    await fsyncDirectoryAsync(join(dir, 'results', '2026-03-14'));
    expect(readFileSync(result, 'utf8')).toBe('{"a":1}\n');
    expect(readdirSync(join(dir, 'results', '2026-03-14'))).toEqual(['set-a.json']);
    const input = join(dir, 'in.csv');
    writeFileSync(input, 'x');
    const target = join(dir, 'archive', '2026-03-14', 'in.csv');
    expect(moveFile(input, target, { syncFolder: false })).toBe(true);
    expect(readFileSync(target, 'utf8')).toBe('x');
    expect(existsSync(input)).toBe(false);
    expect(moveFile(input, join(dir, 'archive', 'again.csv'))).toBe(false);
  });

  it('quarantines a file with its reason and never overwrites an earlier one', () => {
    const dir = tempDir('dl-out-');
    const now = new Date('2026-03-14T10:00:00Z');
    for (let i = 0; i < 2; i++) {
      const input = join(dir, 'bad.csv');
      writeFileSync(input, `junk ${i}`);
      quarantineFile(
        join(dir, 'q'),
        input,
        'bad.csv',
        { code: 'NON_NUMERIC', message: 'column 2 holds "x"', hint: 'fix it', line: 4 },
        now,
        'f'.repeat(64),
      );
      expect(existsSync(input)).toBe(false);
    }
    const day = join(dir, 'q', '2026-03-14');
    expect(readdirSync(day).sort()).toEqual(['bad.csv', 'bad.csv.error.json', 'bad~1.csv', 'bad~1.csv.error.json']);
    const record = JSON.parse(readFileSync(join(day, 'bad.csv.error.json'), 'utf8')) as Record<string, unknown>;
    expect(record).toMatchObject({ code: 'NON_NUMERIC', line: 4, hint: 'fix it', quarantinedAt: now.toISOString() });
    expect(uniqueTarget(day, 'bad.csv')).toBe(join(day, 'bad~2.csv'));
  });
});
