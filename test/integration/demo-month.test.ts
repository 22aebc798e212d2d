// `driftlight demo` (what `npm start` runs) as a real child process: the invented month replayed
// through the watch loop, checked against the scenario's own truth (src/demo/month.ts): each injected
// fault alerted within its days, the malformed export quarantined with its code, the IRF-less decay a
// flagged partial result, the late re-export not clearing the alarm, no critical alert while in control;
// the last day's digest (opened in headless Chromium), chart and summary CSV; `--serve` up until Ctrl-C.
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../src/analysis/result.js';
import { readQuarantine, readResultFiles } from '../../src/cli/demo-run.js';
import type { ReceivedAlert } from '../../src/cli/demo-webhook.js';
import type { DigestData } from '../../src/output/digest-model.js';
import { generateDemoMonth, monthDate } from '../../src/demo/month.js';
import { chartMarks, openInChromium } from '../helpers/browser.js';
import { CLI_PATH, REPO_ROOT } from '../helpers/cli.js';

const truth = generateDemoMonth().truth;

interface Run {
  status: number | null;
  stdout: string;
  stderr: string;
}

/** What the status page served by `demo --serve` answered before the demo was stopped with SIGINT. */
interface Served {
  url: string;
  status: number;
  html: string;
}

/** Runs `demo --keep DIR --serve`; once it prints the status page's URL, fetches the page, then stops the demo with SIGINT (Ctrl-C). */
function runDemo(dir: string, served: Served[]): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [CLI_PATH, 'demo', '--keep', dir, '--serve'], { cwd: REPO_ROOT });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk: Buffer) => {
      stdout += chunk.toString();
      const url = /^status page: (http:\/\/127\.0\.0\.1:\d+\/)/m.exec(stdout)?.[1];
      if (url !== undefined && served.length === 0) {
        served.push({ url, status: 0, html: '' });
        void fetch(url)
          .then(async (response) => {
            served[0] = { url, status: response.status, html: await response.text() };
          })
          .finally(() => child.kill('SIGINT'));
      }
    });
    child.stderr.on('data', (chunk: Buffer) => {
      stderr += chunk.toString();
    });
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
  const served: Served[] = [];
  const flagsOf = (predicate: (a: ReceivedAlert) => boolean) =>
    alerts.filter((a) => a.payload['type'] === 'flag' && predicate(a));

  beforeAll(async () => {
    parent = mkdtempSync(join(tmpdir(), 'dl-demo-month-'));
    workspace = join(parent, 'ws');
    run = await runDemo(workspace, served);
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
    // The TCSPC script's files (no column names) are read through the config's instrument profile, IRF column included.
    const scripted = results.filter((r) => r.provenance.inputs.some((i) => i.file.endsWith('_tcspc.txt')));
    expect(scripted.length).toBeGreaterThan(5);
    for (const r of scripted) expect(r.decayFit?.irfSource, r.sampleId).toBe('decay-column');
    // A decay file with two count columns (two emission wavelengths) gives one result per column, each with the sample's lifetime.
    expect(truth.twoColumnDecays.length).toBeGreaterThan(3);
    for (const t of truth.twoColumnDecays) {
      const perColumn = results.filter((r) => r.provenance.inputs.some((i) => i.file === t.file));
      expect(perColumn.map((r) => r.measurement?.column).sort(), t.file).toEqual([...t.columns].sort());
      for (const r of perColumn)
        expect(
          Math.abs((r.decayFit?.tauMeanIntensityNs ?? 0) / t.tauNs - 1),
          `${t.file} ${r.measurement?.column ?? ''}`,
        ).toBeLessThan(0.03);
    }
    // The in-control controls' lifetimes agree with the generator (single exponential, 300 000 counts).
    for (const c of truth.controls.filter((x) => x.day < 24)) {
      const r = results.find(
        (x) => x.sampleId === c.sampleId && Date.parse(x.acquiredAt ?? '') === Date.parse(c.acquiredAt),
      );
      expect(Math.abs((r?.decayFit?.tauMeanIntensityNs ?? 0) / c.tauNs - 1), c.sampleId).toBeLessThan(0.02);
    }
  });

  it.each(truth.faults)('alerts the $id fault within $withinDays days of day $fromDay', (fault) => {
    const hits = flagsOf(
      (a) =>
        fault.expectedRules.includes(String(a.payload['ruleId'])) &&
        a.day >= fault.fromDay &&
        String(a.payload['acquiredAt']) >= monthDate(fault.fromDay),
    );
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
    const recoveries = alerts.filter(
      (a) =>
        a.payload['type'] === 'recovery' &&
        a.day === truth.lateReExport.arrivesDay &&
        String(a.payload['acquiredAt']).startsWith(reExportDate),
    );
    expect(recoveries).toEqual([]);
  });

  it('raises no critical alert on the in-control days 1–16 (warnings there are counted as false alarms)', () => {
    const inControl = new Set(truth.inControlDays);
    const critical = flagsOf((a) => inControl.has(a.day) && a.payload['severity'] === 'critical');
    expect(critical.map((a) => `${a.day} ${String(a.payload['ruleId'])}`)).toEqual([]);
    const warnings = flagsOf((a) => inControl.has(a.day));
    // Reported, not bounded: the count the note quotes.
    console.info(
      `demo month: ${warnings.length} warning(s) on in-control days: ${warnings.map((a) => `day ${a.day} ${String(a.payload['ruleId'])}`).join(', ') || 'none'}`,
    );
  });

  it('reads the European day-first date of one export as the right day', () => {
    const r = results.find((x) => x.provenance.inputs.some((i) => i.file === truth.europeanDate.file));
    expect(Date.parse(r?.acquiredAt ?? '')).toBe(Date.parse(truth.europeanDate.acquiredAt));
  });

  it("writes the last day's digest with its charts, the control chart and the summary CSV, and prints their paths", async () => {
    const lastDate = monthDate(30);
    const digestHtml = join(workspace, 'results', 'digest', `${lastDate}.html`);
    const chartHtml = join(workspace, 'results', 'charts', 'ql-daily.html');
    const summaryCsv = join(workspace, 'results', 'export', `summary-${monthDate(1)}-to-${lastDate}.csv`);
    for (const path of [digestHtml, chartHtml, summaryCsv]) expect(run.stdout).toContain(path);
    const opened = await openInChromium(pathToFileURL(digestHtml).href);
    try {
      const marks = await chartMarks(opened.page);
      // The daily control's yield and lifetime charts, the instrument trends, the day's control decay, the emission overlay.
      expect(marks.map((m) => m.id)).toEqual([
        'chart-ql-daily-controlQuantumYield',
        'chart-ql-daily-meanLifetimeNs',
        'chart-instrument-health',
        'chart-control-decay',
        'chart-emission',
      ]);
      for (const mark of marks) expect(mark.points + mark.lines, mark.id).toBeGreaterThan(0);
      // One symbol per control run of the month (the re-exported day-22 control is a run of its own).
      expect(marks[0]?.points).toBeGreaterThanOrEqual(truth.controls.length);
      await opened.screenshot('demo-digest.png');
      expect(opened.consoleErrors).toEqual([]);
      expect(opened.requests).toEqual([pathToFileURL(digestHtml).href]);
    } finally {
      await opened.close();
    }
    // Instrument health: the IRF width measured with each control's decay, before and after the day-27 alignment change (truth: FWHM per day).
    const digest = JSON.parse(
      readFileSync(join(workspace, 'results', 'digest', `${lastDate}.json`), 'utf8'),
    ) as DigestData;
    const irfWidth = digest.health.trends.find((t) => t.metric === 'irfWidthNs');
    expect(irfWidth?.points.length).toBeGreaterThanOrEqual(truth.controls.length);
    const first = truth.controls[0];
    const last = truth.controls[truth.controls.length - 1];
    expect(Math.abs((irfWidth?.points[0]?.value ?? 0) / (first?.irfFwhmNs ?? 1) - 1)).toBeLessThan(0.1);
    expect(Math.abs((irfWidth?.latest ?? 0) / (last?.irfFwhmNs ?? 1) - 1)).toBeLessThan(0.1);
    const rows = parse<Record<string, string>>(readFileSync(summaryCsv, 'utf8'), { columns: true });
    expect(rows).toHaveLength(results.length);
    expect(readFileSync(chartHtml, 'utf8')).toContain('data-chart="chart-ql-daily-controlQuantumYield"');
  });

  it('--serve serves the status page on loopback after the run and stops on Ctrl-C (SIGINT)', () => {
    expect(served).toHaveLength(1);
    expect(served[0]?.status).toBe(200);
    const html = served[0]?.html ?? '';
    expect(html).toContain(`Digest of <strong>${monthDate(30)}</strong>`);
    expect([...html.matchAll(/<figure class="chart" id="([^"]+)"/g)].map((m) => m[1])).toEqual([
      'chart-ql-daily-controlQuantumYield',
      'chart-ql-daily-meanLifetimeNs',
    ]);
    expect(run.stdout).toContain('SIGINT: status page stopped');
  });
});
