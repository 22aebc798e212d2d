// The public result types of the readers: the parsed data plus a description of the layout found.
import type { Decay } from '../model/decay.js';
import type { Spectrum } from '../model/spectrum.js';

/** The container format a file was recognised as. */
export type DataFormat = 'delimited' | 'jcamp-dx' | 'driftlight-json';

/** How a delimited file separates its columns ('whitespace' = runs of spaces and tabs). */
export type DelimiterName = ',' | '\t' | ';' | 'whitespace';

/** One change the reader made to the numbers on the way into the model. */
export interface LayoutConversion {
  /** Stable identifier of the conversion. */
  readonly code:
    | 'axis-reversed'
    | 'wavenumber-to-wavelength'
    | 'energy-to-wavelength'
    | 'micrometre-to-nanometre'
    | 'jacobian-intensity'
    | 'percent-transmittance-to-absorbance'
    | 'transmittance-to-absorbance'
    | 'time-unit-to-ns'
    | 'channel-to-time'
    | 'axis-unit-assumed'
    | 'raman-shift-to-wavelength'
    | 'axis-rounding-restored'
    | 'constant-column-as-metadata'
    | 'summary-after-data'
    | 'end-of-file-mark-dropped'
    | 'single-column-histogram'
    | 'column-pairs-split'
    | 'profile-applied';
  /** Human-readable detail, e.g. "ps → ns (× 0.001)". */
  readonly detail: string;
}

/** What the reader detected about a file's layout. */
export interface LayoutInfo {
  readonly format: DataFormat;
  /** Column separator (delimited text only; null otherwise). */
  readonly delimiter: DelimiterName | null;
  /** Decimal mark of the numbers. */
  readonly decimalMark: '.' | ',';
  /** Lines before the first data row (metadata lines, column-name line, blank lines). */
  readonly headerLineCount: number;
  /** Column names in file order (generated as "column N" when the file names none). */
  readonly columnNames: readonly string[];
  /** Name of the column used as the axis. */
  readonly axisColumn: string;
  /** Name of the column used as the values (spectrum) or the counts (decay). */
  readonly valueColumn: string;
  /** Name of the column used as the IRF (decays only; null when there is none). */
  readonly irfColumn: string | null;
  /** Axis unit as written in the file (e.g. "cm-1", "ps", "NANOMETERS"), or null when none was written. */
  readonly axisUnitFound: string | null;
  /** Columns present in the file but not carried into the model (e.g. fit curves next to a decay). */
  readonly ignoredColumns: readonly string[];
  /** Byte-order mark present at the start. */
  readonly hasBom: boolean;
  /** Line ending found first. */
  readonly lineEnding: 'lf' | 'crlf' | 'cr' | 'none';
  /** Text encoding of the file ('utf-8'; 'latin1' when the bytes are not valid UTF-8; UTF-16 transcoded before reading). */
  readonly encoding: 'utf-8' | 'latin1' | 'utf-16le' | 'utf-16be';
  /** Every column read as a measurement of its own (several when one file holds several decays or spectra). */
  readonly measurementColumns?: readonly string[];
  /** The formats profile that fixed this layout (its name), when one matched. */
  readonly profile?: string;
  /** Conversions applied, in order. */
  readonly conversions: readonly LayoutConversion[];
  /** JCAMP-DX only: the version label and the data table form found. */
  readonly jcamp?: { readonly version: string; readonly table: string; readonly compression: readonly string[] };
}

/** One measurement read from a file: a spectrum or a decay histogram, its id (the file name, with "#column" when the file holds several) and its layout. */
export type ParsedData = MeasurementContent & { readonly id: string };

/** A spectrum or a decay with its layout (what the writers take). */
export type MeasurementContent =
  | { readonly type: 'spectrum'; readonly spectrum: Spectrum; readonly layout: LayoutInfo }
  | { readonly type: 'decay'; readonly decay: Decay; readonly layout: LayoutInfo };
