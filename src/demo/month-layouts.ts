// The export layouts the demo month's invented instruments write: European semicolon text, tab text
// with a '#' header, driftlight JSON decays, a headerless TCSPC script export, and a decay file with
// two emission wavelengths. Pure text builders.
import { writeDataJson, type LayoutInfo } from '../formats/index.js';
import { metadataEntries } from '../formats/metadata-lines.js';
import { canonicalKey } from '../formats/metadata-vocabulary.js';
import type { Spectrum } from '../model/spectrum.js';
import type { Decay } from '../model/decay.js';

/** Semicolon-separated text with decimal commas and a free-form header (one of the layouts read). */
export function europeanText(spectrum: Spectrum, header: readonly string[]): string {
  const rows = Array.from(
    spectrum.wavelengthNm,
    (nm, i) => `${String(nm).replace('.', ',')};${String(spectrum.values[i]).replace('.', ',')}`,
  );
  return `${[...header, 'Wavelength [nm];Intensity [counts]', ...rows].join('\r\n')}\r\n`;
}

/** Tab-separated text with a short '#' header (one of the layouts read). */
export function tabText(spectrum: Spectrum, header: readonly string[], valueName: string): string {
  const rows = Array.from(spectrum.wavelengthNm, (nm, i) => `${nm}\t${spectrum.values[i]}`);
  return `${[...header.map((h) => `# ${h}`), `wavelength (nm)\t${valueName}`, ...rows].join('\n')}\n`;
}

/** A decay (with its IRF column) in driftlight's own JSON data format. */
export function decayJson(decay: Decay): string {
  const layout: LayoutInfo = {
    format: 'driftlight-json',
    delimiter: null,
    decimalMark: '.',
    headerLineCount: 0,
    columnNames: ['time (ns)', 'counts', 'irf'],
    axisColumn: 'time (ns)',
    valueColumn: 'counts',
    irfColumn: decay.irfCounts === undefined ? null : 'irf',
    axisUnitFound: 'ns',
    ignoredColumns: [],
    hasBom: false,
    lineEnding: 'none',
    encoding: 'utf-8',
    conversions: [],
  };
  return writeDataJson({ type: 'decay', decay, layout });
}

/**
 * A decay as an invented lab script writes it: "# key: value" lines, then channel<TAB>counts<TAB>IRF
 * without column names — a layout only the instrument profile "tcspc-script" of the month's config
 * (formats.profiles) settles: channel axis, its width, counts and IRF columns.
 */
export function tcspcScriptText(decay: Decay): string {
  const irf = decay.irfCounts;
  if (irf === undefined) throw new RangeError('tcspcScriptText: the decay has no IRF column');
  const header = [
    '# TCSPC script export: channel, counts, IRF (no column names)',
    ...metadataEntries(decay.metadata).map(([key, value]) => `# ${key}: ${value}`),
  ];
  const rows = Array.from(decay.counts, (count, i) => `${i}\t${count}\t${irf[i] ?? 0}`);
  return `${[...header, ...rows].join('\n')}\n`;
}

/**
 * A decay file with two count columns, the same species seen at two emission wavelengths (the
 * band's peak and its red edge) with one IRF column: a multi-measurement file, one result per column.
 */
export function twoWavelengthDecayCsv(peak: Decay, redEdge: Decay, peakNm: number, redEdgeNm: number): string {
  const irf = peak.irfCounts;
  if (irf === undefined) throw new RangeError('twoWavelengthDecayCsv: the decay has no IRF column');
  const header = [
    `# ${canonicalKey('kind')}: decay`,
    `# ${canonicalKey('channelWidthNs')}: ${peak.channelWidthNs}`,
    ...metadataEntries(peak.metadata)
      .filter(([key]) => key !== canonicalKey('emissionNm'))
      .map(([key, value]) => `# ${key}: ${value}`),
    `time (ns),counts at ${peakNm} nm,counts at ${redEdgeNm} nm,irf`,
  ];
  const rows = Array.from(
    peak.timeNs,
    (t, i) => `${t},${peak.counts[i] ?? 0},${redEdge.counts[i] ?? 0},${irf[i] ?? 0}`,
  );
  return `${[...header, ...rows].join('\n')}\n`;
}
