// Issue 16.2 (must-show, QC side): a seeded two-month control series with a slow drift, a step and a
// back-dated re-export, fed through the real QC stage on a real SQLite ledger in different arrival
// orders (day by day as `watch` sees it, a backlog in file-name order as `process` takes it, a
// shuffled order, reversed): identical flags, the same open alarms, and no false recovery.
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../src/analysis/result.js';
import type { AlertDispatcher } from '../../src/output/alerts/index.js';
import { createQcStage, loadRuleSetFile, withConfigControls } from '../../src/pipeline/qc-stage.js';
import {
  flagKey,
  observationFromResult,
  replayObservations,
  type QcFlag,
  type RecoveryNotice,
} from '../../src/qc/index.js';
import { openLedger } from '../../src/store/ledger.js';
import { flagSignaturesOfSets } from '../../src/store/qc-order-store.js';
import { openFlags } from '../../src/store/qc-store.js';
import { tempDir } from '../helpers/temp-dir.js';
import { controlSeries, DRIFT_START_DAY, SERIES_CONTROL, shuffled, STEP_DAY } from './qc-order-fixtures.js';

const ruleSet = withConfigControls(loadRuleSetFile(), [SERIES_CONTROL]);
const series = controlSeries(20261205);
const reexport = series[series.length - 1] as AnalysisResult;

interface Outcome {
  readonly flags: string[];
  readonly open: string[];
  readonly alerts: { flags: QcFlag[]; recoveries: RecoveryNotice[] }[];
}

/** Feeds results through the QC stage in the given order on a fresh ledger; returns every stored flag, open keys and dispatched alerts. */
async function feed(order: readonly AnalysisResult[], name: string): Promise<Outcome> {
  const ledger = openLedger(join(tempDir(`driftlight-order-${name}-`), 'state'));
  const alerts: { flags: QcFlag[]; recoveries: RecoveryNotice[] }[] = [];
  const recorder: AlertDispatcher = {
    dispatch(flags, recoveries = []) {
      alerts.push({ flags: [...flags], recoveries: [...recoveries] });
      return [];
    },
    idle: () => Promise.resolve(),
  };
  const stage = createQcStage({ ruleSet, dispatcherFor: () => recorder });
  for (const result of order) {
    const context = { ledger, now: new Date(Date.parse(result.acquiredAt ?? '') + 3_600_000) };
    const written = await stage.apply(result, context);
    stage.afterCommit?.(written, context);
  }
  const flags = [
    ...flagSignaturesOfSets(
      ledger,
      series.map((result) => result.setId),
    ),
  ].sort();
  const open = [...new Set(openFlags(ledger, ['teal', 'instrument']).map(flagKey))].sort();
  ledger.close();
  return { flags, open, alerts };
}

describe('QC judged in acquisition order (issue 16.2)', () => {
  it('gives identical flags and open alarms whatever order the runs arrive in, with no false recovery', async () => {
    const dayByDay = await feed(series, 'watch');
    const backlog = await feed(
      [...series].sort((a, b) => (a.setId < b.setId ? -1 : 1)),
      'process',
    );
    const shuffledOrder = await feed(shuffled(series, 7), 'shuffled');
    const reversed = await feed([...series].reverse(), 'reversed');

    // The pure replay in acquisition order (src/qc/replay.ts) is the reference the ledger must match.
    const observations = series.flatMap((result) => observationFromResult(result, ruleSet.controls) ?? []);
    const replay = replayObservations(observations, ruleSet);
    const expected = replay.steps
      .flatMap((step) => step.flags.map((flag) => `${flag.setId}|${flagKey(flag)}|${flag.check}`))
      .sort();
    expect(expected.length).toBeGreaterThan(10);
    for (const outcome of [dayByDay, backlog, shuffledOrder, reversed]) {
      expect(outcome.flags).toEqual(expected);
      expect(outcome.open).toEqual(dayByDay.open);
    }

    // The newest run is 5 SD low: the yield alarms stay open (no "back in control" from the re-export).
    expect(dayByDay.open).toEqual(
      expect.arrayContaining(['yield-westgard|teal|controlQuantumYield', 'yield-cusum|teal|controlQuantumYield']),
    );
    const lastArrival = dayByDay.alerts[dayByDay.alerts.length - 1];
    expect(lastArrival?.recoveries).toEqual([]);
    expect(lastArrival?.flags).toEqual([]);
    // No recovery of the yield was ever announced after the step (the level stayed off).
    const stepIso = series[STEP_DAY]?.acquiredAt ?? '';
    for (const outcome of [dayByDay, backlog, shuffledOrder, reversed]) {
      const yieldRecoveries = outcome.alerts
        .flatMap((alert) => alert.recoveries)
        .filter((notice) => notice.metric === 'controlQuantumYield' && notice.acquiredAt >= stepIso);
      expect(yieldRecoveries).toEqual([]);
    }

    // First yield alarm after the drift starts: within the days docs/qc.md states (critical by day 8 of a −0.5 %/day drift).
    const driftStartIso = series[DRIFT_START_DAY]?.acquiredAt ?? '';
    const firstCritical = replay.steps.findIndex(
      (step) =>
        step.observation.acquiredAt >= driftStartIso &&
        step.flags.some((flag) => flag.metric === 'controlQuantumYield' && flag.severity === 'critical'),
    );
    const firstCriticalDay = firstCritical - DRIFT_START_DAY + 1;
    expect(firstCriticalDay).toBeGreaterThan(0);
    expect(firstCriticalDay).toBeLessThanOrEqual(8);
    // The sensitivity loss (−1.5 %/day from the same day) is flagged within 4 days (docs/qc.md, 1 % CV: max 4)
    // and, the level staying 22 % low, its alarm is still open at the end (issue 16.5).
    const firstIntensity = replay.steps.findIndex(
      (step) =>
        step.observation.acquiredAt >= driftStartIso &&
        step.flags.some((flag) => flag.metric === 'intensityPerAbsorbedLight'),
    );
    expect(firstIntensity - DRIFT_START_DAY + 1).toBeLessThanOrEqual(4);
    expect(dayByDay.open).toContain('intensity-cusum|teal|intensityPerAbsorbedLight');
    expect(reexport.setId).toMatch(/reexport/);
  });
});
