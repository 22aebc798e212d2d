// Builds a Decay from raw columns: time axis to ns (ps ÷ 1000 … s × 10⁹) or channel numbers ×
// channel width, descending axes reversed, counts and IRF columns found by name.
import { createDecay, type Decay, type DecayMetadata } from '../model/decay.js';
import type { RawColumn, RawTable } from './raw-table.js';
import type { LayoutConversion } from './types.js';
import type { MappedHeader } from './metadata-vocabulary.js';
import { columnRole } from './column-roles.js';
import type { AxisUnit } from './units.js';
import { checkMonotonic, checkNonNegative, checkUniform, reversed } from './axis-checks.js';
import { reject, withFile } from './reject.js';

export interface DecayBuildInput {
  readonly table: RawTable;
  readonly axis: RawColumn;
  readonly unit: AxisUnit;
  readonly valueIndices: readonly number[];
  readonly requestedIndex: number | undefined;
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

/** Builds the Decay; columns not used as counts or IRF are listed in `ignoredColumns`. */
export function buildDecay(input: DecayBuildInput): { decay: Decay; ignoredColumns: string[]; countsColumn: string; irfColumn: string | null } {
  const { table, axis, unit, file, mapped } = input;
  const columns = table.columns;
  const roles = input.valueIndices.map((index) => ({ index, role: columnRole((columns[index] as RawColumn).name) }));
  const countsIndex = input.requestedIndex
    ?? roles.find((entry) => entry.role === 'counts')?.index
    ?? roles.find((entry) => entry.role !== 'irf')?.index;
  if (countsIndex === undefined) {
    return reject('MISSING_COLUMN', 'the decay has no counts column (only an IRF column)', file, table.unitLine);
  }
  const irfIndex = roles.find((entry) => entry.role === 'irf' && entry.index !== countsIndex)?.index;
  const direction = checkMonotonic(axis.values, table.lineOfRow, file, 'time axis');
  checkUniform(axis.values, table.lineOfRow, file);
  const countsColumn = columns[countsIndex] as RawColumn;
  checkNonNegative(countsColumn.values, table.lineOfRow, file, `"${countsColumn.name}"`);
  const irfColumn = irfIndex === undefined ? undefined : (columns[irfIndex] as RawColumn);
  if (irfColumn !== undefined) checkNonNegative(irfColumn.values, table.lineOfRow, file, `"${irfColumn.name}"`);
  let timeNs: Float64Array;
  let channelWidthNs = mapped.numbers.channelWidthNs;
  if (unit.quantity === 'channel') {
    if (channelWidthNs === undefined || !(channelWidthNs > 0)) {
      return reject('UNKNOWN_UNIT', 'the axis holds channel numbers but no channel width is given', file, table.unitLine,
        'Add a header line such as "channel width (ps): 25", or give the axis in time units.');
    }
    const width = channelWidthNs;
    timeNs = axis.values.map((channel) => channel * width);
    input.conversions.push({ code: 'channel-to-time', detail: `t[ns] = channel × ${width} ns` });
  } else {
    timeNs = scaleToNs(axis.values, unit.toModelFactor);
    if (channelWidthNs === undefined && axis.values.length > 1) {
      // The width from the axis in its own unit, scaled once: 50 ps → 0.05 ns rather than a mean of scaled values.
      const rawWidth = Math.abs(((axis.values[axis.values.length - 1] as number) - (axis.values[0] as number)) / (axis.values.length - 1));
      channelWidthNs = (scaleToNs(Float64Array.of(rawWidth), unit.toModelFactor)[0] as number);
    }
    if (unit.toModelFactor !== 1) input.conversions.push({ code: 'time-unit-to-ns', detail: `${unit.symbol} → ns (× ${unit.toModelFactor})` });
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
  const ignoredColumns = input.valueIndices.filter((index) => index !== countsIndex && index !== irfIndex).map((index) => (columns[index] as RawColumn).name);
  const decay = withFile(file, () => createDecay({
    timeNs,
    counts,
    ...(channelWidthNs === undefined ? {} : { channelWidthNs }),
    ...(irfCounts === undefined ? {} : { irfCounts }),
    metadata: input.metadata as Partial<DecayMetadata>,
  }), mapped.lines.channelWidthNs);
  return { decay, ignoredColumns, countsColumn: countsColumn.name, irfColumn: irfColumn?.name ?? null };
}
