// `driftlight demo` (what `npm start` runs) as a real child process: the invented month replayed
// through the watch loop, checked against the scenario's own truth (src/demo/month.ts): each injected
// fault alerted within its days, the malformed export quarantined with its code, the IRF-less decay a
// flagged partial result, the late re-export not clearing the alarm, no critical alert while in control.
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../src/analysis/result.js';
import { readQuarantine, readResultFiles } from '../../src/cli/demo-run.js';
import type { ReceivedAlert } from '../../src/cli/demo-webhook.js';
import { generateDemoMonth, monthDate } from '../../src/demo/month.js';
import { CLI_PATH, REPO_ROOT } from '../helpers/cli.js';

const truth = generateDemoMonth().truth;

interface Run { status: number | null; stdout: string; stderr: string }

function runDemo(dir: string): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [CLI_PATH, 'demo', '--keep', dir], { cwd: REPO_ROOT });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk: Buffer) => { stdout += chunk.toString(); });
    child.stderr.on('data', (chunk: Buffer) => { stderr += chunk.toString(); });
    const timer = setTimeout(() => child.kill('SIGKILL'), 170_000);
    child.on('close', (status) => {
      clearTimeout(timer);
      resolve({ status, stdout, stderr });
    });
  });
}

describe('driftlight demo: a month with faults, caught', () => {
  let parent: string;
  let workspace: string;
  let run: Run;
  let alerts: ReceivedAlert[];
  let results: AnalysisResult[];
  const flagsOf = (predicate: (a: ReceivedAlert) => boolean) => alerts.filter((a) => a.payload['type'] === 'flag' && predicate(a));

  beforeAll(async () => {
    parent = mkdtempSync(join(tmpdir(), 'dl-demo-month-'));
    workspace = join(parent, 'ws');
    run = await runDemo(workspace);
    alerts = JSON.parse(readFileSync(join(workspace, 'webhook-received.json'), 'utf8')) as ReceivedAlert[];
    results = readResultFiles(join(workspace, 'results'));
  }, 180_000);

  afterAll(() => {
    rmSync(parent, { recursive: true, force: true });
  });

  it('exits 0, prints a line per day and the summary, and writes nothing to stderr', () => {
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(run.stdout.match(/^day +\d+ \d{4}-\d\d-\d\d: /gm)).toHaveLength(30);
    expect(run.stdout).toContain('sets processed: ');
    expect(run.stdout).toMatch(/probe-X-0207-3_em\.csv: NON_NUMERIC/);
    expect(run.stdout).toContain(`workspace: ${workspace}`);
  });

  it('analyses every set it was given: one result per control, reference, Raman scan, blank and sample', () => {
    const ids = new Set(results.map((r) => r.sampleId));
    for (const c of truth.controls) expect(ids.has(c.sampleId), c.sampleId).toBe(true);
    for (const s of truth.samples) expect(ids.has(s.sampleId), s.sampleId).toBe(true);
    // The in-control controls' lifetimes agree with the generator (single exponential, 300 000 counts).
    for (const c of truth.controls.filter((x) => x.day < 24)) {
      const r = results.find((x) => x.sampleId === c.sampleId && Date.parse(x.acquiredAt ?? '') === Date.parse(c.acquiredAt));
      expect(Math.abs((r?.decayFit?.tauMeanIntensityNs ?? 0) / c.tauNs - 1), c.sampleId).toBeLessThan(0.02);
    }
  });

  it.each(truth.faults)('alerts the $id fault within $withinDays days of day $fromDay', (fault) => {
    const hits = flagsOf((a) => fault.expectedRules.includes(String(a.payload['ruleId'])) && a.day >= fault.fromDay && String(a.payload['acquiredAt']) >= monthDate(fault.fromDay));
    expect(hits.length, `alerts of ${fault.expectedRules.join('/')} from day ${fault.fromDay}`).toBeGreaterThan(0);
    const first = Math.min(...hits.map((a) => a.day));
    expect(first - fault.fromDay).toBeLessThanOrEqual(fault.withinDays);
  });

  it('quarantines the malformed export with the code the truth names, and nothing else', () => {
    const rejected = readQuarantine(join(workspace, 'quarantine'));
    expect(rejected.map((r) => [r.file, r.code])).toEqual([[truth.malformed.file, truth.malformed.code]]);
  });

  it('gives the decay whose IRF never arrived a partial result that says the IRF is missing', () => {
    const r = results.find((x) => x.sampleId === truth.missingIrf.sampleId);
    expect(r?.partial).toBe(true);
    expect(r?.missing.map((m) => m.what)).toContain('irf');
    expect(r?.decayFit?.irfSource).toBe('none');
    // Only this set and none other is partial.
    expect(results.filter((x) => x.partial).map((x) => x.sampleId)).toEqual([truth.missingIrf.sampleId]);
  });

  it('does not clear the contamination alarm when the day-22 control is re-exported on day 25', () => {
    const reExportDate = monthDate(truth.lateReExport.acquiredDay);
    const recoveries = alerts.filter((a) => a.payload['type'] === 'recovery' && a.day === truth.lateReExport.arrivesDay && String(a.payload['acquiredAt']).startsWith(reExportDate));
    expect(recoveries).toEqual([]);
  });

  it('raises no critical alert on the in-control days 1–16 (warnings there are counted as false alarms)', () => {
    const inControl = new Set(truth.inControlDays);
    const critical = flagsOf((a) => inControl.has(a.day) && a.payload['severity'] === 'critical');
    expect(critical.map((a) => `${a.day} ${String(a.payload['ruleId'])}`)).toEqual([]);
    const warnings = flagsOf((a) => inControl.has(a.day));
    // Reported, not bounded: the count the note quotes.
    console.info(`demo month: ${warnings.length} warning(s) on in-control days: ${warnings.map((a) => `day ${a.day} ${String(a.payload['ruleId'])}`).join(', ') || 'none'}`);
  });

  it('reads the European day-first date of one export as the right day', () => {
    const r = results.find((x) => x.provenance.inputs.some((i) => i.file === truth.europeanDate.file));
    expect(Date.parse(r?.acquiredAt ?? '')).toBe(Date.parse(truth.europeanDate.acquiredAt));
  });

  it.todo('the latest digest holds the control charts (blocked: the digest of issue 21 is not on main)');
});
