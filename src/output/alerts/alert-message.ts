// What an alert says: one message per rule + control + metric (checks of one rule merged), for a
// flag or a recovery, rendered as a subject line, plain text and a JSON payload.
import { flagKey, type QcFlag, type RecoveryNotice, type Severity } from '../../qc/index.js';
import { SEVERITIES } from '../../qc/index.js';

export interface AlertMessage {
  readonly type: 'flag' | 'recovery';
  /** rule|control|metric: the cooldown and de-duplication key. */
  readonly key: string;
  readonly severity: Severity;
  readonly ruleId: string;
  readonly kind: string;
  readonly controlId: string;
  readonly metric: string;
  /** Checks that fired ("1-3s", "4-1s"); empty for a recovery. */
  readonly checks: readonly string[];
  /** One or more technician sentences. */
  readonly message: string;
  readonly values: Readonly<Record<string, number>>;
  /** Acquisition time of the judged run, ISO. */
  readonly acquiredAt: string;
  readonly setId: string;
  /** When the alert was composed, ISO. */
  readonly createdAt: string;
}

/** Merges flags of the same rule + control + metric into one message each (highest severity wins). O(n). */
export function messagesFromFlags(flags: readonly QcFlag[], createdAt: string): AlertMessage[] {
  const byKey = new Map<string, QcFlag[]>();
  for (const flag of flags) {
    const key = flagKey(flag);
    byKey.set(key, [...(byKey.get(key) ?? []), flag]);
  }
  return [...byKey.entries()].map(([key, group]) => {
    const worst = group.reduce((a, b) => (SEVERITIES.indexOf(b.severity) > SEVERITIES.indexOf(a.severity) ? b : a));
    return {
      type: 'flag',
      key,
      severity: worst.severity,
      ruleId: worst.ruleId,
      kind: worst.kind,
      controlId: worst.controlId,
      metric: worst.metric,
      checks: group.map((flag) => flag.check),
      message: [...new Set(group.map((flag) => flag.message))].join(' '),
      values: Object.assign({}, ...group.map((flag) => flag.values)) as Record<string, number>,
      acquiredAt: worst.acquiredAt,
      setId: worst.setId,
      createdAt,
    };
  });
}

/** The recovery message for a notice; severity is that of the alert it closes. */
export function messageFromRecovery(notice: RecoveryNotice, severity: Severity, createdAt: string): AlertMessage {
  return {
    type: 'recovery',
    key: flagKey(notice),
    severity,
    ruleId: notice.ruleId,
    kind: notice.kind,
    controlId: notice.controlId,
    metric: notice.metric,
    checks: [],
    message: notice.message,
    values: { value: notice.value },
    acquiredAt: notice.acquiredAt,
    setId: '',
    createdAt,
  };
}

/** "[driftlight CRITICAL] fluorescein-daily controlQuantumYield: yield-westgard 1-3s". */
export function alertSubject(message: AlertMessage): string {
  const tag = message.type === 'recovery' ? 'back in control' : message.severity.toUpperCase();
  const checks = message.checks.length === 0 ? '' : ` ${message.checks.join(', ')}`;
  return `[driftlight ${tag}] ${message.controlId} ${message.metric}: ${message.ruleId}${checks}`;
}

/** Plain-text body: the sentence, then the numbers and where they came from. */
export function alertText(message: AlertMessage): string {
  const numbers = Object.entries(message.values).map(([name, value]) => `  ${name}: ${Number(value.toPrecision(6))}`);
  return [
    message.message,
    '',
    `rule: ${message.ruleId} (${message.kind}${message.checks.length === 0 ? '' : `: ${message.checks.join(', ')}`})`,
    `control: ${message.controlId}`,
    `metric: ${message.metric}`,
    `acquired: ${message.acquiredAt}${message.setId === '' ? '' : ` (set ${message.setId})`}`,
    'values:',
    ...numbers,
    '',
  ].join('\n');
}

/** JSON payload of a webhook POST. */
export function alertPayload(message: AlertMessage): Record<string, unknown> {
  return { schema: 'driftlight.alert/1', subject: alertSubject(message), ...message };
}
