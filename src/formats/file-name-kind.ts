// What a file's name says it holds ("decay_dye5.csv", "emission_sample3.csv"), used as a hint when
// the content does not say, and checked against the content when it does: a file whose name and
// content name different kinds is refused with both (KIND_CONFLICT), never silently read as one.
import type { SpectrumKind } from '../model/spectrum.js';
import { splitCamelCase } from './units.js';

type NamedKind = 'decay' | 'emission' | 'excitation' | 'absorbance';

const NAME_WORDS: ReadonlyArray<readonly [RegExp, NamedKind]> = [
  [/^(decay|decays|tcspc|lifetime|lifetimes|trpl|irf|prompt)$/, 'decay'],
  [/^(emission|fluorescence|fluor)$/, 'emission'],
  [/^(excitation|exc)$/, 'excitation'],
  [/^(absorbance|absorption|abs|uvvis|transmittance)$/, 'absorbance'],
];

/** The kind a file name names (its last path part split into words), or undefined when it names none or several. */
export function kindFromFileName(fileName: string): NamedKind | undefined {
  const base = fileName.replace(/\\/g, '/').split('/').pop() ?? fileName;
  const stem = base.replace(/\.[A-Za-z0-9]{1,5}$/, '');
  const words = splitCamelCase(stem)
    .toLowerCase()
    .replace(/uv[\s_-]*vis/g, 'uvvis')
    .split(/[^a-z]+/)
    .filter((word) => word !== '');
  const kinds = new Set<NamedKind>();
  for (const word of words) for (const [pattern, kind] of NAME_WORDS) if (pattern.test(word)) kinds.add(kind);
  return kinds.size === 1 ? [...kinds][0] : undefined;
}

/** The message of a name/content disagreement, or undefined when they agree (or one of them does not say). */
export function kindConflict(
  nameKind: NamedKind | undefined,
  builtKind: SpectrumKind | 'decay',
  file: string,
  explicitKind?: SpectrumKind,
  valueColumn?: string,
): string | undefined {
  if (nameKind === undefined) return undefined;
  const base = file.replace(/\\/g, '/').split('/').pop() ?? file;
  if (builtKind === 'decay') {
    return nameKind === 'decay'
      ? undefined
      : `the file name "${base}" says ${nameKind}, but the content is a decay (a time axis)`;
  }
  if (nameKind === 'decay')
    return `the file name "${base}" says decay, but the content is a${builtKind === 'absorbance' || builtKind === 'excitation' || builtKind === 'emission' ? 'n' : ''} ${builtKind} spectrum (a wavelength axis${valueColumn === undefined ? '' : `, values "${valueColumn}"`})`;
  const said = explicitKind === 'transmittance' ? 'absorbance' : explicitKind;
  if (said === undefined || said === 'blank' || said === 'detector-correction' || said === nameKind) return undefined;
  return `the file name "${base}" says ${nameKind}, but the content says ${said}${valueColumn === undefined ? '' : ` (values "${valueColumn}")`}`;
}
