// The rule-kind interface: each kind (one file under rule-kinds/) declares its zod schema, whether it
// needs a baseline, how to describe itself, and a pure evaluation over a metric series or the clock.
import type { z } from 'zod';
import type { ControlObservation, MetricName } from './metrics.js';
import type { BaseRule, Severity } from './rule-base.js';

/** One value of the watched metric, in acquisition order. */
export interface SeriesPoint {
  readonly value: number;
  readonly acquiredAt: string;
  readonly epochMs: number;
  readonly setId: string;
}

/** The centre and spread a chart judges against. */
export interface EstablishedBaseline {
  readonly mean: number;
  readonly sd: number;
  /** Runs the baseline was computed from (0 for a declared target). */
  readonly runs: number;
  /** declared = target and SD in the rule set; stored = from the ledger; history = first N runs. */
  readonly source: 'declared' | 'stored' | 'history';
  /** First run of the baseline period (ISO), when known. */
  readonly fromIso?: string;
  /** Last run used to compute it (ISO); charts start after this run. */
  readonly throughIso?: string;
}

export interface ObservationContext {
  readonly controlId: string;
  readonly metric: MetricName;
  /** Points judged by charts: since the baseline period ended, ascending; the new observation is last. */
  readonly series: readonly SeriesPoint[];
  /** Present whenever the kind declares needsBaseline (evaluation skips the rule otherwise). */
  readonly baseline: EstablishedBaseline | undefined;
}

export interface ClockContext {
  readonly controlId: string;
  /** Earlier observations of this control (any order). */
  readonly history: readonly ControlObservation[];
  readonly nowEpochMs: number;
  /** IANA zone or ±HH:MM offset used for local dates and times. */
  readonly timeZone: string;
}

/** What a kind reports when its rule is violated; evaluation turns it into a QcFlag. */
export interface RuleFinding {
  readonly severity: Severity;
  /** Short name of the check that fired ("1-3s", "upper CUSUM", "Nelson 2"). */
  readonly check: string;
  /** The numbers that triggered it, named with units where they have one. */
  readonly values: Readonly<Record<string, number>>;
  /** One sentence a technician understands. */
  readonly message: string;
}

export interface RuleKindDefinition<Schema extends z.ZodType<BaseRule>> {
  readonly kind: string;
  readonly schema: Schema;
  /** True for charts judged against a mean and SD (Westgard, Nelson, EWMA, CUSUM); a function when it depends on the rule's parameters. */
  readonly needsBaseline: boolean | ((rule: z.output<Schema>) => boolean);
  /** True when the kind uses only the baseline mean: a baseline whose SD is 0 (a peak read on a 1 nm grid) still serves. Default false. */
  readonly baselineMeanSuffices?: boolean;
  /** One line for `driftlight rules check`. */
  describe(rule: z.output<Schema>): string;
  /** Judges the newest point of the series (observation-driven kinds). */
  evaluate?(rule: z.output<Schema>, context: ObservationContext): RuleFinding[];
  /**
   * False while a flagged chart has not yet shown it is back in control although it does not fire
   * (e.g. a CUSUM restarted after its signal); recovery notices wait for it. Default: settled.
   */
  settled?(rule: z.output<Schema>, context: ObservationContext): boolean;
  /** Judges the state at a clock time (time-driven kinds such as control-missing). */
  evaluateClock?(rule: z.output<Schema>, context: ClockContext): RuleFinding[];
}

/** Identity helper that keeps a kind definition's schema type. */
export function defineRuleKind<Schema extends z.ZodType<BaseRule>>(
  definition: RuleKindDefinition<Schema>,
): RuleKindDefinition<Schema> {
  return definition;
}
