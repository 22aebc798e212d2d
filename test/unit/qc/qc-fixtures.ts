// Shared builders for QC tests: a one-control rule set with a declared target, and daily observations.
import { parseRuleSet, type ControlObservation, type RuleSet } from '../../../src/qc/index.js';

export const TARGET_YIELD = 0.925;
export const SD_YIELD = 0.01;

/** A rule set with control "flu" (declared yield target 0.925 ± 0.01) and the given rules YAML. */
export function ruleSetWith(rulesYaml: string, extraControlYaml = ''): RuleSet {
  return parseRuleSet(
    `
version: 1
timeZone: Europe/Berlin
controls:
  - id: flu
    match: { sampleId: "CTRL-FLU*" }
    targets:
      controlQuantumYield: { mean: ${TARGET_YIELD}, sd: ${SD_YIELD} }
${extraControlYaml}
rules:
${rulesYaml}
`,
    'test.yaml',
  );
}

/** ISO time of day `dayIndex` after 2026-01-05 (a Monday) at 08:00 UTC. */
export function dayIso(dayIndex: number, hourUtc = 8): string {
  const epochMs = Date.UTC(2026, 0, 5 + dayIndex, hourUtc);
  return new Date(epochMs).toISOString();
}

/** Daily observations of control "flu" whose yields sit at the given SD units from the target. */
export function yieldObservations(sdUnits: readonly number[], controlId = 'flu'): ControlObservation[] {
  return sdUnits.map((z, day) => ({
    controlId,
    setId: `set-${day}`,
    acquiredAt: dayIso(day),
    metrics: { controlQuantumYield: TARGET_YIELD + z * SD_YIELD },
  }));
}

/** Evaluates only the last observation against the earlier ones. */
export function lastOf<T>(items: readonly T[]): { history: T[]; latest: T } {
  const latest = items[items.length - 1];
  if (latest === undefined) throw new Error('empty sequence');
  return { history: items.slice(0, -1), latest };
}
