// The drift study behind docs/qc.md: the default rule set replayed over simulated daily control
// yields (seeded), measuring days to detect a slow drift and false alarms while in control.
import { readFileSync } from 'node:fs';
import {
  controlSchema,
  createSeededRandom,
  parseRuleSet,
  replayObservations,
  withControls,
  type ControlObservation,
  type QcFlag,
  type RuleSet,
} from '../../../src/qc/index.js';

/** The shipped rule set (no control of its own) with the study's control defined as driftlight.yaml would define it. */
export const DEFAULT_RULE_SET: RuleSet = withControls(
  parseRuleSet(readFileSync(new URL('../../../rules/default.yaml', import.meta.url), 'utf8'), 'rules/default.yaml'),
  [controlSchema.parse({ id: 'fluorescein-daily', match: { sampleIdPattern: '^CTRL-FLU' } })],
  'test',
);

/** Scenario: fluorescein control, Φ = 0.925 (Magde et al. 2002), 1.5 % CV day to day, 20-run baseline. */
export const SCENARIO = { targetYield: 0.925, cvPercent: 1.5, baselineDays: 20, driftPercentPerDay: -0.5 } as const;

/** Daily control observations: baseline days, in-control days, then a linear drift of the mean. */
export function simulateDays(seed: number, inControlDays: number, driftDays: number): ControlObservation[] {
  const random = createSeededRandom(seed);
  const days = SCENARIO.baselineDays + inControlDays + driftDays;
  const observations: ControlObservation[] = [];
  for (let day = 0; day < days; day++) {
    const driftDay = Math.max(0, day - SCENARIO.baselineDays - inControlDays + 1);
    const mean = SCENARIO.targetYield * (1 + (SCENARIO.driftPercentPerDay / 100) * driftDay);
    const value = mean * (1 + (SCENARIO.cvPercent / 100) * random.standardNormal());
    const acquiredAt = new Date(Date.UTC(2026, 0, 1 + day, 8)).toISOString();
    observations.push({
      controlId: 'fluorescein-daily',
      setId: `d${day}`,
      acquiredAt,
      metrics: { controlQuantumYield: value },
    });
  }
  return observations;
}

const hasSeverity = (flags: readonly QcFlag[], severities: readonly string[]): boolean =>
  flags.some((flag) => severities.includes(flag.severity));

/** Days from drift start (1 = first drifted run) to the first critical flag and to the first warning-or-critical one. */
export function detectionDays(
  seed: number,
  inControlDays = 10,
  driftDays = 40,
): { critical?: number; warningOrCritical?: number } {
  const { steps } = replayObservations(simulateDays(seed, inControlDays, driftDays), DEFAULT_RULE_SET);
  const driftStart = SCENARIO.baselineDays + inControlDays;
  const found: { critical?: number; warningOrCritical?: number } = {};
  for (let index = driftStart; index < steps.length; index++) {
    const flags = steps[index]?.flags ?? [];
    const day = index - driftStart + 1;
    if (found.critical === undefined && hasSeverity(flags, ['critical'])) found.critical = day;
    if (found.warningOrCritical === undefined && hasSeverity(flags, ['warning', 'critical']))
      found.warningOrCritical = day;
  }
  return found;
}

/** Flagged in-control days per 100 (after the baseline): critical, and warning-or-critical. */
export function falseAlarmsPer100Days(
  seeds: readonly number[],
  days: number,
): { critical: number; warningOrCritical: number } {
  let critical = 0;
  let warningOrCritical = 0;
  for (const seed of seeds) {
    const { steps } = replayObservations(simulateDays(seed, days, 0), DEFAULT_RULE_SET);
    for (const step of steps.slice(SCENARIO.baselineDays)) {
      if (hasSeverity(step.flags, ['critical'])) critical++;
      if (hasSeverity(step.flags, ['warning', 'critical'])) warningOrCritical++;
    }
  }
  const totalDays = seeds.length * days;
  return { critical: (100 * critical) / totalDays, warningOrCritical: (100 * warningOrCritical) / totalDays };
}
