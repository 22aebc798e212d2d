// An invented QC history for charts, digests and their tests and benchmark: daily runs of one control
// (yield and lifetime, seeded normal noise, an optional upward shift), instrument checks (water Raman
// SNR and peak error, IRF width), the flags the real rules raise on them, and an optional rebaseline.
import {
  controlSchema,
  createSeededRandom,
  epochMsToIso,
  evaluateRuleStates,
  parseRuleSet,
  withControls,
  type RuleSet,
} from '../../src/qc/index.js';
import { INSTRUMENT_SCOPE } from '../../src/qc/index.js';
import type { Ledger } from '../../src/store/ledger.js';
import { baselineRecords, recordFlags, recordObservation, saveBaseline } from '../../src/store/qc-store.js';
import type { ControlObservation } from '../../src/qc/index.js';

/** Rules for the demo control "teal", defined in the demo config with declared targets Φ 0.80 ± 0.03 and τ 4.1 ± 0.1 ns. */
export const TEAL_RULES_YAML = `version: 1
name: teal rules (test and benchmark)
rules:
  - { id: yield-westgard, metric: controlQuantumYield, scope: { control: teal }, kind: westgard, severity: critical, warningSeverity: warning, rangeScope: consecutive, warningGate: false }
  - { id: yield-ewma, metric: controlQuantumYield, scope: { control: teal }, kind: ewma, severity: warning, lambda: 0.2, limitWidth: 2.962 }
  - { id: yield-cusum, metric: controlQuantumYield, scope: { control: teal }, kind: cusum, severity: critical, referenceSd: 0.5, decisionSd: 5 }
  - { id: lifetime-westgard, metric: meanLifetimeNs, scope: { control: teal }, kind: westgard, severity: critical, checks: [1-3s, 2-2s, 4-1s, 10-x] }
  - { id: raman-snr, metric: ramanSnr, scope: instrument, kind: instrument-health, severity: warning, below: 300 }
  - { id: irf-width, metric: irfWidthNs, scope: instrument, kind: instrument-health, severity: warning, above: 0.3 }
`;

export interface HistoryOptions {
  /** Days of history ending the day before `endDay` (YYYY-MM-DD, UTC). */
  readonly days: number;
  readonly endDay: string;
  readonly seed?: number;
  /** From this day index on, the yield runs this many SDs high (a drift to flag). */
  readonly shiftFromDay?: number;
  readonly shiftSd?: number;
  /** Day index of a rebaseline of the lifetime (a new baseline period starts there). */
  readonly rebaselineDay?: number;
}

/** The control "teal" as the demo config defines it (examples/day/driftlight.yaml). */
const TEAL_CONTROL = {
  id: 'teal',
  match: { sampleIdPattern: '^CTRL-teal' },
  targets: { controlQuantumYield: { mean: 0.8, sd: 0.03 }, meanLifetimeNs: { mean: 4.1, sd: 0.1 } },
};

/** The rule set of TEAL_RULES_YAML with the demo config's control, as the pipeline merges them. */
export function tealRuleSet(): RuleSet {
  return withControls(
    parseRuleSet(TEAL_RULES_YAML, 'teal-rules.yaml'),
    [controlSchema.parse(TEAL_CONTROL)],
    'controls',
  );
}

/** Writes the history into the ledger, evaluating the real rules run by run; returns the observations. */
export function seedQcHistory(ledger: Ledger, ruleSet: RuleSet, options: HistoryOptions): ControlObservation[] {
  const random = createSeededRandom(options.seed ?? 7);
  const endMs = Date.parse(`${options.endDay}T00:00:00Z`);
  const history: ControlObservation[] = [];
  for (let day = 0; day < options.days; day++) {
    const dayMs = endMs - (options.days - day) * 86_400_000;
    const shift = options.shiftFromDay !== undefined && day >= options.shiftFromDay ? (options.shiftSd ?? 2) : 0;
    const control: ControlObservation = {
      controlId: 'teal',
      setId: `CTRL-teal-d${String(day).padStart(3, '0')}`,
      acquiredAt: epochMsToIso(dayMs + 8 * 3_600_000),
      metrics: {
        controlQuantumYield: 0.8 + 0.03 * (shift + random.standardNormal()),
        meanLifetimeNs:
          4.1 +
          0.1 * random.standardNormal() +
          (options.rebaselineDay !== undefined && day >= options.rebaselineDay ? 0.3 : 0),
      },
    };
    const instrument: ControlObservation = {
      controlId: INSTRUMENT_SCOPE,
      setId: `raman-d${String(day).padStart(3, '0')}`,
      acquiredAt: epochMsToIso(dayMs + 7 * 3_600_000),
      metrics: {
        ramanSnr: 900 - 4 * day + 30 * random.standardNormal(),
        ramanPeakErrorNm: 0.1 * random.standardNormal(),
        irfWidthNs: 0.18 + 0.01 * random.standardNormal(),
      },
    };
    if (options.rebaselineDay === day) {
      saveBaseline(
        ledger,
        { controlId: 'teal', metric: 'meanLifetimeNs', fromIso: control.acquiredAt },
        control.acquiredAt,
      );
    }
    for (const observation of [instrument, control]) {
      recordObservation(ledger, observation);
      const { flags } = evaluateRuleStates({ history, observation, ruleSet, baselines: baselineRecords(ledger) });
      recordFlags(ledger, flags);
      history.push(observation);
    }
  }
  return history;
}
