// The status page served for real by `driftlight serve` (a child process on a loopback port) over
// the demo day plus an invented 30-day QC history: fetched over HTTP, opened in real headless
// Chromium (no console errors, no request outside the page, one chart per control metric with data
// points, screenshot test-artifacts/status.png), /metrics parsed by an independent Prometheus text
// parser, request paths that try to reach files refused, and the token rule outside loopback.
import { spawn, type ChildProcess } from 'node:child_process';
import { request } from 'node:http';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import parsePrometheusTextFormat from 'parse-prometheus-text-format';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AlertMessage } from '../../src/output/alerts/alert-message.js';
import type { DigestData } from '../../src/output/digest-model.js';
import { ledgerAlertOutbox } from '../../src/store/alert-outbox.js';
import { openLedger } from '../../src/store/ledger.js';
import { chartMarks, openInChromium } from '../helpers/browser.js';
import { CLI_PATH, runDriftlight } from '../helpers/cli.js';
import { faceWorkspace } from '../helpers/face-workspace.js';

const TODAY = new Date().toISOString().slice(0, 10);
const EXCLUDED_SET = 'CTRL-teal-d020';
let dir = '';
let config = '';
let server: ChildProcess | undefined;
let base = '';

/** GET with the path sent exactly as given (no URL normalisation), returning status and body. */
function rawGet(
  path: string,
  headers: Record<string, string> = {},
): Promise<{ status: number; body: string; headers: Record<string, unknown> }> {
  const url = new URL(base);
  return new Promise((resolve, reject) => {
    const req = request({ host: url.hostname, port: url.port, path, method: 'GET', headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () =>
        resolve({ status: res.statusCode ?? 0, body: Buffer.concat(chunks).toString('utf8'), headers: res.headers }),
      );
    });
    req.on('error', reject);
    req.end();
  });
}

