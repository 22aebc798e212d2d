// "Control missing": on scheduled local days, flags a control that has no result (carrying the
// rule's metric) that day once the local due time has passed; a late result clears it. Evaluated
// against a clock time passed in; zone math uses Intl (pure).
import { z } from 'zod';
import { baseRuleShape, INSTRUMENT_SCOPE } from '../rule-base.js';
import { defineRuleKind, type RuleFinding } from '../rule-kind.js';
import { isValidTimeZone, localParts, parseClockTime, parseIsoToEpochMs, WEEKDAYS } from '../time.js';
import { metricLabel } from '../metrics.js';

export const controlMissingRuleSchema = z
  .strictObject({
    ...baseRuleShape,
    kind: z.literal('control-missing'),
    /** Local time (HH:MM, 24 h) by which the control must have a result. Required. */
    dueBy: z
      .string()
      .refine((text) => parseClockTime(text) !== undefined, { error: 'expected a local time HH:MM (24 h)' }),
    /** Local weekdays on which a control is expected. Default mon–fri. */
    days: z
      .array(z.enum(WEEKDAYS, { error: `expected one of ${WEEKDAYS.join(', ')}` }))
      .min(1)
      .default(['mon', 'tue', 'wed', 'thu', 'fri']),
    /** IANA zone ("Europe/Berlin") or offset ("+01:00"); default: the evaluation's zone, else the rule set's. */
    timeZone: z
      .string()
      .refine(isValidTimeZone, {
        error: 'expected an IANA time zone such as Europe/Berlin, or an offset such as +01:00',
      })
      .optional(),
  })
  .refine((rule) => rule.scope !== INSTRUMENT_SCOPE, {
    error: 'control-missing judges controls: leave scope out or name { controls: [CONTROL_ID] }',
    path: ['scope'],
  });
export type ControlMissingRule = z.output<typeof controlMissingRuleSchema>;

export const controlMissingKind = defineRuleKind({
  kind: 'control-missing',
  schema: controlMissingRuleSchema,
  needsBaseline: false,
  describe: (rule) =>
    `control result with ${metricLabel(rule.metric)} due by ${rule.dueBy} local time on ${rule.days.join(', ')}${rule.timeZone === undefined ? '' : ` (${rule.timeZone})`}`,
  evaluateClock(rule, context): RuleFinding[] {
    const timeZone = rule.timeZone ?? context.timeZone;
    const now = localParts(context.nowEpochMs, timeZone);
    const dueMinute = parseClockTime(rule.dueBy) ?? 0;
    if (!rule.days.includes(now.weekday) || now.minuteOfDay < dueMinute) return [];
    const arrivedToday = context.history.some((observation) => {
      const epochMs = parseIsoToEpochMs(observation.acquiredAt);
      if (epochMs === undefined || epochMs > context.nowEpochMs || observation.metrics[rule.metric] === undefined)
        return false;
      const local = localParts(epochMs, timeZone);
      return local.date === now.date;
    });
    if (arrivedToday) return [];
    return [
      {
        severity: rule.severity,
        check: 'control missing',
        values: { minutesOverdue: now.minuteOfDay - dueMinute, dueByMinuteOfDay: dueMinute },
        message: `No ${context.controlId} control result (${metricLabel(rule.metric)}) by ${rule.dueBy} (${timeZone}) on ${now.date}.`,
      },
    ];
  },
});
