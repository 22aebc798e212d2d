// Builds a Decay from raw columns: time axis to ns (ps ÷ 1000 … s × 10⁹) or channel numbers ×
// channel width, descending axes reversed, counts and IRF columns found by name.
import { createDecay, type Decay } from '../model/decay.js';
import type { RawColumn, RawTable } from './raw-table.js';
import type { LayoutConversion } from './types.js';
import type { MappedHeader } from './metadata-vocabulary.js';
import { columnRole } from './column-roles.js';
import type { AxisUnit } from './units.js';
import { checkMonotonic, checkNonNegative, checkUniform, reversed } from './axis-checks.js';
import { reject, withFile } from './reject.js';
import { itemAt } from '../model/item-at.js';

export interface DecayBuildInput {
  readonly table: RawTable;
  readonly axis: RawColumn;
  readonly unit: AxisUnit;
  readonly valueIndices: readonly number[];
  readonly requestedIndex: number | undefined;
  /** The IRF column fixed by a profile (default: found by name). */
  readonly irfIndex?: number | undefined;
  readonly mapped: MappedHeader;
  readonly metadata: Record<string, unknown>;
  readonly file: string;
  readonly conversions: LayoutConversion[];
}

/** Scales an axis to ns; factors below 1 divide by the exact reciprocal (ps ÷ 1000) so ns values are correctly rounded. */
function scaleToNs(values: Float64Array, factor: number): Float64Array {
  if (factor === 1) return values;
  if (factor < 1) {
    const divisor = Math.round(1 / factor);
    return values.map((value) => value / divisor);
  }
  return values.map((value) => value * factor);
}

/** Relative spacing tolerance (as in axis-checks.ts and the model). */
const SPACING_TOLERANCE = 1e-3;

/** The rounding step of written numbers: the largest 10^-d (d = 0 … 12) of which every value is a whole multiple. */
function roundingQuantum(values: Float64Array): number {
  for (let digits = 0; digits <= 12; digits++) {
    const scale = 10 ** digits;
    let whole = true;
    for (let i = 0; i < values.length && whole; i++) {
      const scaled = itemAt(values, i) * scale;
      whole = Math.abs(scaled - Math.round(scaled)) <= 1e-6 * Math.max(1, Math.abs(scaled));
    }
    if (whole) return 1 / scale;
  }
  return 0;
}

/**
 * A time axis written with fewer digits than its channel width needs (0.0122 ns channels written
 * to 0.01 ns) is uneven only by its rounding: when every value lies within one rounding step of
 * t0 + i·w (w from the header, else the mean step), the channels are rebuilt exactly. Returns
 * undefined when the axis is already even, or when it is uneven beyond its rounding.
 */
function restoreRoundedAxis(
  values: Float64Array,
  statedWidth: number | undefined,
): { values: Float64Array; width: number; quantum: number; source: string } | undefined {
  const n = values.length;
  if (n < 3) return undefined;
  const first = itemAt(values, 0);
  const meanStep = (itemAt(values, n - 1) - first) / (n - 1);
  let even = true;
  for (let i = 1; i < n && even; i++)
    even = Math.abs(itemAt(values, i) - itemAt(values, i - 1) - meanStep) <= SPACING_TOLERANCE * Math.abs(meanStep);
  if (even) return undefined;
  const quantum = roundingQuantum(values);
  if (!(quantum > 0) || quantum < SPACING_TOLERANCE * Math.abs(meanStep)) return undefined;
  const direction = Math.sign(meanStep);
  const usable =
    statedWidth !== undefined &&
    Math.abs(statedWidth - Math.abs(meanStep)) <= (2 * quantum) / (n - 1) + SPACING_TOLERANCE * statedWidth;
  const width = usable ? statedWidth : Math.abs(meanStep);
  const rebuilt = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    rebuilt[i] = first + direction * i * width;
    if (Math.abs(itemAt(rebuilt, i) - itemAt(values, i)) > quantum * (1 + 1e-9)) return undefined;
  }
  return {
    values: rebuilt,
    width,
    quantum,
    source: usable ? 'channel width from the header' : 'mean step of the axis',
  };
}

