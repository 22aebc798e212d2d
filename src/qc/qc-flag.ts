// The flag a rule raises on a result, and the recovery notice when a flagged metric is back in control.
import type { MetricName } from './metrics.js';
import type { Severity } from './rule-base.js';

export interface QcFlag {
  readonly ruleId: string;
  /** Rule kind ("westgard", "ewma", …). */
  readonly kind: string;
  /** The check within the kind that fired ("1-3s", "lower CUSUM", "Nelson 2"). */
  readonly check: string;
  readonly severity: Severity;
  /** Control id, or "instrument" for instrument-scoped rules. */
  readonly controlId: string;
  readonly metric: MetricName;
  /** The numbers that triggered the flag. */
  readonly values: Readonly<Record<string, number>>;
  /** One sentence for a technician. */
  readonly message: string;
  /** Acquisition time of the judged run (or the clock time, for control-missing), ISO. */
  readonly acquiredAt: string;
  /** Set (run) id of the judged observation; empty for clock rules. */
  readonly setId: string;
}

export interface RecoveryNotice {
  readonly ruleId: string;
  readonly kind: string;
  readonly controlId: string;
  readonly metric: MetricName;
  readonly value: number;
  readonly acquiredAt: string;
  readonly message: string;
}

/** Cooldown and recovery key: rule + control + metric. */
export function flagKey(flag: {
  readonly ruleId: string;
  readonly controlId: string;
  readonly metric: MetricName;
}): string {
  return `${flag.ruleId}|${flag.controlId}|${flag.metric}`;
}
