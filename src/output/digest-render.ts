// The digest's three forms from the day's summary: a self-contained HTML page (inline SVG charts and
// CSS, no scripts, no external requests), a Markdown/plain-text summary, and JSON. No I/O.
import { METRICS, formatMetricValue, type MetricName } from '../qc/index.js';
import { controlChartFigure } from './chart-figure.js';
import { figureHtml, standalonePage, tableHtml, type Figure } from './chart-html.js';
import { escapeXml, renderSvg } from './chart-render.js';
import type { DigestData } from './digest-model.js';
import {
  decaySpec,
  describeDecay,
  describeEmission,
  describeTrends,
  emissionSpec,
  trendsSpec,
} from './digest-plots.js';
import type { SummaryRow } from './summary-table.js';

export interface DigestForms {
  readonly html: string;
  readonly markdown: string;
  readonly json: string;
  /** Every figure in the HTML, in order (tests count them). */
  readonly figures: readonly Figure[];
}

const sig = (value: number | null | undefined, digits = 4): string =>
  value === null || value === undefined ? '—' : Number(value.toPrecision(digits)).toString();

function lifetimes(row: SummaryRow): string {
  if (row.components.length === 0) return '—';
  return row.components
    .map(
      (c) =>
        `${sig(c.tauNs)}${c.tauNsStdErr === null ? '' : ` ± ${sig(c.tauNsStdErr, 2)}`} ns (${(100 * c.intensityFraction).toFixed(0)} %)`,
    )
    .join('; ');
}

/** The samples table as rows of text cells (shared by HTML and Markdown). */
function sampleCells(rows: readonly SummaryRow[]): { header: string[]; rows: string[][] } {
  return {
    header: [
      'sample',
      'role',
      'acquired',
      'Φ ± u',
      'τ ± u (intensity fraction)',
      'mean τ (ns)',
      'χ²ᵣ',
      'k_r (s⁻¹)',
      'k_nr (s⁻¹)',
      'flags',
      'missing',
    ],
    rows: rows.map((row) => [
      row.sampleId,
      row.role,
      row.acquiredAt ?? '—',
      row.quantumYield === null ? '—' : `${sig(row.quantumYield, 3)} ± ${sig(row.quantumYieldStdUncertainty, 2)}`,
      lifetimes(row),
      sig(row.tauMeanIntensityNs),
      sig(row.chi2Reduced, 3),
      sig(row.krPerS, 3),
      sig(row.knrPerS, 3),
      row.flags.join('; ') || '—',
      row.missing.join('; ') || '—',
    ]),
  };
}

function healthCells(data: DigestData): { header: string[]; rows: string[][] } {
  return {
    header: ['check', 'values', 'latest', `mean over ${data.health.historyDays} days`, 'trend per day'],
    rows: data.health.trends.map((t) => [
      `${t.label}${t.scope === 'instrument' ? '' : ` (${t.scope})`}`,
      String(t.points.length),
      t.latest === undefined ? '—' : formatMetricValue(t.metric, t.latest),
      t.windowMean === undefined ? '—' : formatMetricValue(t.metric, t.windowMean),
      t.slopePerDay === undefined
        ? 'too few values'
        : `${t.slopePerDay >= 0 ? '+' : ''}${t.slopePerDay.toPrecision(3)}${t.unit === '' ? '' : ` ${t.unit}`}`,
    ]),
  };
}

function detectorCurveText(data: DigestData): string {
  const curve = data.health.detectorCurve;
  if (curve.ageDays !== undefined)
    return `detector curve ${curve.file ?? ''}: file ${curve.ageDays.toFixed(0)} days old (its modification date)`;
  return `detector curve: ${curve.note ?? 'unknown'}`;
}

function metricsText(metrics: Readonly<Partial<Record<MetricName, number>>>): string {
  return (Object.keys(METRICS) as MetricName[])
    .flatMap((m) => (metrics[m] === undefined ? [] : [`${METRICS[m].label} ${formatMetricValue(m, metrics[m])}`]))
    .join(', ');
}

/** Renders every figure of the digest (control charts, instrument trends, control decay, emission overlay). */
async function digestFigures(
  data: DigestData,
): Promise<{ controls: Figure[]; trends?: Figure; decay?: Figure; emission?: Figure }> {
  const controls = await Promise.all(data.charts.map(controlChartFigure));
  const shownTrends = data.health.trends.filter((t) => t.points.length > 0);
  const figure = async (
    id: string,
    title: string,
    spec: Parameters<typeof renderSvg>[0],
    textAlternative: string,
  ): Promise<Figure> => {
    const { svg, warnings } = await renderSvg(spec, { title, description: textAlternative });
    return { id, title, svg, warnings, textAlternative };
  };
  const out: { controls: Figure[]; trends?: Figure; decay?: Figure; emission?: Figure } = { controls };
  if (shownTrends.length > 0) {
    const title = `Instrument health over ${data.health.historyDays} days`;
    out.trends = await figure(
      'chart-instrument-health',
      title,
      trendsSpec(shownTrends, title),
      describeTrends(shownTrends),
    );
  }
  const decay = data.plots.controlDecay;
  if (decay !== undefined) {
    const title = `Control decay ${decay.sampleId}: counts with fit (log scale) and weighted residuals`;
    out.decay = await figure('chart-control-decay', title, decaySpec(decay, title), describeDecay(decay));
  }
  if (data.plots.emission.length > 0) {
    const title = `Corrected emission spectra of ${data.date}`;
    out.emission = await figure(
      'chart-emission',
      title,
      emissionSpec(data.plots.emission, title),
      describeEmission(data.plots.emission),
    );
  }
  return out;
}

