// Shared builders for alert tests: flags as the rules engine produces them.
import type { QcFlag, RecoveryNotice } from '../../../../src/qc/index.js';

/** A flag of rule `ruleId` on control yield with the given severity and check. */
export function flag(ruleId: string, severity: QcFlag['severity'], check = '1-3s'): QcFlag {
  return {
    ruleId,
    kind: 'westgard',
    check,
    severity,
    controlId: 'fluorescein-daily',
    metric: 'controlQuantumYield',
    values: { value: 0.891, mean: 0.925, sd: 0.01, sdUnits: -3.4 },
    message: `control yield 0.891 is 3.4 SD below target 0.925 (${check}).`,
    acquiredAt: '2026-03-02T08:00:00.000Z',
    setId: 'set-1',
  };
}

/** The recovery notice of rule `ruleId`. */
export function recovery(ruleId: string): RecoveryNotice {
  return {
    ruleId,
    kind: 'westgard',
    controlId: 'fluorescein-daily',
    metric: 'controlQuantumYield',
    value: 0.924,
    acquiredAt: '2026-03-03T08:00:00.000Z',
    message: 'control yield 0.924 is back in control for control fluorescein-daily (rule w no longer fires).',
  };
}

/** A logger that keeps lines in memory. */
export function memoryLogger(): {
  lines: { level: string; message: string; object: object }[];
  info: (o: object, m: string) => void;
  warn: (o: object, m: string) => void;
  error: (o: object, m: string) => void;
} {
  const lines: { level: string; message: string; object: object }[] = [];
  const at =
    (level: string) =>
    (object: object, message: string): void =>
      void lines.push({ level, message, object });
  return { lines, info: at('info'), warn: at('warn'), error: at('error') };
}
