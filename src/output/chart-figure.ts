// A control chart as a finished figure: rendered SVG, title, text alternative and its data table.
import { formatMetricValue } from '../qc/index.js';
import { controlChartSpec, describeControlChart } from './chart-control-spec.js';
import { tableHtml, type Figure } from './chart-html.js';
import { renderSvg } from './chart-render.js';
import type { ControlChartData } from './chart-series.js';

/** The title of a control chart ("Control chart: ctrl-a, control yield"). */
export function controlChartTitle(chart: ControlChartData): string {
  return `Control chart: ${chart.controlId}, ${chart.metricLabel}`;
}

/** Renders a control chart to a Figure (SVG via Vega-Lite, text alternative, data table). */
export async function controlChartFigure(chart: ControlChartData): Promise<Figure> {
  const title = controlChartTitle(chart);
  const textAlternative = describeControlChart(chart);
  const { svg, warnings } = await renderSvg(controlChartSpec(chart, title), { title, description: textAlternative });
  const rows = chart.points.map((p) => [
    p.acquiredAt,
    p.setId,
    formatMetricValue(chart.metric, p.value),
    p.status,
    p.deviationSd === undefined ? '' : p.deviationSd.toFixed(2),
    p.flags.join(', '),
  ]);
  return {
    id: `chart-${chart.controlId}-${chart.metric}`,
    title,
    svg,
    warnings,
    textAlternative,
    dataTableHtml: tableHtml(['acquired (UTC)', 'set', chart.metricLabel, 'status', 'deviation (SD)', 'flags'], rows),
  };
}