/** Builds the HTML, Markdown and JSON forms of a digest. */
export async function renderDigest(data: DigestData): Promise<DigestForms> {
  const figs = await digestFigures(data);
  const figures = [
    ...figs.controls,
    ...(figs.trends ? [figs.trends] : []),
    ...(figs.decay ? [figs.decay] : []),
    ...(figs.emission ? [figs.emission] : []),
  ];
  const title = `driftlight digest ${data.date}`;
  const samples = sampleCells(data.samples);
  const health = healthCells(data);
  const e = escapeXml;
  const verdictClass = { 'in control': 'verdict-ok', flagged: 'verdict-flagged', 'no run': 'verdict-none' } as const;

  const html: string[] = [
    `<h1>${e(title)}</h1>`,
    `<p class="muted">Day ${e(data.date)} in ${e(data.timeZone)} (${e(data.fromIso)} to ${e(data.toIso)}); built ${e(data.generatedAt)} by driftlight ${e(data.softwareVersion)}.</p>`,
    '<h2 id="summary">Summary</h2>',
    tableHtml(
      ['', 'count'],
      [
        ['files received', String(data.files.received)],
        ...Object.entries(data.files.byState).map(([state, n]) => [`  of which ${state}`, String(n)]),
        ['sets processed', String(data.sets.processed)],
        ...Object.entries(data.sets.byRole).map(([role, n]) => [`  ${role}`, String(n)]),
        ['sets with a part missing (partial)', String(data.sets.partial)],
        ['files rejected or failed', String(data.rejections.length)],
        ['alerts delivered / failed', `${data.alerts.delivered} / ${data.alerts.failed}`],
        ['alerts not delivered (any day)', String(data.alerts.undelivered.length)],
        ['sets waiting', String(data.waiting.length)],
      ],
    ),
    '<h2 id="controls">Controls</h2>',
    data.controls.length === 0
      ? '<p>No control is defined (controls: in the config).</p>'
      : tableHtml(
          ['control', 'verdict', 'runs today', 'flags today', 'open flags'],
          data.controls.map((c) => [
            c.label,
            c.verdict,
            c.runs.map((r) => `${r.acquiredAt}: ${metricsText(r.metrics)}`).join('; ') || '—',
            c.flags.map((f) => `${f.severity}: ${f.message}`).join(' ') || '—',
            String(c.openFlags),
          ]),
        ).replace(
          /<td>(in control|flagged|no run)<\/td>/g,
          (_m, v: keyof typeof verdictClass) => `<td class="${verdictClass[v]}">${v}</td>`,
        ),
    ...figs.controls.map(figureHtml),
    '<h2 id="instrument">Instrument health</h2>',
    tableHtml(health.header, health.rows),
    `<p>${e(detectorCurveText(data))}</p>`,
    ...(figs.trends ? [figureHtml(figs.trends)] : ['<p>No instrument checks recorded in the period.</p>']),
    '<h2 id="plots">The day\'s measurements</h2>',
    ...(figs.decay ? [figureHtml(figs.decay)] : []),
    ...(figs.emission ? [figureHtml(figs.emission)] : []),
    ...(data.plots.notes.length === 0 ? [] : [`<ul>${data.plots.notes.map((n) => `<li>${e(n)}</li>`).join('')}</ul>`]),
    '<h2 id="samples">Samples</h2>',
    data.samples.length === 0 ? '<p>No sets processed this day.</p>' : tableHtml(samples.header, samples.rows),
    '<h2 id="alerts">Alerts</h2>',
    data.alerts.deliveries.length === 0
      ? '<p>No alert deliveries this day.</p>'
      : tableHtml(
          ['at', 'channel', 'alert', 'severity', 'status', 'attempts', 'error'],
          data.alerts.deliveries.map((d) => [
            d.at,
            d.channelId,
            d.key,
            d.severity,
            d.status,
            String(d.attempts),
            d.error ?? '',
          ]),
        ),
    data.alerts.undelivered.length === 0
      ? '<p>Every alert was delivered.</p>'
      : `<p><strong>Not delivered:</strong></p>${tableHtml(
          ['raised', 'channel', 'alert', 'severity', 'state', 'attempts', 'last error'],
          data.alerts.undelivered.map((d) => [
            d.at,
            d.channelId,
            d.key,
            d.severity,
            d.status === 'pending' ? 'still retried' : 'expired (given up)',
            String(d.attempts),
            d.error ?? 'not tried yet',
          ]),
        )}`,
    '<h2 id="rejections">Rejected files</h2>',
    data.rejections.length === 0
      ? '<p>None.</p>'
      : tableHtml(
          ['at', 'file', 'state', 'code', 'reason'],
          data.rejections.map((r) => [r.at, r.name, r.state, r.code, r.message]),
        ),
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
    '<p class="muted">Charts use the Okabe–Ito colour-blind-safe palette; shapes and dashes repeat what colours show. Each chart has a text alternative below it and its data in a table.</p>',
  ];

  const md: string[] = [
    `# ${title}`,
    '',
    `Day ${data.date} in ${data.timeZone} (${data.fromIso} to ${data.toIso}); built ${data.generatedAt} by driftlight ${data.softwareVersion}.`,
    '',
    '## Summary',
    '',
    `- files received: ${data.files.received}${
      Object.keys(data.files.byState).length === 0
        ? ''
        : ` (${Object.entries(data.files.byState)
            .map(([s, n]) => `${s} ${n}`)
            .join(', ')})`
    }`,
    `- sets processed: ${data.sets.processed}${
      Object.keys(data.sets.byRole).length === 0
        ? ''
        : ` (${Object.entries(data.sets.byRole)
            .map(([r, n]) => `${r} ${n}`)
            .join(', ')})`
    }, partial ${data.sets.partial}`,
    `- files rejected or failed: ${data.rejections.length}`,
    `- alerts delivered ${data.alerts.delivered}, failed ${data.alerts.failed}; not delivered (any day): ${data.alerts.undelivered.length}`,
    `- sets waiting: ${data.waiting.length}`,
    '',
    '## Controls',
    '',
    ...(data.controls.length === 0
      ? ['No control is defined.']
      : data.controls.flatMap((c) => [
          `- **${c.label}: ${c.verdict}**${c.runs.length === 0 ? '' : ` — ${c.runs.map((r) => `${r.acquiredAt}: ${metricsText(r.metrics)}`).join('; ')}`}; open flags ${c.openFlags}`,
          ...c.flags.map((f) => `  - ${f.severity}: ${f.message} (${f.ruleId} ${f.check})`),
        ])),
    '',
    ...figs.controls.flatMap((f) => [`**${f.title}.** ${f.textAlternative}`, '']),
    '## Instrument health',
    '',
    markdownTable(health.header, health.rows),
    '',
    detectorCurveText(data),
    '',
    ...(figs.trends ? [`**${figs.trends.title}.** ${figs.trends.textAlternative}`, ''] : []),
    "## The day's measurements",
    '',
    ...(figs.decay ? [`**${figs.decay.title}.** ${figs.decay.textAlternative}`, ''] : []),
    ...(figs.emission ? [`**${figs.emission.title}.** ${figs.emission.textAlternative}`, ''] : []),
    ...data.plots.notes.map((n) => `- ${n}`),
    '',
    '## Samples',
    '',
    data.samples.length === 0 ? 'No sets processed this day.' : markdownTable(samples.header, samples.rows),
    '',
    '## Alerts',
    '',
    ...(data.alerts.deliveries.length === 0
      ? ['No alert deliveries this day.']
      : data.alerts.deliveries.map(
          (d) =>
            `- ${d.at} ${d.channelId} ${d.key} ${d.severity}: ${d.status} after ${d.attempts} attempt(s)${d.error === null ? '' : ` (${d.error})`}`,
        )),
    '',
    ...(data.alerts.undelivered.length === 0
      ? ['Every alert was delivered.']
      : [
          'Not delivered:',
          ...data.alerts.undelivered.map(
            (d) =>
              `- ${d.at} ${d.channelId} ${d.key} ${d.severity}, ${d.status === 'pending' ? 'still retried' : 'expired'} after ${d.attempts} attempt(s)${d.error === null ? '' : `: ${d.error}`}`,
          ),
        ]),
    '',
    '## Rejected files',
    '',
    ...(data.rejections.length === 0
      ? ['None.']
      : data.rejections.map((r) => `- ${r.at} ${r.name} (${r.state}) ${r.code}: ${r.message}`)),
    '',
    '## Waiting sets',
    '',
    ...(data.waiting.length === 0
      ? ['Nothing is waiting.']
      : data.waiting.map(
          (w) =>
            `- ${w.setId} (${w.sampleId}, ${w.role}, ${w.state} since ${w.since}): has ${w.has.join(', ') || 'nothing'}; lacks ${w.lacks.join(', ') || 'nothing'}`,
        )),
    '',
  ];
  return {
    html: standalonePage(title, html.join('\n')),
    markdown: md.join('\n'),
    json: `${JSON.stringify(data, null, 2)}\n`,
    figures,
  };
}

/** A GitHub-flavoured Markdown table (pipes in cells escaped). */
function markdownTable(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const cell = (text: string): string => text.replace(/\|/g, '\\|').replace(/\n/g, ' ');
  return [
    `| ${header.map(cell).join(' | ')} |`,
    `| ${header.map(() => '---').join(' | ')} |`,
    ...rows.map((r) => `| ${r.map(cell).join(' | ')} |`),
  ].join('\n');
}
