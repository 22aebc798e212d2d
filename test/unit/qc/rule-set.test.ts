// Rule-set parsing: the shipped default validates; bad files throw ConfigInvalid naming file, line
// and config path; nothing in a rule file is executed.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ConfigInvalid } from '../../../src/model/errors.js';
import {
  controlSchema,
  evaluateRules,
  parseRuleSet,
  RULE_KIND_NAMES,
  ruleSetWarnings,
  rulesJudgingControl,
  withControls,
} from '../../../src/qc/index.js';

const DEFAULT_RULES = new URL('../../../rules/default.yaml', import.meta.url);

/** The ConfigInvalid thrown by parsing `text`. */
function parseError(text: string): ConfigInvalid {
  try {
    parseRuleSet(text, 'bad.yaml');
  } catch (error) {
    if (error instanceof ConfigInvalid) return error;
    throw error;
  }
  throw new Error('expected ConfigInvalid');
}

const header = `
controls:
  - id: flu
    match: { sampleId: "CTRL-*" }
rules:
`;

describe('parseRuleSet', () => {
  it('accepts rules/default.yaml and fills defaults', () => {
    const ruleSet = parseRuleSet(readFileSync(DEFAULT_RULES, 'utf8'), 'rules/default.yaml');
    // Issue 16.1: the shipped set defines no control of its own; every control rule judges every control.
    expect(ruleSet.controls).toEqual([]);
    expect(ruleSet.rules.filter((rule) => rule.scope !== 'instrument').every((rule) => rule.scope === undefined)).toBe(
      true,
    );
    const kinds = new Set(ruleSet.rules.map((rule) => rule.kind));
    // The default set uses every registered kind except Nelson-all (it uses Nelson 2 and 3).
    expect([...kinds].sort()).toEqual([...RULE_KIND_NAMES].sort());
    const ewma = ruleSet.rules.find((rule) => rule.id === 'yield-ewma');
    expect(ewma?.kind === 'ewma' ? [ewma.lambda, ewma.limitWidth] : undefined).toEqual([0.2, 2.962]);
  });

  it('names the config path and line of a bad parameter (rules[0].lambda)', () => {
    const error = parseError(`${header}  - id: e
    metric: controlQuantumYield
    scope: { control: flu }
    kind: ewma
    severity: warning
    lambda: 1.5
`);
    expect(error.configPath).toBe('rules[0].lambda');
    expect(error.message).toContain('expected a number between 0 and 1');
    expect(error.file).toBe('bad.yaml');
    expect(error.line).toBe(11);
    expect(error.toUserLine()).toContain(
      'bad.yaml:11: CONFIG_INVALID: rules[0].lambda: expected a number between 0 and 1',
    );
  });

  it('lists the known kinds for an unknown kind', () => {
    const error = parseError(
      `${header}  - { id: x, metric: fwhmNm, scope: instrument, kind: shewhart, severity: info }\n`,
    );
    expect(error.configPath).toBe('rules[0].kind');
    expect(error.message).toContain('westgard');
  });

  it('rejects misspelt parameters, unknown metrics and severities', () => {
    expect(
      parseError(
        `${header}  - { id: x, metric: controlQuantumYield, scope: { control: flu }, kind: ewma, severity: info, lamda: 0.2 }\n`,
      ).message,
    ).toMatch(/lamda/);
    expect(
      parseError(`${header}  - { id: x, metric: yield, scope: instrument, kind: tolerance, severity: info, max: 1 }\n`)
        .configPath,
    ).toBe('rules[0].metric');
    expect(
      parseError(`${header}  - { id: x, metric: fwhmNm, scope: instrument, kind: tolerance, severity: high, max: 1 }\n`)
        .configPath,
    ).toBe('rules[0].severity');
  });

  it('cross-checks ids and scopes', () => {
    const twice = `  - { id: a, metric: fwhmNm, scope: instrument, kind: tolerance, severity: info, max: 1 }\n`;
    expect(parseError(`${header}${twice}${twice}`).configPath).toBe('rules[1].id');
    expect(
      parseError(
        `${header}  - { id: a, metric: fwhmNm, scope: { control: nope }, kind: tolerance, severity: info, max: 1 }\n`,
      ).configPath,
    ).toBe('rules[0].scope');
    expect(
      parseError(
        `${header}  - { id: a, metric: fwhmNm, scope: { controls: [flu, nope] }, kind: tolerance, severity: info, max: 1 }\n`,
      ).message,
    ).toContain('"nope"');
    expect(
      parseError(`${header}  - { id: a, metric: fwhmNm, scope: instrument, kind: cusum, severity: info }\n`).configPath,
    ).toBe('rules[0].scope');
  });

  it('reports YAML syntax errors with the line', () => {
    const error = parseError('rules:\n  - id: [unclosed\n');
    expect(error.message).toMatch(/not valid YAML/);
    expect(error.line).toBeGreaterThan(0);
  });

  it('treats expression-looking text as plain data (no evaluation)', () => {
    const error = parseError(
      `${header}  - { id: a, metric: fwhmNm, scope: instrument, kind: tolerance, severity: info, max: "process.exit(9)" }\n`,
    );
    expect(error.configPath).toBe('rules[0].max');
  });

  it('validates time zones and due times of control-missing', () => {
    const rule = (extra: string) =>
      `${header}  - { id: m, metric: controlQuantumYield, scope: { control: flu }, kind: control-missing, severity: warning, ${extra} }\n`;
    expect(parseError(rule('dueBy: "25:00"')).configPath).toBe('rules[0].dueBy');
    expect(parseError(rule('dueBy: "09:00", timeZone: Mars/Olympus')).configPath).toBe('rules[0].timeZone');
    expect(parseRuleSet(rule('dueBy: "09:00", timeZone: "+05:30"'), 'ok.yaml').rules).toHaveLength(1);
  });
});

