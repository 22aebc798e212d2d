// The format-neutral intermediate every text reader produces: named numeric columns, header
// entries, line numbers, and what the container itself declared (JCAMP units, data type).
import type { HeaderEntry } from './metadata-vocabulary.js';
import type { LayoutInfo } from './types.js';

export interface RawColumn {
  readonly name: string;
  readonly values: Float64Array;
}

export interface RawTable {
  /** Numeric columns in file order, all of one length. */
  readonly columns: readonly RawColumn[];
  /** Header entries in file order (mapped through the vocabulary later). */
  readonly headerEntries: readonly HeaderEntry[];
  /** 1-based file line of a data row, when rows map to lines. */
  readonly lineOfRow: (row: number) => number | undefined;
  /** 1-based line of the column-name line (or the line declaring the axis unit), for unit errors. */
  readonly unitLine: number | undefined;
  /** Layout fields known to the container reader. */
  readonly layout: Pick<
    LayoutInfo,
    'format' | 'delimiter' | 'decimalMark' | 'headerLineCount' | 'hasBom' | 'lineEnding' | 'encoding' | 'jcamp'
  >;
  /** Whether the column names came from the file (false: generated "column N"). */
  readonly namedColumns: boolean;
  /** Index of the axis column when the container fixes it (JCAMP-DX: 0); otherwise found by name. */
  readonly axisColumnIndex?: number;
  /** Axis unit declared by the container (JCAMP ##XUNITS), overriding the column name. */
  readonly declaredAxisUnit?: string;
  /** Kind words declared by the container (JCAMP ##DATA TYPE), used when the header names no kind. */
  readonly declaredKind?: string;
  /** Text after the data that ended it (a summary block): its first line and its lines, read as header entries too. */
  readonly trailer?: { readonly line: number; readonly lineCount: number };
  /** Value unit declared by the container (JCAMP ##YUNITS mapped), used when the header names none. */
  readonly declaredValueUnit?: string;
}
