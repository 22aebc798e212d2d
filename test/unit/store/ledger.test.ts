// The ledger on real SQLite: WAL mode, migrations applied once and extensible, file/set states, status.
import { describe, expect, it } from 'vitest';
import {
  applyMigrations,
  DECAY_IRF_CANDIDATES_SQL,
  FILES_TO_ARCHIVE_SQL,
  filesAwaitingMoveSql,
  filesBySha256,
  getSet,
  insertFile,
  insertSet,
  ledgerStatus,
  markSetDone,
  markSetQueued,
  MIGRATIONS,
  openLedger,
  PAIRING_CANDIDATES_SQL,
  RECENT_REFERENCE_SETS_SQL,
  REFERENCE_SETS_MEASURED_SQL,
  setFileState,
  setsInState,
} from '../../../src/store/index.js';
import { tempDir } from '../../helpers/temp-dir.js';

const now = new Date('2026-03-14T10:00:00Z');

describe('ledger', () => {
  it('opens in WAL mode and applies each migration once, including appended ones', () => {
    const dir = tempDir('dl-ledger-');
    const extra = {
      id: '9001-test-extra',
      up: (db: import('better-sqlite3').Database) => db.exec('CREATE TABLE extra_test (id INTEGER)'),
    };
    const ledger = openLedger(dir, { migrations: [...MIGRATIONS, extra] });
    expect(ledger.database.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(applyMigrations(ledger.database, [...MIGRATIONS, extra])).toEqual([]);
    ledger.close();
    const again = openLedger(dir, { migrations: [...MIGRATIONS, extra] });
    const tables = again.database.prepare(`SELECT name FROM sqlite_master WHERE type = 'table'`).all() as {
      name: string;
    }[];
    expect(tables.map((t) => t.name)).toEqual(
      expect.arrayContaining(['files', 'sets', 'results', 'set_pairings', 'extra_test']),
    );
    again.close();
  });

  it('records files and sets through their states and reports status', () => {
    const ledger = openLedger(tempDir('dl-ledger-'));
    const file = ledger.transaction(() =>
      insertFile(ledger, { sha256: 'a'.repeat(64), path: '/in/x.csv', name: 'x.csv', sizeBytes: 10 }, now),
    );
    expect(file.state).toBe('seen');
    insertSet(ledger, {
      id: 'x-aaaa',
      sampleId: 'x',
      role: 'sample',
      source: 'pattern',
      createdAt: now,
      deadlineAt: now,
    });
    setFileState(ledger, file.id, 'assembled', now, 'x-aaaa');
    expect(ledgerStatus(ledger).oldestWaiting?.setId).toBe('x-aaaa');
    markSetQueued(ledger, 'x-aaaa', 'x-aaaa', now);
    expect(setsInState(ledger, 'queued').map((s) => s.id)).toEqual(['x-aaaa']);
    markSetDone(ledger, 'x-aaaa', '/r/x.json', true, now);
    expect(getSet(ledger, 'x-aaaa')).toMatchObject({ state: 'done', partial: true, resultPath: '/r/x.json' });
    expect(filesBySha256(ledger, 'a'.repeat(64))[0]?.setId).toBe('x-aaaa');
    const status = ledgerStatus(ledger);
    expect(status.files.assembled).toBe(1);
    expect(status.sets.done).toBe(1);
    expect(() => setFileState(ledger, file.id, 'bogus' as 'done', now)).toThrow(/CHECK constraint/);
    ledger.close();
  });

  it('answers the queries run at every dispatch and start from an index, newest first, without sorting the ledger', () => {
    // Query plans, not timings: a plan that scans the table or sorts it would grow with months of data.
    const ledger = openLedger(tempDir('dl-ledger-'));
    const plan = (sql: string, ...args: unknown[]): string =>
      (ledger.database.prepare(`EXPLAIN QUERY PLAN ${sql}`).all(...args) as { detail: string }[])
        .map((r) => r.detail)
        .join('; ');
    expect(plan(PAIRING_CANDIDATES_SQL, 'blank', 200)).toMatch(
      /^SEARCH files USING INDEX files_part_seen \(part=\?\)$/,
    );
    expect(plan(DECAY_IRF_CANDIDATES_SQL, 200)).toMatch(/^SCAN files USING INDEX files_irf_decays$/);
    expect(plan(RECENT_REFERENCE_SETS_SQL, 'x', 50)).toMatch(/^SEARCH sets USING INDEX sets_role_created \(role=\?\)$/);
    expect(plan(REFERENCE_SETS_MEASURED_SQL, '2026-03-01T00:00:00.000Z', '2026-03-02T00:00:00.000Z', 'x')).toMatch(
      /^SEARCH f USING INDEX files_part_acquired \(part=\? AND acquired_at>\? AND acquired_at<\?\); SEARCH s USING INDEX sqlite_autoindex_sets_1 \(id=\?\)/,
    );
    expect(plan(filesAwaitingMoveSql(1), 'done')).toMatch(/^SEARCH files USING INDEX files_unplaced \(state=\?\)$/);
    // Not files_state: every done file of months would match state = 'done'.
    expect(plan(FILES_TO_ARCHIVE_SQL, 'x-aaaa')).toMatch(/^SEARCH files USING INDEX files_set \(set_id=\?\)$/);
    ledger.close();
  });

  it('commits a durable transaction with the WAL synced (synchronous FULL) and returns to NORMAL after it', () => {
    const ledger = openLedger(tempDir('dl-ledger-'));
    // SQLite: synchronous 1 = NORMAL, 2 = FULL (sqlite.org/pragma.html#pragma_synchronous).
    expect(ledger.database.pragma('synchronous', { simple: true })).toBe(1);
    const inside = ledger.durableTransaction(() => {
      insertSet(ledger, {
        id: 'd-aaaa',
        sampleId: 'd',
        role: 'sample',
        source: 'pattern',
        createdAt: now,
        deadlineAt: now,
      });
      return ledger.database.pragma('synchronous', { simple: true });
    });
    expect(inside).toBe(2);
    expect(ledger.database.pragma('synchronous', { simple: true })).toBe(1);
    expect(getSet(ledger, 'd-aaaa')?.state).toBe('open');
    expect(() =>
      ledger.durableTransaction(() => {
        throw new Error('rolled back');
      }),
    ).toThrow('rolled back');
    expect(ledger.database.pragma('synchronous', { simple: true })).toBe(1);
    ledger.close();
  });
});