beforeAll(async () => {
  ({ dir, config } = faceWorkspace({ endDay: TODAY }));
  const exclude = runDriftlight([
    'rules',
    'exclude',
    EXCLUDED_SET,
    '--comment',
    'cuvette scratched (test)',
    '--by',
    'test',
    '-c',
    config,
  ]);
  if (exclude.status !== 0) throw new Error(`rules exclude failed: ${exclude.stderr}`);
  const ledger = openLedger(join(dir, 'state'));
  try {
    // One alert the webhook could not take yet (still retried) and one given up: what the dispatcher records.
    const outbox = ledgerAlertOutbox(ledger);
    const message: AlertMessage = {
      type: 'flag',
      key: 'teal-westgard|teal|controlQuantumYield',
      severity: 'critical',
      ruleId: 'teal-westgard',
      kind: 'westgard',
      controlId: 'teal',
      metric: 'controlQuantumYield',
      checks: ['1-3s'],
      message: 'control yield 3.2 SD above the baseline mean',
      values: {},
      acquiredAt: `${TODAY}T08:00:00.000Z`,
      setId: 'CTRL-teal-d030',
      createdAt: `${TODAY}T08:05:00.000Z`,
    };
    const pending = outbox.add({
      channelId: 'lab-hook',
      message,
      createdAtMs: Date.now() - 60_000,
      expiresAtMs: Date.now() + 3_600_000,
    });
    outbox.markRetry(pending, 3, 'connect ECONNREFUSED 127.0.0.1:9', Date.now() + 60_000);
    const expired = outbox.add({
      channelId: 'lab-hook',
      message: { ...message, key: 'teal-ewma|teal|meanLifetimeNs', metric: 'meanLifetimeNs' },
      createdAtMs: Date.now() - 120_000,
      expiresAtMs: Date.now() - 1,
    });
    outbox.markExpired(expired, 5, 'HTTP 503', Date.now());
  } finally {
    ledger.close();
  }
  const digest = runDriftlight(['digest', '--date', TODAY, '-c', config]);
  if (digest.status !== 0) throw new Error(`digest failed: ${digest.stderr}`);
  server = spawn(process.execPath, [CLI_PATH, 'serve', '--http', '127.0.0.1:0', '-c', config], {
    cwd: dir,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  base = await new Promise<string>((resolve, reject) => {
    let out = '';
    let err = '';
    server?.stdout?.on('data', (chunk: Buffer) => {
      out += chunk.toString('utf8');
      const match = /status page: (http:\/\/127\.0\.0\.1:\d+\/)/.exec(out);
      if (match?.[1] !== undefined) resolve(match[1]);
    });
    server?.stderr?.on('data', (chunk: Buffer) => {
      err += chunk.toString('utf8');
    });
    server?.on('exit', (code) => reject(new Error(`serve exited ${String(code)}: ${err}`)));
  });
});

afterAll(async () => {
  if (server === undefined || server.exitCode !== null) return;
  const exited = new Promise((resolve) => server?.once('exit', resolve));
  server.kill('SIGTERM');
  await exited;
});

describe('driftlight serve', () => {
  it('serves the status page, /healthz and the latest digest over HTTP', async () => {
    const health = await fetch(new URL('/healthz', base));
    expect(health.status).toBe(200);
    expect(await health.json()).toMatchObject({ status: 'ok' });
    const page = await fetch(base);
    expect(page.status).toBe(200);
    expect(page.headers.get('content-type')).toMatch(/^text\/html/);
    expect(page.headers.get('content-security-policy')).toContain("default-src 'none'");
    const html = await page.text();
    expect(html).not.toMatch(/<script|(?:href|src)="(?:https?:)?\/\//i);
    for (const id of ['digest', 'controls', 'counts', 'waiting', 'rejections', 'alerts'])
      expect(html).toContain(`id="${id}"`);
    expect(html).toContain(`Digest of <strong>${TODAY}</strong>`);
    // The example day's malformed export is the one rejection (examples/day/inbox).
    expect(html).toMatch(/Recent rejections<\/h2>\n<table>.*<\/table>/s);
    expect(html).toContain('1 still retried, 1 expired (given up)');
    expect(html).toContain('ECONNREFUSED');
    const digest = await fetch(new URL('/digest', base));
    expect(digest.status).toBe(200);
    expect(await digest.text()).toContain(`driftlight digest ${TODAY}`);
    // The digest (built after `rules exclude`) draws the excluded run as excluded and lists the outbox's undelivered alerts.
    const data = JSON.parse(readFileSync(join(dir, 'results', 'digest', `${TODAY}.json`), 'utf8')) as DigestData;
    for (const chart of data.charts)
      expect(chart.points.find((p) => p.setId === EXCLUDED_SET)?.status, chart.metric).toBe('excluded');
    expect(data.alerts.undelivered.map((a) => [a.key, a.status, a.attempts])).toEqual([
      ['teal-westgard|teal|controlQuantumYield', 'pending', 3],
      ['teal-ewma|teal|meanLifetimeNs', 'expired', 5],
    ]);
  });

  it('in headless Chromium: no console errors, no requests outside the page, 2 charts each with data points; the excluded run drawn as excluded', async () => {
    const opened = await openInChromium(base);
    try {
      const marks = await chartMarks(opened.page);
      expect(marks.map((m) => m.id)).toEqual(['chart-teal-controlQuantumYield', 'chart-teal-meanLifetimeNs']);
      // 30 seeded runs plus the example day's own control run, each a symbol.
      for (const mark of marks) expect(mark.points, mark.id).toBeGreaterThanOrEqual(31);
      const rows = await opened.page.$$eval('figure.chart details tr', (trs) => trs.map((tr) => tr.textContent ?? ''));
      expect(rows.filter((row) => row.includes(EXCLUDED_SET) && row.includes('excluded'))).toHaveLength(2);
      await opened.screenshot('status.png');
      expect(opened.consoleErrors).toEqual([]);
      expect(opened.requests).toEqual([base]);
    } finally {
      await opened.close();
    }
  });

  it('/metrics parses as Prometheus text and agrees with `driftlight status --json`', async () => {
    const response = await fetch(new URL('/metrics', base));
    expect(response.headers.get('content-type')).toMatch(/^text\/plain; version=0\.0\.4/);
    const families = parsePrometheusTextFormat(await response.text());
    const family = (name: string): (typeof families)[number] => {
      const found = families.find((f) => f.name === name);
      if (found === undefined) throw new Error(`${name} missing from /metrics`);
      return found;
    };
    const value = (name: string): number => Number(family(name).metrics[0]?.value);
    const text = runDriftlight(['status', '-c', config]).stdout;
    // The terminal gets the page's QC summary: open flags per control, alerts not delivered.
    expect(text).toMatch(/^ {2}teal: \d+ open$/m);
    expect(text).toMatch(/^ {4}critical +\S+ /m);
    expect(text).toContain('alerts not delivered: 1 still retried, 1 expired (given up)');
    const status = JSON.parse(runDriftlight(['status', '--json', '-c', config]).stdout) as {
      files: Record<string, number>;
      sets: Record<string, number>;
      results: number;
    };
    expect(family('driftlight_files_processed').type).toBe('GAUGE');
    expect(value('driftlight_files_processed')).toBe(status.files['done']);
    expect(value('driftlight_files_rejected')).toBe(status.files['rejected']);
    expect(value('driftlight_files_failed')).toBe(status.files['failed']);
    expect(value('driftlight_queue_depth')).toBe(status.sets['queued']);
    expect(value('driftlight_results')).toBe(status.results);
    const histogram = family('driftlight_fit_duration_seconds');
    expect(histogram.type).toBe('HISTOGRAM');
    const sample = histogram.metrics[0];
    // Every set `process` analysed recorded its analysis time at commit.
    expect(Number(sample?.count)).toBe(status.results);
    expect(Number(sample?.sum)).toBeGreaterThan(0);
    const buckets = Object.entries(sample?.buckets ?? {})
      .map(([le, n]) => [Number(le), Number(n)] as const)
      .sort((a, b) => a[0] - b[0]);
    for (let i = 1; i < buckets.length; i += 1)
      expect(buckets[i]?.[1]).toBeGreaterThanOrEqual(buckets[i - 1]?.[1] ?? 0);
    expect(family('driftlight_alerts_sent_total').type).toBe('COUNTER');
    expect(family('driftlight_alerts_failed_total').type).toBe('COUNTER');
    expect(family('driftlight_alerts_expired_total').metrics).toEqual([
      { labels: { channel: 'lab-hook' }, value: '1' },
    ]);
    expect(family('driftlight_alerts_pending').metrics).toEqual([{ labels: { channel: 'lab-hook' }, value: '1' }]);
  });

  it('no request path reaches the file system: traversal attempts and unknown paths are 404', async () => {
    const attempts = [
      '/../../../../etc/passwd',
      '/%2e%2e/%2e%2e/%2e%2e/etc/passwd',
      '/..%2f..%2f..%2fetc%2fpasswd',
      '//etc/passwd',
      '/digest/../state/ledger.sqlite',
      `/digest/${TODAY}.html`,
      `/digest/..%2f..%2fstate%2fledger.sqlite`,
      '/state/ledger.sqlite',
      '/results/',
      '/inbox/',
      '/driftlight.yaml',
      '/digest/',
      '/?file=../../etc/passwd&path=/etc/passwd',
    ];
    for (const path of attempts) {
      const response = await rawGet(path);
      const body = response.body;
      expect(body, path).not.toMatch(/root:x:0:0|SQLite format|<title>Index of|folders:/);
      if (path.startsWith('/?')) expect(response.status, path).toBe(200);
      else expect([400, 404], path).toContain(response.status);
    }
  });

  it('refuses a bind outside loopback without a token', () => {
    const run = runDriftlight(['serve', '--http', '0.0.0.0:0', '-c', config], {
      env: { DRIFTLIGHT_HTTP_TOKEN: '' },
      timeoutMs: 20_000,
    });
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('without a token');
    const short = runDriftlight(['serve', '--http', '127.0.0.1:0', '-c', config], {
      env: { DRIFTLIGHT_HTTP_TOKEN: 'short' },
      timeoutMs: 20_000,
    });
    expect(short.status).toBe(2);
    expect(short.stderr).toContain('at least 16');
  });
});

describe('driftlight watch --http', () => {
  it('serves the same page from inside the watch process (beside a running serve) and stops on SIGINT', async () => {
    const watch = spawn(process.execPath, [CLI_PATH, 'watch', '--http', '127.0.0.1:0', '-c', config], {
      cwd: dir,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    try {
      const url = await new Promise<string>((resolve, reject) => {
        let log = '';
        const take = (chunk: Buffer): void => {
          log += chunk.toString('utf8');
          const match = /status page at (http:\/\/127\.0\.0\.1:\d+\/)/.exec(log);
          if (match?.[1] !== undefined) resolve(match[1]);
        };
        watch.stdout.on('data', take);
        watch.stderr.on('data', take);
        watch.on('exit', (code) => reject(new Error(`watch exited ${String(code)}: ${log}`)));
      });
      expect(url).not.toBe(base);
      expect((await fetch(new URL('/healthz', url))).status).toBe(200);
      const page = await (await fetch(url)).text();
      expect(page).toContain('<h1>driftlight status</h1>');
      expect(page).toContain('data-chart="chart-teal-controlQuantumYield"');
      expect(await (await fetch(new URL('/metrics', url))).text()).toMatch(/^driftlight_results \d+$/m);
    } finally {
      const exited = new Promise<number | null>((resolve) => watch.once('exit', resolve));
      watch.kill('SIGINT');
      expect(await exited).toBe(0);
    }
  });
});
