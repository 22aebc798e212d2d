// `driftlight rules check | simulate | rebaseline` through the real CLI on real files in a temp dir.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createQcStage, effectiveRuleSet } from '../../src/pipeline/qc-stage.js';
import { loadConfig } from '../../src/config/load.js';
import { observationFromResult } from '../../src/qc/index.js';
import { openLedger } from '../../src/store/ledger.js';
import { baselineRecords, openFlags, recordObservation } from '../../src/store/qc-store.js';
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
    writeFileSync(
      file,
      'controls: []\nrules:\n  - id: e\n    metric: controlQuantumYield\n    scope: instrument\n    kind: ewma\n    severity: warning\n    lambda: 1.5\n',
    );
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
    const run = runDriftlight([
      'rules',
      'simulate',
      '--history',
      resultsDir,
      '--rules',
      'rules/default.yaml',
      '--config',
      controlsConfig,
    ]);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const lines = run.stdout.trim().split('\n');
    expect(lines[0]).toMatch(/^replayed 23 QC observation\(s\)/);
    const westgard = lines.find((line) => line.includes('yield-westgard 1-3s'));
    // mean 0.925, SD 0.00785 of BASELINE_YIELDS (computed) → 0.900 is 3.2 SD below.
    expect(westgard).toBe(
      '2026-03-22T08:00:00.000Z  CRITICAL  yield-westgard 1-3s  fluorescein-daily  control yield 0.900 is 3.2 SD below baseline mean 0.925 (1-3s).',
    );
    expect(lines.some((line) => line.startsWith('2026-03-23T08:00:00.000Z  RECOVERED yield-westgard'))).toBe(true);
    expect(
      lines.some((line) =>
        line.includes('No fluorescein-daily control result (control yield) by 10:00 (UTC) on 2026-03-24.'),
      ),
    ).toBe(true);
    expect(lines.filter((line) => line.includes('control-missing'))).toHaveLength(1);
  });

  it('--json prints one alert object per line', () => {
    const run = runDriftlight([
      'rules',
      'simulate',
      '--history',
      resultsDir,
      '--rules',
      'rules/default.yaml',
      '--config',
      controlsConfig,
      '--json',
    ]);
    expect(run.status).toBe(0);
    const alerts = run.stdout
      .trim()
      .split('\n')
      .map((line) => JSON.parse(line) as { type: string; ruleId: string; check: string; setId: string });
    expect(alerts.find((alert) => alert.check === '1-3s')).toMatchObject({
      type: 'flag',
      ruleId: 'yield-westgard',
      setId: 'ctrl-020',
    });
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

    const run = runDriftlight([
      'rules',
      'rebaseline',
      'fluorescein-daily',
      '--from',
      '2026-04-01',
      '--config',
      configFile,
      '--comment',
      'new lamp',
      '--by',
      'tester',
    ]);
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
    const run = runDriftlight([
      'rules',
      'rebaseline',
      'no-such-control',
      '--from',
      '2026-04-01',
      '--config',
      join(workDir, 'driftlight.yaml'),
      '--comment',
      'x',
    ]);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('no control "no-such-control"');
  });
});

describe('alarm handling (issue 16.7)', () => {
  const dir = join(workDir, 'handling');
  const stateDir = join(dir, 'state');
  const resultsDir = join(dir, 'results');
  const configFile = join(workDir, 'handling.yaml');
  // The lab is in Auckland (UTC+13 in March): runs at 08:00 UTC are 21:00 local, after the 10:00 due time.
  writeFileSync(
    configFile,
    `folders: { state: ${stateDir} }\nrules: { timeZone: Pacific/Auckland }\ncontrols:\n  - { id: fluorescein-daily, sampleIdPattern: "^CTRL-FLU", targetTauNs: 4.0, sdTauNs: 0.1 }\n`,
  );
  const results = [...BASELINE_YIELDS.map((value, day) => controlResult(day, value)), controlResult(20, 0.9)];
  writeResults(resultsDir, results);

  it('acknowledges a flag and excludes a run with who, when and why, shown by rules simulate', async () => {
    const config = loadConfig(configFile);
    const stage = createQcStage({ ruleSet: effectiveRuleSet(config) });
    const ledger = openLedger(stateDir);
    for (const result of results) await stage.apply(result, { ledger, now: new Date(result.acquiredAt ?? 0) });
    ledger.close();

    const ack = runDriftlight([
      'rules',
      'ack',
      'ctrl-020',
      '--rule',
      'yield-westgard',
      '--comment',
      'air bubble in the cuvette',
      '--by',
      'dana',
      '--config',
      configFile,
    ]);
    expect(ack.stderr).toBe('');
    expect(ack.stdout).toMatch(
      /^acknowledged [1-9]\d* flag\(s\) of run ctrl-020 \(fluorescein-daily\) by dana: air bubble in the cuvette/,
    );
    const exclude = runDriftlight([
      'rules',
      'exclude',
      'ctrl-020',
      '--comment',
      'bad cuvette',
      '--by',
      'dana',
      '--config',
      configFile,
    ]);
    expect(exclude.status).toBe(0);
    expect(exclude.stdout).toContain(
      'excluded run ctrl-020 (fluorescein-daily, acquired 2026-03-22T08:00:00.000Z) by dana: bad cuvette',
    );

    const reopened = openLedger(stateDir);
    const stillOpen = openFlags(reopened, ['fluorescein-daily']).filter((flag) => flag.ruleId === 'yield-westgard');
    reopened.close();
    expect(stillOpen).toEqual([]);

    const simulate = runDriftlight(['rules', 'simulate', '--history', resultsDir, '--config', configFile]);
    expect(simulate.stderr).toBe('');
    const lines = simulate.stdout.trim().split('\n');
    expect(lines[0]).toMatch(/^replayed 20 QC observation\(s\) \(1 excluded\)/);
    expect(lines).toContainEqual(
      expect.stringMatching(
        /ACKNOWLEDGE fluorescein-daily {2}run ctrl-020, flag yield-westgard {2}by dana: air bubble in the cuvette$/,
      ),
    );
    expect(lines).toContainEqual(
      expect.stringMatching(/EXCLUDE +fluorescein-daily {2}run ctrl-020 {2}by dana: bad cuvette$/),
    );
    // control-missing judged in the config's zone, and its repeats summarised in one line.
    const missing = lines.filter((line) => line.includes('control-missing'));
    expect(missing).toHaveLength(1);
    expect(missing[0]).toMatch(
      /control missing {2}fluorescein-daily {2}no control result by the due time on 14 days, 2026-03-02 to 2026-03-19/,
    );
  });

  it('rebaseline tells the truth when a target is declared, and records who and why', () => {
    const run = runDriftlight([
      'rules',
      'rebaseline',
      'fluorescein-daily',
      '--from',
      '2026-03-02',
      '--comment',
      'new lamp',
      '--by',
      'dana',
      '--config',
      configFile,
    ]);
    expect(run.stderr).toBe('');
    expect(run.stdout).toContain(
      'fluorescein-daily mean lifetime: not rebaselined — the config declares target 4 ± 0.1, which the charts keep judging against',
    );
    // The yield has no declared target: its baseline is computed from the 20 runs (ctrl-020 excluded).
    expect(run.stdout).toMatch(/fluorescein-daily control yield: baseline mean 0\.925, SD 0\.007847 from 20 runs/);
    expect(run.stdout).toContain('recorded: rebaseline by dana: new lamp');
  });
});
