// docs/spectra.md and docs/photophysics.md state each option's default; this checks them against the resolvers.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import * as photophysics from '../../../src/photophysics/index.js';
import * as spectra from '../../../src/spectra/index.js';

const resolvers: Record<string, () => Readonly<Record<string, unknown>>> = {
  resolveDarkOptions: () => spectra.resolveDarkOptions(),
  resolveBlankOptions: () => spectra.resolveBlankOptions(),
  resolveReferenceChannelOptions: () => spectra.resolveReferenceChannelOptions(),
  resolveDetectorCorrectionOptions: () => spectra.resolveDetectorCorrectionOptions(),
  resolveInnerFilterOptions: () => spectra.resolveInnerFilterOptions(),
  resolveScaleOptions: () => spectra.resolveScaleOptions(),
  resolveRamanOptions: () => spectra.resolveRamanOptions(),
  resolveRelativeYieldOptions: () => photophysics.resolveRelativeYieldOptions(),
  resolveGradientYieldOptions: () => photophysics.resolveGradientYieldOptions(),
  resolveStricklerBergOptions: () => photophysics.resolveStricklerBergOptions(),
  resolveSternVolmerOptions: () => photophysics.resolveSternVolmerOptions(),
};

/** Rows `| \`option\` | unit | default | meaning |` under each `#### \`resolveXOptions\`` heading. */
function documentedDefaults(markdown: string): Map<string, Map<string, string>> {
  const sections = new Map<string, Map<string, string>>();
  let current: Map<string, string> | undefined;
  for (const line of markdown.split('\n')) {
    const heading = /^#### `(resolve\w+Options)`/.exec(line);
    if (heading !== null) {
      current = new Map();
      sections.set(heading[1] as string, current);
      continue;
    }
    if (line.startsWith('#')) current = undefined;
    const row = /^\| `(\w+)` \| [^|]* \| ([^|]+) \|/.exec(line);
    if (row !== null && current !== undefined) current.set(row[1] as string, (row[2] as string).trim());
  }
  return sections;
}

const docs = ['../../../docs/spectra.md', '../../../docs/photophysics.md']
  .map((p) => readFileSync(new URL(p, import.meta.url), 'utf8'))
  .join('\n');
const sections = documentedDefaults(docs);

describe('documented option defaults', () => {
  it('documents every resolver', () => {
    expect([...sections.keys()].sort()).toEqual(Object.keys(resolvers).sort());
  });

  it.each(Object.keys(resolvers))(
    '%s: each documented default equals the code default, and every default is documented',
    (name) => {
      const resolved = (resolvers[name] as () => Readonly<Record<string, unknown>>)();
      const documented = sections.get(name) ?? new Map<string, string>();
      for (const [option, text] of documented) {
        if (text === '—') expect(resolved[option]).toBeUndefined();
        else expect(resolved[option]).toEqual(JSON.parse(text.replace(/^`|`$/g, '')));
      }
      for (const option of Object.keys(resolved)) expect(documented.has(option)).toBe(true);
    },
  );
});
