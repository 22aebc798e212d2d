// `driftlight digest` on the demo day plus an invented 30-day QC history: the self-contained HTML
// opened in real headless Chromium (no console errors, no request outside the page, the expected
// charts each with data points, a screenshot kept in test-artifacts/), the Markdown, JSON and CSV
// forms, and the e-mail (HTML with a text part) received by a real SMTP sink.
import { readFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { parse } from 'csv-parse/sync';
import { SMTPServer } from 'smtp-server';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../src/config/index.js';
import { renderDigest } from '../../src/output/digest-render.js';
import { gatherDigest } from '../../src/output/digest-gather.js';
import { emailDigest } from '../../src/output/digest-write.js';
import { effectiveRuleSet } from '../../src/pipeline/qc-rule-set.js';
import { openLedger } from '../../src/store/ledger.js';
import { chartMarks, openInChromium } from '../helpers/browser.js';
import { runDriftlight } from '../helpers/cli.js';
import { faceWorkspace } from '../helpers/face-workspace.js';

const TODAY = new Date().toISOString().slice(0, 10);
let dir = '';
let config = '';

beforeAll(() => {
  ({ dir, config } = faceWorkspace({ endDay: TODAY }));
  const run = runDriftlight(['digest', '--date', TODAY, '-c', config]);
  if (run.status !== 0) throw new Error(`digest failed: ${run.stderr}`);
});

const digestPath = (ext: string): string => join(dir, 'results', 'digest', `${TODAY}.${ext}`);

describe('daily digest', () => {
  it('HTML in headless Chromium: no console errors, no requests outside the page, 5 charts each with data points', async () => {
    const html = readFileSync(digestPath('html'), 'utf8');
    expect(html).not.toMatch(/<script|<link|(?:href|src)="(?:https?:)?\/\/|url\(/i);
    const url = pathToFileURL(digestPath('html')).href;
    const opened = await openInChromium(url);
    try {
      const marks = await chartMarks(opened.page);
      // Two control charts (yield, lifetime) of "teal", the instrument trends, the control decay, the emission overlay.
      expect(marks.map((m) => m.id)).toEqual([
        'chart-teal-controlQuantumYield',
        'chart-teal-meanLifetimeNs',
        'chart-instrument-health',
        'chart-control-decay',
        'chart-emission',
      ]);
      for (const mark of marks) expect(mark.points + mark.lines, mark.id).toBeGreaterThan(0);
      // Every run in the yield chart is a symbol: 30 seeded runs plus the demo's own control run.
      expect(marks[0]?.points).toBeGreaterThanOrEqual(31);
      const captions = await opened.page.$$eval('figure.chart figcaption .text-alternative', (nodes) =>
        nodes.map((n) => n.textContent ?? ''),
      );
      expect(captions).toHaveLength(5);
      for (const caption of captions) expect(caption.length).toBeGreaterThan(40);
      const titles = await opened.page.$$eval('figure.chart svg > title', (nodes) =>
        nodes.map((n) => n.textContent ?? ''),
      );
      expect(titles).toHaveLength(5);
      await opened.screenshot('digest.png');
      expect(opened.consoleErrors).toEqual([]);
      expect(opened.requests).toEqual([url]);
    } finally {
      await opened.close();
    }
  });

  it('Markdown, JSON and CSV say the same day: sets, controls, samples', () => {
    const data = JSON.parse(readFileSync(digestPath('json'), 'utf8')) as {
      schema: string;
      sets: { processed: number };
      controls: { controlId: string; verdict: string }[];
      samples: { setId: string }[];
      rejections: unknown[];
    };
    expect(data.schema).toBe('driftlight.digest/1');
    expect(data.sets.processed).toBe(5);
    expect(data.rejections).toHaveLength(1);
    expect(data.controls.map((c) => c.controlId)).toEqual(['teal']);
    const markdown = readFileSync(digestPath('md'), 'utf8');
    expect(markdown).toContain(`# driftlight digest ${TODAY}`);
    expect(markdown).toContain('- sets processed: 5');
    const rows = parse<Record<string, string>>(readFileSync(digestPath('csv'), 'utf8'), { columns: true });
    expect(rows.map((r) => r['set_id']).sort()).toEqual(data.samples.map((s) => s.setId).sort());
  });

  it('is e-mailed as HTML with a plain-text part through an e-mail channel (real SMTP sink)', async () => {
    const mails: string[] = [];
    const sink = new SMTPServer({
      disabledCommands: ['STARTTLS', 'AUTH'],
      onData(stream, _session, callback) {
        const chunks: Buffer[] = [];
        stream.on('data', (chunk: Buffer) => chunks.push(chunk));
        stream.on('end', () => {
          mails.push(Buffer.concat(chunks).toString('utf8'));
          callback();
        });
      },
    });
    await new Promise<void>((resolve) => sink.listen(0, '127.0.0.1', () => resolve()));
    try {
      const port = (sink as unknown as { server: { address(): AddressInfo } }).server.address().port;
      const loaded = loadConfig(config);
      const ledger = openLedger(loaded.folders.state, { readonly: true });
      const data = (() => {
        try {
          return gatherDigest(ledger, loaded, {
            date: TODAY,
            ruleSet: effectiveRuleSet(loaded),
            now: new Date(),
            softwareVersion: 'test',
          });
        } finally {
          ledger.close();
        }
      })();
      const forms = await renderDigest(data);
      await emailDigest(
        {
          id: 'mail',
          type: 'email',
          host: '127.0.0.1',
          port,
          secure: false,
          requireTls: false,
          allowPlainText: true,
          from: 'driftlight@lab.example',
          to: ['qc@lab.example'],
          timeoutMs: 5000,
          attempts: 1,
          backoffMs: 0,
        },
        data,
        forms,
      );
      expect(mails).toHaveLength(1);
      const mail = mails[0] ?? '';
      expect(mail).toMatch(/Content-Type: multipart\/alternative/i);
      expect(mail).toMatch(/Content-Type: text\/plain/i);
      expect(mail).toMatch(/Content-Type: text\/html/i);
      expect(mail).toContain(`Subject: driftlight digest ${TODAY}`);
    } finally {
      await new Promise<void>((resolve) => sink.close(() => resolve()));
    }
  });
});
