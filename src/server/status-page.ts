// Renders the status page: one self-contained HTML document (inline SVG charts and CSS, no
// scripts, no external requests) from the gathered StatusData. No I/O.
import { controlChartFigure } from '../output/chart-figure.js';
import { figureHtml, standalonePage, tableHtml } from '../output/chart-html.js';
import { escapeXml } from '../output/chart-render.js';
import type { OpenControlFlag } from '../store/report-queries.js';
import type { StatusData } from './status-data.js';

const flagRows = (flags: readonly OpenControlFlag[]): string[][] =>
  flags.map((f) => [f.severity, f.ruleId, f.check, f.metric, f.acquiredAt, f.message]);
const FLAG_HEADER = ['severity', 'rule', 'check', 'metric', 'run acquired', 'message'];

/** The status page HTML and how many charts it holds. */
export async function renderStatusPage(data: StatusData): Promise<{ html: string; charts: number }> {
  const e = escapeXml;
  const figures = await Promise.all(data.charts.map(controlChartFigure));
  const { counts } = data;
  const digest = data.latestDigest;
  const criticalOpen = data.controls.reduce(
    (n, c) => n + c.openFlags.filter((f) => f.severity === 'critical').length,
    0,
  );
  const body: string[] = [
    '<h1>driftlight status</h1>',
    `<p class="muted">As of ${e(data.generatedAt)}, driftlight ${e(data.softwareVersion)}. <a href="/metrics">metrics</a> · <a href="/healthz">health</a></p>`,
    '<h2 id="digest">Latest digest</h2>',
    digest === undefined
      ? '<p>No digest written yet (results/digest/).</p>'
      : `<p>Digest of <strong>${e(digest.date)}</strong> (built ${e(digest.generatedAt)}): ${digest.setsProcessed} sets processed, ${digest.rejected} files rejected or failed; ` +
        `${digest.controls.map((c) => `${e(c.controlId)}: ${e(c.verdict)}`).join(', ') || 'no controls'}.` +
        `${digest.hasHtml ? ' <a href="/digest">Open the digest</a>.' : ''}</p>`,
    '<h2 id="controls">Controls</h2>',
    data.controls.length === 0
      ? '<p>No control is defined (controls: in the config or the rule set).</p>'
      : tableHtml(
          ['control', 'open flags', 'critical', 'warning'],
          data.controls.map((c) => [
            c.label,
            String(c.openFlags.length),
            String(c.openFlags.filter((f) => f.severity === 'critical').length),
            String(c.openFlags.filter((f) => f.severity === 'warning').length),
          ]),
        ),
    criticalOpen > 0
      ? `<p class="verdict-flagged">${criticalOpen} critical flag(s) open: see each control below; acknowledge with <code>driftlight rules ack</code>.</p>`
      : '',
    ...data.controls.flatMap((c) => [
      `<h3 id="control-${e(c.controlId)}">${e(c.label)}</h3>`,
      c.openFlags.length === 0 ? '<p>No open flags.</p>' : tableHtml(FLAG_HEADER, flagRows(c.openFlags)),
      ...figures.filter((_f, i) => data.charts[i]?.controlId === c.controlId).map(figureHtml),
    ]),
    ...data.otherOpenFlags.flatMap((o) => [
      `<h3>Open flags: ${e(o.controlId)}</h3>`,
      tableHtml(FLAG_HEADER, flagRows(o.flags)),
    ]),
    `<p class="muted">Charts show the ${data.chartDays} days (digest.historyDays) up to ${e(data.chartEnd)} (the latest control run, or now); statistics use the whole history.</p>`,
    '<h2 id="counts">Queue and ledger</h2>',
    tableHtml(['', ...Object.keys(counts.files)], [['files', ...Object.values(counts.files).map(String)]]),
    tableHtml(['', ...Object.keys(counts.sets)], [['sets', ...Object.values(counts.sets).map(String)]]),
    `<p>Queue depth (sets dispatched, not finished): ${counts.sets.queued}. Results written: ${counts.results}.</p>`,
    '<h2 id="waiting">Waiting sets</h2>',
    data.waiting.length === 0
      ? '<p>Nothing is waiting.</p>'
      : tableHtml(
          ['set', 'sample', 'role', 'state', 'since', 'has', 'lacks'],
          data.waiting.map((w) => [
            w.setId,
            w.sampleId,
            w.role,
            w.state,
            w.since,
            w.has.join(', ') || '—',
            w.lacks.join(', ') || 'nothing (waiting for its deadline or a worker)',
          ]),
        ),
    '<h2 id="rejections">Recent rejections</h2>',
    data.rejections.length === 0
      ? '<p>No file was rejected.</p>'
      : tableHtml(
          ['at', 'file', 'state', 'code', 'reason'],
          data.rejections.map((r) => [r.at, r.name, r.state, r.code, r.message]),
        ),
    '<h2 id="alerts">Alerts not delivered</h2>',
    data.alerts.pending + data.alerts.expired === 0
      ? '<p>Every alert was delivered.</p>'
      : `<p>${data.alerts.pending} still retried, ${data.alerts.expired} expired (given up).</p>` +
        tableHtml(
          ['raised', 'channel', 'alert', 'severity', 'state', 'attempts', 'last error'],
          data.alerts.latest.map((a) => [
            new Date(a.createdAtMs).toISOString(),
            a.channelId,
            a.key,
            a.severity,
            a.status === 'pending' ? 'still retried' : 'expired',
            String(a.attempts),
            a.lastError ?? 'not tried yet',
          ]),
        ),
  ];
  return {
    html: standalonePage('driftlight status', body.filter((part) => part !== '').join('\n')),
    charts: figures.length,
  };
}
