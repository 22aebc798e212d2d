// During a storage outage a failure is logged once per folder per interval, not once per set
// (issue 20 item 9); the suppressed ones are counted in the next line.
import { describe, expect, it } from 'vitest';
import { OutageLog, outageKey } from '../../../src/pipeline/outage-log.js';

const enotdir = (path: string): Error =>
  Object.assign(new Error(`ENOTDIR: not a directory, open '${path}'`), { code: 'ENOTDIR', path });

describe('OutageLog', () => {
  it('keys a failure by the folder of its path, else by its code', () => {
    expect(outageKey(enotdir('/w/results/2026-03-14/.a.json.1.2.tmp'))).toBe('/w/results/2026-03-14');
    expect(outageKey(Object.assign(new Error('full'), { code: 'ENOSPC' }))).toBe('ENOSPC');
    expect(outageKey(undefined)).toBe('unknown');
  });

  it('admits one failure per folder per interval and counts the others for the next line', () => {
    const log = new OutageLog(30_000);
    const results = outageKey(enotdir('/w/results/2026-03-14/.a.json.1.2.tmp'));
    const outbox = outageKey(enotdir('/w/outbox/2026-03-14/.b.1.3.tmp'));
    // 40 sets failing within one second in the same folder: one line.
    const admitted = Array.from({ length: 40 }, (_u, i) => log.admit(results, 1000 + i * 25)).filter(
      (a) => a !== undefined,
    );
    expect(admitted).toEqual([{ suppressed: 0 }]);
    // Another folder has its own line.
    expect(log.admit(outbox, 1500)).toEqual({ suppressed: 0 });
    // After the interval, the next line carries the count of those not logged.
    expect(log.admit(results, 31_000)).toEqual({ suppressed: 39 });
    expect(log.admit(results, 31_001)).toBeUndefined();
  });
});
