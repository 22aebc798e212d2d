// `driftlight rules check | simulate | rebaseline` through the real CLI on real files in a temp dir.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { observationFromResult } from '../../src/qc/index.js';
import { openLedger } from '../../src/store/ledger.js';
import { baselineRecords, recordObservation } from '../../src/store/qc-store.js';
import { runDriftlight } from '../helpers/cli.js';
import { BASELINE_YIELDS, controlResult, writeResults } from './rules-fixtures.js';

const workDir = mkdtempSync(join(tmpdir(), 'driftlight-rules-'));
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

/** The control, defined once in driftlight.yaml (the shipped rule set defines none: issue 16.1). */
const CONTROLS_YAML = 'controls: [{ id: fluorescein-daily, sampleIdPattern: "^CTRL-FLU" }]\n';
const controlsConfig = join(workDir, 'controls.yaml');
writeFileSync(controlsConfig, `folders: { state: ${join(workDir, 'state-sim')} }\n${CONTROLS_YAML}`);

describe('driftlight rules check', () => {
  it('validates the shipped rule set and prints its rules', () => {
    const run = runDriftlight(['rules', 'check', 'rules/default.yaml']);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('valid rule set "driftlight default rules"');
    expect(run.stdout).toMatch(/yield-ewma\s+warning\s+controlQuantumYield @ every control: EWMA λ = 0.2, L = 2.962/);
    expect(run.stdout).toContain('warning: no control is defined');
  });

  it('--config shows the merged view: each config control with the rules that judge it', () => {
    const run = runDriftlight(['rules', 'check', '--config', controlsConfig]);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('fluorescein-daily  match: sampleIdPattern ^CTRL-FLU');
    expect(run.stdout).toMatch(/judged by: yield-westgard, yield-ewma, yield-cusum, .*control-missing/);
    expect(run.stdout).not.toContain('warning:');
  });

  it('exits 2 naming the file, line and config path of an invalid rule', () => {
    const file = join(workDir, 'bad.yaml');
    writeFileSync(file, 'controls: []\nrules:\n  - id: e\n    metric: controlQuantumYield\n    scope: instrument\n    kind: ewma\n    severity: warning\n    lambda: 1.5\n');
    const run = runDriftlight(['rules', 'check', file]);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain(`${file}:8: CONFIG_INVALID: rules[0].lambda: expected a number between 0 and 1`);
    expect(run.stderr).toContain('driftlight rules check FILE');
  });
});

describe('driftlight rules simulate', () => {
  const resultsDir = join(workDir, 'results');
  // 20 baseline days (Mon 2 March …), day 20 far low (1-3s), day 21 back in control,
  // no control on day 22 (Tuesday 24 March), one on day 23.
  const results = [
    ...BASELINE_YIELDS.map((value, day) => controlResult(day, value)),
    controlResult(20, 0.9),
    controlResult(21, 0.926),
    controlResult(23, 0.924),
    { ...controlResult(5, 0.5, 'dye-07'), role: 'sample' as const, setId: 'sample-1' },
  ];
  writeResults(resultsDir, results);

  it('lists the alerts that would have fired, in time order, with recoveries and a missing control', () => {
    const run = runDriftlight(['rules', 'simulate', '--history', resultsDir, '--rules', 'rules/default.yaml', '--config', controlsConfig]);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const lines = run.stdout.trim().split('\n');
    expect(lines[0]).toMatch(/^replayed 23 QC observation\(s\)/);
    const westgard = lines.find((line) => line.includes('yield-westgard 1-3s'));
    // mean 0.925, SD 0.00785 of BASELINE_YIELDS (computed) → 0.900 is 3.2 SD below.
    expect(westgard).toBe('2026-03-22T08:00:00.000Z  CRITICAL  yield-westgard 1-3s  fluorescein-daily  control yield 0.900 is 3.2 SD below baseline mean 0.925 (1-3s).');
    expect(lines.some((line) => line.startsWith('2026-03-23T08:00:00.000Z  RECOVERED yield-westgard'))).toBe(true);
    expect(lines.some((line) => line.includes('No fluorescein-daily control result (control yield) by 10:00 (UTC) on 2026-03-24.'))).toBe(true);
    expect(lines.filter((line) => line.includes('control-missing'))).toHaveLength(1);
  });

  it('--json prints one alert object per line', () => {
    const run = runDriftlight(['rules', 'simulate', '--history', resultsDir, '--rules', 'rules/default.yaml', '--config', controlsConfig, '--json']);
    expect(run.status).toBe(0);
    const alerts = run.stdout.trim().split('\n').map((line) => JSON.parse(line) as { type: string; ruleId: string; check: string; setId: string });
    expect(alerts.find((alert) => alert.check === '1-3s')).toMatchObject({ type: 'flag', ruleId: 'yield-westgard', setId: 'ctrl-020' });
    expect(alerts.some((alert) => alert.type === 'recovery')).toBe(true);
  });
});

describe('driftlight rules rebaseline', () => {
  it('stores a new baseline computed from the ledger runs since the date', () => {
    const stateDir = join(workDir, 'state');
    const configFile = join(workDir, 'driftlight.yaml');
    writeFileSync(configFile, `folders:\n  state: ${stateDir}\n${CONTROLS_YAML}`);
    const ledger = openLedger(stateDir);
    const shifted = BASELINE_YIELDS.map((value, day) => controlResult(30 + day, value - 0.02));
    for (const result of [...BASELINE_YIELDS.map((value, day) => controlResult(day, value)), ...shifted]) {
      const observation = observationFromResult(result);
      if (observation !== undefined) recordObservation(ledger, { ...observation, controlId: 'fluorescein-daily' });
    }
    ledger.close();

    const run = runDriftlight(['rules', 'rebaseline', 'fluorescein-daily', '--from', '2026-04-01', '--config', configFile]);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    // 2026-04-01 is day 30: the shifted runs, mean 0.925 − 0.02 = 0.905 (computed from BASELINE_YIELDS).
    expect(run.stdout).toContain('fluorescein-daily control yield: baseline mean 0.905, SD 0.007847 from 20 runs');
    const reopened = openLedger(stateDir);
    const records = baselineRecords(reopened).filter((record) => record.metric === 'controlQuantumYield');
    reopened.close();
    expect(records).toHaveLength(1);
    expect(records[0]?.mean).toBeCloseTo(0.905, 10);
    expect(records[0]?.fromIso).toBe('2026-04-01T00:00:00.000Z');
  });

  it('exits 2 for an unknown control', () => {
    const run = runDriftlight(['rules', 'rebaseline', 'no-such-control', '--from', '2026-04-01', '--config', join(workDir, 'driftlight.yaml')]);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('no control "no-such-control"');
  });
});
