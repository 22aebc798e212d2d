// Intake sorts file-system errors by code: a file gone since it was seen is let go ('gone'); a link
// loop is refused with its reason; any other error reaches the caller (which logs it with the path
// and leaves the file in the inbox) instead of being taken for a vanished file.
import { mkdirSync, symlinkSync } from 'node:fs';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { intakeFile } from '../../../src/pipeline/intake.js';
import { openLedger, type Ledger } from '../../../src/store/ledger.js';
import { tempDir } from '../../helpers/temp-dir.js';

const ledgers: Ledger[] = [];
afterEach(() => {
  for (const ledger of ledgers.splice(0)) ledger.close();
});

function setup(symlinks: 'refuse' | 'inside-inbox' = 'inside-inbox'): {
  config: ReturnType<typeof resolveConfig>;
  ledger: Ledger;
  inbox: string;
} {
  const dir = tempDir('dl-intake-err-');
  const config = resolveConfig({ watch: { symlinks }, logging: { level: 'silent', stdout: 'off' } }, { baseDir: dir });
  mkdirSync(config.folders.inbox, { recursive: true });
  const ledger = openLedger(config.folders.state);
  ledgers.push(ledger);
  return { config, ledger, inbox: config.folders.inbox };
}

describe('intake and file-system errors', () => {
  const now = new Date('2026-03-14T12:00:00Z');

  it('lets a file gone since it was seen go', () => {
    const { config, ledger, inbox } = setup();
    expect(intakeFile(ledger, config, join(inbox, 'gone.csv'), now)).toEqual({ kind: 'gone' });
    expect(intakeFile(ledger, config, join(inbox, 'not-a-folder.csv', 'x.csv'), now)).toEqual({ kind: 'gone' });
  });

  it('throws any other error with the path in its message (ENAMETOOLONG here) instead of calling the file gone', () => {
    const { config, ledger, inbox } = setup();
    const tooLong = join(inbox, `${'i'.repeat(300)}.csv`); // over NAME_MAX (255 bytes)
    expect(() => intakeFile(ledger, config, tooLong, now)).toThrow(
      expect.objectContaining({ code: 'ENAMETOOLONG', message: expect.stringContaining(tooLong) }),
    );
  });

  it('refuses a link that leads back to itself, naming the loop', () => {
    const { config, ledger, inbox } = setup();
    const loop = join(inbox, 'loop.csv');
    symlinkSync(loop, loop);
    expect(intakeFile(ledger, config, loop, now)).toEqual({ kind: 'rejected' });
    const row = ledger.database.prepare('SELECT error_code, error_message FROM files').get() as {
      error_code: string;
      error_message: string;
    };
    expect(row.error_code).toBe('SYMLINK_REFUSED');
    expect(row.error_message).toContain('link loop');
  });
});
