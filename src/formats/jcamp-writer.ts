// Writer for JCAMP-DX 5.01 single spectra in AFFN form: ##XYDATA=(X++(Y..Y)) when the wavelength axis
// is exactly FIRSTX + i·(LASTX − FIRSTX)/(NPOINTS − 1) and no number needs an exponent, else
// ##XYPOINTS=(XY..XY). Ordinates use the
// shortest round-trip decimal text with XFACTOR = YFACTOR = 1, so values read back exactly.
import type { Spectrum, SpectrumKind } from '../model/spectrum.js';
import { canonicalKey } from './metadata-vocabulary.js';
import { metadataEntries, oneLine } from './metadata-lines.js';
import { itemAt } from '../model/item-at.js';

/** Longest data line written (JCAMP-DX asks for at most 80 characters). */
const MAX_LINE = 80;

const DATA_TYPES: Readonly<Record<SpectrumKind, string>> = {
  emission: 'FLUORESCENCE SPECTRUM',
  excitation: 'FLUORESCENCE EXCITATION SPECTRUM',
  absorbance: 'UV/VIS SPECTRUM',
  transmittance: 'UV/VIS SPECTRUM',
  blank: 'FLUORESCENCE SPECTRUM',
  'detector-correction': 'CORRECTION CURVE',
};

/** Labels the writer fills itself; extra entries with these names are used for them, not repeated. */
const OWN_LABELS = ['TITLE', 'ORIGIN', 'OWNER'];

function yUnits(valueUnit: string): string {
  const unit = valueUnit.toLowerCase();
  if (unit === 'absorbance') return 'ABSORBANCE';
  if (unit === 'counts') return 'COUNTS';
  if (unit === 'transmittance') return 'TRANSMITTANCE';
  return 'ARBITRARY UNITS';
}

/** True when no number of the array needs exponent notation (other readers may take "e" in ##XYDATA for SQZ −5). */
function plainDecimals(values: Float64Array): boolean {
  for (const value of values) if (String(value).includes('e')) return false;
  return true;
}

/** True when x[i] equals first + i·step exactly for every point (so ##XYDATA reproduces the axis bit for bit). */
function exactlyUniform(x: Float64Array): boolean {
  const n = x.length;
  const first = itemAt(x, 0);
  const last = itemAt(x, n - 1);
  const step = (last - first) / (n - 1);
  for (let i = 0; i < n - 1; i++) if (first + i * step !== x[i]) return false;
  return true;
}

/** Writes one spectrum as JCAMP-DX 5.01 (value column only; other columns are not written); exact round-trip through readData. */
export function writeSpectrumJcamp(spectrum: Spectrum): string {
  const x = spectrum.wavelengthNm;
  const y = spectrum.values;
  const n = x.length;
  const extra = spectrum.metadata.extra;
  const lines = [
    `##TITLE=${oneLine(extra['TITLE'] ?? 'driftlight spectrum')}`,
    '##JCAMP-DX=5.01',
    `##DATA TYPE=${DATA_TYPES[spectrum.kind]}`,
    `##ORIGIN=${oneLine(extra['ORIGIN'] ?? 'driftlight')}`,
    `##OWNER=${oneLine(extra['OWNER'] ?? 'unspecified')}`,
    `##$${canonicalKey('kind').toUpperCase()}=${spectrum.kind}`,
    `##$${canonicalKey('valueColumn').toUpperCase()}=${oneLine(spectrum.valueColumn)}`,
    `##$${canonicalKey('valueUnit').toUpperCase()}=${oneLine(spectrum.valueUnit)}`,
  ];
  const typedCount = metadataEntries({ ...spectrum.metadata, extra: {} }).length;
  metadataEntries(spectrum.metadata).forEach(([key, value], index) => {
    if (index >= typedCount && OWN_LABELS.includes(key)) return;
    lines.push(`##$${index < typedCount ? key.toUpperCase() : key}=${value}`);
  });
  lines.push(
    '##XUNITS=NANOMETERS',
    `##YUNITS=${yUnits(spectrum.valueUnit)}`,
    '##XFACTOR=1',
    '##YFACTOR=1',
    `##FIRSTX=${String(x[0])}`,
    `##LASTX=${String(x[n - 1])}`,
    `##NPOINTS=${n}`,
    `##FIRSTY=${String(y[0])}`,
  );
  if (exactlyUniform(x) && plainDecimals(x) && plainDecimals(y)) {
    lines.push('##XYDATA=(X++(Y..Y))');
    let i = 0;
    while (i < n) {
      let line = String(x[i]);
      let count = 0;
      while (i < n && (count === 0 || line.length + 1 + String(y[i]).length <= MAX_LINE)) {
        line += ` ${String(y[i])}`;
        i++;
        count++;
      }
      lines.push(line);
    }
  } else {
    lines.push('##XYPOINTS=(XY..XY)');
    for (let i = 0; i < n; i++) lines.push(`${String(x[i])}, ${String(y[i])}`);
  }
  lines.push('##END=');
  return `${lines.join('\n')}\n`;
}