describe('one place that defines a control (issue 16.1)', () => {
  const shipped = parseRuleSet(readFileSync(DEFAULT_RULES, 'utf8'), 'rules/default.yaml');
  const control = (id: string, pattern: string, targets = {}) =>
    controlSchema.parse({ id, match: { sampleIdPattern: pattern }, targets });

  it('applies every unscoped rule to each config control and flags with that control id', () => {
    // A declared target 0.8 ± 0.03 and a run at 0.62 (6 SD low): the 1-3s check must fire (Westgard 1-3s, common practice).
    const ruleSet = withControls(
      shipped,
      [control('teal', '^CTRL-teal', { controlQuantumYield: { mean: 0.8, sd: 0.03 } }), control('blue', '^CTRL-blue')],
      'test',
    );
    expect(rulesJudgingControl(ruleSet, 'teal').map((rule) => rule.id)).toContain('yield-westgard');
    expect(rulesJudgingControl(ruleSet, 'blue').map((rule) => rule.id)).toEqual(
      rulesJudgingControl(ruleSet, 'teal').map((rule) => rule.id),
    );
    const flags = evaluateRules({
      history: [],
      observation: {
        controlId: 'teal',
        setId: 's1',
        acquiredAt: '2026-03-02T08:00:00Z',
        metrics: { controlQuantumYield: 0.62 },
      },
      ruleSet,
    });
    expect(
      flags.filter((flag) => flag.ruleId === 'yield-westgard').map((flag) => [flag.check, flag.controlId]),
    ).toContainEqual(['1-3s', 'teal']);
    expect(ruleSetWarnings(ruleSet)).toEqual([]);
  });

  it('keeps a rule that names controls to those controls, and warns for a control no rule judges', () => {
    const rules = parseRuleSet(
      `rules:
  - { id: only-a, metric: controlQuantumYield, scope: { controls: [a] }, kind: tolerance, severity: warning, min: 0.5 }
`,
      'scoped.yaml',
    );
    const ruleSet = withControls(rules, [control('a', '^A'), control('b', '^B')], 'test');
    expect(rulesJudgingControl(ruleSet, 'b')).toEqual([]);
    expect(ruleSetWarnings(ruleSet)).toEqual([
      'control "b" is judged by no rule: every rule is scoped to other controls or the instrument',
    ]);
    const low = (controlId: string) =>
      evaluateRules({
        history: [],
        observation: {
          controlId,
          setId: 'x',
          acquiredAt: '2026-03-02T08:00:00Z',
          metrics: { controlQuantumYield: 0.1 },
        },
        ruleSet,
      });
    expect(low('a').map((flag) => flag.controlId)).toEqual(['a']);
    expect(low('b')).toEqual([]);
  });

  it('refuses a control defined twice and a rule naming an undefined control', () => {
    const inFile = parseRuleSet(
      `${header}  - { id: r, metric: fwhmNm, kind: tolerance, severity: info, max: 1 }\n`,
      'file.yaml',
    );
    expect(() => withControls(inFile, [control('flu', '^X')], 'test')).toThrow(/defined twice/);
    const naming = parseRuleSet(
      `rules:\n  - { id: r, metric: fwhmNm, scope: { control: ghost }, kind: tolerance, severity: info, max: 1 }\n`,
      'file.yaml',
    );
    expect(() => withControls(naming, [control('flu', '^X')], 'test')).toThrow(/names control "ghost"/);
    expect(ruleSetWarnings(withControls(shipped, [], 'test'))[0]).toMatch(/no control is defined/);
  });
});