/** Builds the Decay; columns not used as counts or IRF are listed in `ignoredColumns`. */
export function buildDecay(input: DecayBuildInput): {
  decay: Decay;
  ignoredColumns: string[];
  countsColumn: string;
  irfColumn: string | null;
} {
  const { table, axis, unit, file, mapped } = input;
  const columns = table.columns;
  const roles = input.valueIndices.map((index) => ({ index, role: columnRole(itemAt(columns, index).name) }));
  const countsIndex =
    input.requestedIndex ??
    roles.find((entry) => entry.role === 'counts')?.index ??
    roles.find((entry) => entry.role !== 'irf')?.index;
  if (countsIndex === undefined) {
    return reject('MISSING_COLUMN', 'the decay has no counts column (only an IRF column)', file, table.unitLine);
  }
  const irfIndex = input.irfIndex ?? roles.find((entry) => entry.role === 'irf' && entry.index !== countsIndex)?.index;
  const direction = checkMonotonic(axis.values, table.lineOfRow, file, 'time axis');
  const statedWidthInAxisUnit =
    mapped.numbers.channelWidthNs === undefined || unit.quantity === 'channel'
      ? undefined
      : mapped.numbers.channelWidthNs / unit.toModelFactor;
  const restored = restoreRoundedAxis(axis.values, statedWidthInAxisUnit);
  if (restored === undefined) checkUniform(axis.values, table.lineOfRow, file);
  const axisValues = restored?.values ?? axis.values;
  if (restored !== undefined) {
    input.conversions.push({
      code: 'axis-rounding-restored',
      detail: `the time axis is written to ${restored.quantum} ${unit.symbol}; channels rebuilt as t0 + i × ${restored.width} ${unit.symbol} (${restored.source})`,
    });
  }
  const countsColumn = itemAt(columns, countsIndex);
  checkNonNegative(countsColumn.values, table.lineOfRow, file, `"${countsColumn.name}"`);
  const irfColumn = irfIndex === undefined ? undefined : itemAt(columns, irfIndex);
  if (irfColumn !== undefined) checkNonNegative(irfColumn.values, table.lineOfRow, file, `"${irfColumn.name}"`);
  let timeNs: Float64Array;
  let channelWidthNs = mapped.numbers.channelWidthNs;
  if (unit.quantity === 'channel') {
    if (channelWidthNs === undefined || !(channelWidthNs > 0)) {
      return reject(
        'UNKNOWN_UNIT',
        'the axis holds channel numbers but no channel width is given',
        file,
        table.unitLine,
        'Add a header line such as "channel width (ps): 25", or give the axis in time units.',
      );
    }
    const width = channelWidthNs;
    timeNs = axisValues.map((channel) => channel * width);
    input.conversions.push({ code: 'channel-to-time', detail: `t[ns] = channel × ${width} ns` });
  } else {
    timeNs = scaleToNs(axisValues, unit.toModelFactor);
    if (channelWidthNs === undefined && axisValues.length > 1) {
      // The width from the axis in its own unit, scaled once: 50 ps → 0.05 ns rather than a mean of scaled values.
      const rawWidth =
        restored?.width ??
        Math.abs((itemAt(axisValues, axisValues.length - 1) - itemAt(axisValues, 0)) / (axisValues.length - 1));
      channelWidthNs = itemAt(scaleToNs(Float64Array.of(rawWidth), unit.toModelFactor), 0);
    }
    if (unit.toModelFactor !== 1)
      input.conversions.push({ code: 'time-unit-to-ns', detail: `${unit.symbol} → ns (× ${unit.toModelFactor})` });
  }
  let counts = countsColumn.values;
  let irfCounts = irfColumn?.values;
  if (direction === -1) {
    timeNs = reversed(timeNs);
    counts = reversed(counts);
    if (irfCounts !== undefined) irfCounts = reversed(irfCounts);
    input.conversions.push({ code: 'axis-reversed', detail: 'channels reordered to ascending time' });
    if (unit.quantity === 'channel' && channelWidthNs !== undefined) channelWidthNs = Math.abs(channelWidthNs);
  }
  const ignoredColumns = input.valueIndices
    .filter((index) => index !== countsIndex && index !== irfIndex)
    .map((index) => itemAt(columns, index).name);
  const decay = withFile(
    file,
    () =>
      createDecay({
        timeNs,
        counts,
        ...(channelWidthNs === undefined ? {} : { channelWidthNs }),
        ...(irfCounts === undefined ? {} : { irfCounts }),
        metadata: input.metadata,
      }),
    mapped.lines.channelWidthNs,
  );
  return { decay, ignoredColumns, countsColumn: countsColumn.name, irfColumn: irfColumn?.name ?? null };
}
