// Writer for driftlight's own JSON data file ("driftlight.data/1", schemas/data.schema.json).
// JSON numbers use the shortest round-trip text, so every value reads back exactly.
import type { MeasurementContent } from './types.js';
import { DATA_FORMAT_TAG } from './json-schema.js';

/** Writes parsed data as one driftlight.data/1 JSON document (compact, newline-terminated); the source layout is kept as `sourceLayout`. */
export function writeDataJson(data: MeasurementContent): string {
  if (data.type === 'spectrum') {
    const { spectrum } = data;
    const otherColumns: Record<string, number[]> = {};
    for (const [name, column] of Object.entries(spectrum.otherColumns)) {
      Object.defineProperty(otherColumns, name, {
        value: Array.from(column),
        enumerable: true,
        writable: true,
        configurable: true,
      });
    }
    return `${JSON.stringify({
      format: DATA_FORMAT_TAG,
      type: 'spectrum',
      spectrum: {
        kind: spectrum.kind,
        wavelengthNm: Array.from(spectrum.wavelengthNm),
        values: Array.from(spectrum.values),
        valueUnit: spectrum.valueUnit,
        valueColumn: spectrum.valueColumn,
        otherColumns,
        metadata: spectrum.metadata,
      },
      sourceLayout: data.layout,
    })}\n`;
  }
  const { decay } = data;
  return `${JSON.stringify({
    format: DATA_FORMAT_TAG,
    type: 'decay',
    decay: {
      timeNs: Array.from(decay.timeNs),
      counts: Array.from(decay.counts),
      channelWidthNs: decay.channelWidthNs,
      ...(decay.irfCounts === undefined ? {} : { irfCounts: Array.from(decay.irfCounts) }),
      metadata: decay.metadata,
    },
    sourceLayout: data.layout,
  })}\n`;
}
