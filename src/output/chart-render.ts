// Renders a Vega-Lite specification to a standalone SVG string on the server: compiled to Vega and
// drawn by a headless Vega View (renderer 'none', no canvas, no DOM, no network loader).
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';

/** A loader that refuses every URL: specs carry their data inline, and nothing is fetched. */
const noNetworkLoader = vega.loader();
noNetworkLoader.load = (uri: string): Promise<string> =>
  Promise.reject(new Error(`charts load no external data (asked for ${uri})`));

/** Escapes text for an XML/HTML text node or attribute. */
export function escapeXml(text: string): string {
  return text.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c,
  );
}

/**
 * Vega-Lite's compile log: warnings are kept (the caller may report them), except the notice that a
 * shared time axis merged identical per-layer domains, which every multi-layer chart with a fixed
 * domain raises; errors throw.
 */
function compileLogger(warnings: string[]): ReturnType<typeof vega.logger> {
  return vega.logger(vega.Warn, 'warn', (method, _level, args) => {
    const text = args.map(String).join(' ');
    if (method === 'error') throw new Error(`chart specification error: ${text}`);
    if (!text.startsWith('Conflicting scale property "domain')) warnings.push(text);
  });
}

/**
 * SVG text of a Vega-Lite spec (Satyanarayan et al., IEEE TVCG 23, 341, 2017), with a <title> and
 * <desc> for screen readers, and Vega-Lite's compile warnings. Async because Vega's dataflow is.
 */
export async function renderSvg(
  spec: TopLevelSpec,
  accessible: { title: string; description: string },
): Promise<{ svg: string; warnings: string[] }> {
  const warnings: string[] = [];
  const compiled = compile(spec, { logger: compileLogger(warnings) }).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', loader: noNetworkLoader, logLevel: vega.Error });
  try {
    const svg = await view.toSVG();
    const label = ` role="img" aria-label="${escapeXml(accessible.title)}"`;
    return {
      svg: svg.replace(
        /^<svg([^>]*)>/,
        `<svg$1${label}><title>${escapeXml(accessible.title)}</title><desc>${escapeXml(accessible.description)}</desc>`,
      ),
      warnings,
    };
  } finally {
    view.finalize();
  }
}
