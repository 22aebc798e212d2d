// The fault campaign in CI (short form) and, with DRIFTLIGHT_FAULTS_LONG=1, the long form (see
// docs/pipeline.md, "Fault campaign"). Both must end with lost 0, duplicated 0, stuck 0, stale 0 (no
// result built from bytes its file no longer has: issue 20 item 3) and every symbolic link refused
// without touching its target; stale sets are named by sample and kind in the output.
import { afterAll, describe, expect, it } from 'vitest';
import { removeWorkspaces } from '../integration/pipeline-helpers.js';
import { campaignTable, runCampaign } from './campaign.js';

afterAll(removeWorkspaces);

const long = process.env['DRIFTLIGHT_FAULTS_LONG'] === '1';

describe('fault campaign (kill -9, storage outages, manifest sets, symlinks, slow, paused and rewriting writers)', () => {
  it(
    long ? 'long form: 1,000 sets, 30 kills, 6 outages' : 'short form: 40 sets, 3 kills, 1 outage',
    async () => {
      const { row, lostDetail, staleDetail } = await runCampaign(
        long
          ? { sets: 1000, kills: 30, outages: 6, outageMs: 3000, seed: 2020, drainTimeoutMs: 900_000 }
          : { sets: 40, kills: 3, outages: 1, outageMs: 1500, seed: 20, drainTimeoutMs: 90_000 },
      );
      process.stdout.write(
        `\nfault campaign (${long ? 'long' : 'short'} form):\n${campaignTable(row)}\n${lostDetail.map((line) => `lost: ${line}\n`).join('')}${staleDetail.map((line) => `stale: ${line}\n`).join('')}`,
      );
      expect(row.manifestSets).toBe(row.sets / 5);
      expect(row.pausedWriterSets + row.rewrittenSets).toBe(row.sets / 5);
      expect({
        lost: row.lost,
        duplicated: row.duplicated,
        stuck: row.stuck,
        stale: row.stale,
        linksFollowed: row.linksFollowed,
        unexpectedExits: row.unexpectedExits,
      }).toEqual({ lost: 0, duplicated: 0, stuck: 0, stale: 0, linksFollowed: 0, unexpectedExits: 0 });
      expect(row.results).toBe(row.sets);
    },
    long ? 3_600_000 : 180_000,
  );
});
