// The QC result stage on a real ledger (SQLite in a temp dir): flags added to result.qc.flags,
// observations and flags recorded, recovery closing flags, alerts dispatched after commit with
// deliveries (including a refused webhook) recorded in the ledger's deliveries table.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { alertsSection } from '../../src/config/sections/alerts.js';
import { createAlertDispatcher, createChannels, type AlertDispatcher } from '../../src/output/alerts/index.js';
import { createQcStage, loadRuleSetFile, withConfigControls } from '../../src/pipeline/qc-stage.js';
import { openLedger } from '../../src/store/ledger.js';
import { flagSignaturesOfSets } from '../../src/store/qc-order-store.js';
import {
  ledgerAlertState,
  ledgerDeliveryRecorder,
  observationHistory,
  openFlags,
  recentDeliveries,
} from '../../src/store/qc-store.js';
import { memoryLogger } from '../unit/output/alerts/alert-fixtures.js';
import { BASELINE_YIELDS, controlResult } from './rules-fixtures.js';

const workDir = mkdtempSync(join(tmpdir(), 'driftlight-qc-stage-'));
/** The shipped rules with the control defined once, as driftlight.yaml `controls` would (issue 16.1). */
const ruleSetWithControl = () =>
  withConfigControls(loadRuleSetFile(), [{ id: 'fluorescein-daily', sampleIdPattern: '^CTRL-FLU', baselineRuns: 20 }]);
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

describe('QC result stage', () => {
  it('flags, records, recovers and alerts through the ledger', async () => {
    const ledger = openLedger(join(workDir, 'state'));
    const logger = memoryLogger();
    // Port 9 (discard) on 127.0.0.1 is closed in the test environment: the webhook is refused.
    const alerts = alertsSection.parse({
      channels: [
        { id: 'log', type: 'log', attempts: 1 },
        { id: 'hook', type: 'webhook', url: 'http://127.0.0.1:9/qc', attempts: 2, backoffMs: 10, timeoutMs: 500 },
      ],
      routing: { info: ['log'], warning: ['log'], critical: ['log', 'hook'] },
      cooldownMinutes: 60,
    });
    const channels = createChannels(alerts, { env: {}, logger });
    let dispatcher: AlertDispatcher | undefined;
    const stage = createQcStage({
      ruleSet: ruleSetWithControl(),
      dispatcherFor: (forLedger) => {
        dispatcher = createAlertDispatcher({
          alerts,
          channels,
          state: ledgerAlertState(forLedger),
          recorder: ledgerDeliveryRecorder(forLedger),
          logger,
        });
        return dispatcher;
      },
    });
    const run = async (result: ReturnType<typeof controlResult>) => {
      const context = { ledger, now: new Date(result.acquiredAt ?? 0) };
      const written = await stage.apply({ ...result, sampleId: 'CTRL-FLU-07' }, context);
      stage.afterCommit?.(written, context);
      return written;
    };

    for (const [day, value] of BASELINE_YIELDS.entries())
      expect((await run(controlResult(day, value))).qc.flags).toEqual([]);
    const flagged = await run(controlResult(20, 0.9));
    expect(flagged.qc.flags.map((flag) => [flag.rule, flag.severity])).toContainEqual([
      'yield-westgard:1-3s',
      'critical',
    ]);
    expect(openFlags(ledger, ['fluorescein-daily']).map((flag) => flag.ruleId)).toContain('yield-westgard');

    const calm = await run(controlResult(21, 0.926));
    expect(calm.qc.flags).toEqual([]);
    expect(openFlags(ledger, ['fluorescein-daily'])).toEqual([]);
    expect(observationHistory(ledger, ['fluorescein-daily'])).toHaveLength(22);

    // Re-applying a set (coordinator redelivery) neither duplicates its flags nor reopens them: day 21,
    // acquired after it, already showed the yield back in control (issue 16.2: acquisition order decides).
    await stage.apply({ ...controlResult(20, 0.9), sampleId: 'CTRL-FLU-07' }, { ledger, now: new Date() });
    expect(flagSignaturesOfSets(ledger, ['ctrl-020']).size).toBe(flagged.qc.flags.length);
    expect(openFlags(ledger, ['fluorescein-daily'])).toEqual([]);

    // Clock rule: no control on Tuesday 24 March by 10:00 UTC; flagged once, closed when one arrives.
    expect(stage.checkClock(ledger, new Date('2026-03-24T10:30:00Z')).map((flag) => flag.ruleId)).toEqual([
      'control-missing',
    ]);
    expect(stage.checkClock(ledger, new Date('2026-03-24T11:30:00Z'))).toEqual([]);
    await run(controlResult(22, 0.925));
    expect(openFlags(ledger, ['fluorescein-daily'])).toEqual([]);

    await stage.idle();
    await dispatcher?.idle();
    const deliveries = recentDeliveries(ledger);
    expect(deliveries.filter((d) => d.channelId === 'hook' && d.status === 'failed')).not.toHaveLength(0);
    expect(deliveries.find((d) => d.channelId === 'hook')?.attempts).toBe(2);
    expect(deliveries.some((d) => d.channelId === 'log' && d.status === 'delivered')).toBe(true);
    expect(logger.lines.some((line) => line.message.includes('back in control'))).toBe(true);
    ledger.close();
  });

  it('ignores results that are neither a control nor an instrument check', async () => {
    const ledger = openLedger(join(workDir, 'state-2'));
    const stage = createQcStage({ ruleSet: ruleSetWithControl() });
    const sample = { ...controlResult(0, 0.5, 'dye-07'), role: 'sample' as const };
    expect(await stage.apply(sample, { ledger, now: new Date() })).toBe(sample);
    expect(observationHistory(ledger)).toEqual([]);
    ledger.close();
  });
});
