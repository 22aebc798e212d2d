// The rule-kind table: add a kind by adding a file under rule-kinds/ and a row here.
import type { z } from 'zod';
import type { BaseRule } from '../rule-base.js';
import type { RuleKindDefinition } from '../rule-kind.js';
import { westgardKind } from './westgard.js';
import { nelsonKind } from './nelson.js';
import { ewmaKind } from './ewma.js';
import { cusumKind } from './cusum.js';
import { toleranceKind } from './tolerance.js';
import { percentChangeKind } from './percent-change.js';
import { instrumentHealthKind } from './instrument-health.js';
import { controlMissingKind } from './control-missing.js';

export const RULE_KINDS = {
  westgard: westgardKind,
  nelson: nelsonKind,
  ewma: ewmaKind,
  cusum: cusumKind,
  tolerance: toleranceKind,
  'percent-change': percentChangeKind,
  'instrument-health': instrumentHealthKind,
  'control-missing': controlMissingKind,
} as const;

export type RuleKindName = keyof typeof RULE_KINDS;
export const RULE_KIND_NAMES = Object.keys(RULE_KINDS) as RuleKindName[];

/** Any validated rule: the union of every kind's schema output. */
export type Rule = { [Name in RuleKindName]: z.output<(typeof RULE_KINDS)[Name]['schema']> }[RuleKindName];

/** The kind definition of a rule, typed for that rule (rules are validated by the same table's schema). */
export function ruleKindOf(rule: Rule): RuleKindDefinition<z.ZodType<BaseRule>> {
  return RULE_KINDS[rule.kind];
}

/** True when the rule judges against a control's baseline (mean and SD, or the mean alone: see baselineMeanSuffices). */
export function ruleNeedsBaseline(rule: Rule): boolean {
  const { needsBaseline } = ruleKindOf(rule);
  return typeof needsBaseline === 'function' ? needsBaseline(rule) : needsBaseline;
}
