// Judges one entry of the layout table (test/fixtures/formats/layouts/layouts.json): reads the
// fixture with the formats module (or the quench-series parser) and compares what came out with
// the expected outcome computed independently by make_layouts.py. Outcomes: read (as expected),
// refused (with the expected code), or misread (anything else: the wrong numbers, kind, count of
// measurements, or a refusal where a read was expected and vice versa).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import * as formats from '../../../src/formats/index.js';
import type { ParsedData } from '../../../src/formats/index.js';
import { InputRejected } from '../../../src/model/errors.js';
import { parseQuenchSeries } from '../../../src/cli/quench.js';
import { sternVolmer } from '../../../src/photophysics/index.js';

export const LAYOUTS = fileURLToPath(new URL('../../fixtures/formats/layouts/', import.meta.url));

export interface LayoutExpect {
  readonly type: 'decay' | 'spectrum' | 'rejected' | 'quench';
  readonly code?: string;
  readonly kind?: string;
  readonly points?: number;
  readonly axis0?: number;
  readonly axisLast?: number;
  readonly value0?: number;
  readonly measurements?: number;
  readonly ids?: readonly string[];
  readonly irf?: boolean;
  readonly channelWidthNs?: number;
  readonly excitationNm?: number;
  readonly emissionNm?: number;
  readonly temperatureC?: number;
  readonly concentrationM1?: number;
  readonly ksvPerM?: number;
}

export interface LayoutEntry {
  readonly file: string;
  readonly group: string;
  readonly layout: string;
  readonly expect: LayoutExpect;
  readonly before?: string;
  readonly after?: string;
}

export interface LayoutOutcome {
  readonly status: 'read' | 'refused' | 'misread';
  /** "read", "refused CODE", or "misread: what differs" / "refused CODE (expected …)". */
  readonly summary: string;
}

export function loadLayouts(): LayoutEntry[] {
  return JSON.parse(readFileSync(`${LAYOUTS}layouts.json`, 'utf8')) as LayoutEntry[];
}

function close(actual: number | undefined, expected: number, relative = 1e-6): boolean {
  return actual !== undefined && Math.abs(actual - expected) <= relative * Math.max(1, Math.abs(expected));
}

/** Every measurement the module reads from the bytes (readMeasurements when it exists, else readData alone). */
function readAll(content: Uint8Array, fileName: string): ParsedData[] {
  const all = (formats as unknown as { readMeasurements?: (c: Uint8Array, o: { fileName: string }) => ParsedData[] })
    .readMeasurements;
  return all === undefined ? [formats.readData(content, { fileName })] : all(content, { fileName });
}

function measurementId(data: ParsedData): string {
  return (data as unknown as { id?: string }).id ?? '';
}

function checkParsed(all: readonly ParsedData[], expect: LayoutExpect): string[] {
  const problems: string[] = [];
  const first = all[0];
  if (first === undefined) return ['nothing read'];
  if (first.type !== expect.type) return [`read as ${first.type}, expected ${expect.type}`];
  const count = expect.measurements ?? 1;
  if (all.length !== count) problems.push(`${all.length} measurement(s), expected ${count}`);
  for (const id of expect.ids ?? [])
    if (!all.some((data) => measurementId(data).includes(id))) problems.push(`no measurement id names "${id}"`);
  if (first.type === 'decay') {
    const { decay } = first;
    if (decay.timeNs.length !== expect.points)
      problems.push(`${decay.timeNs.length} points, expected ${String(expect.points)}`);
    if (expect.axis0 !== undefined && !close(decay.timeNs[0], expect.axis0, 1e-9))
      problems.push(`t0 ${String(decay.timeNs[0])} ns, expected ${expect.axis0}`);
    if (expect.axisLast !== undefined && !close(decay.timeNs[decay.timeNs.length - 1], expect.axisLast, 1e-9))
      problems.push(`last t ${String(decay.timeNs[decay.timeNs.length - 1])} ns, expected ${expect.axisLast}`);
    if (expect.value0 !== undefined && !close(decay.counts[0], expect.value0))
      problems.push(`first count ${String(decay.counts[0])}, expected ${expect.value0}`);
    if (expect.channelWidthNs !== undefined && !close(decay.channelWidthNs, expect.channelWidthNs, 1e-9))
      problems.push(`channel width ${decay.channelWidthNs} ns, expected ${expect.channelWidthNs}`);
    if (expect.irf === true && decay.irfCounts === undefined) problems.push('IRF column not read');
    if (expect.excitationNm !== undefined && decay.metadata.excitationNm !== expect.excitationNm)
      problems.push('excitation not read');
    return problems;
  }
  if (first.type === 'spectrum') {
    const { spectrum } = first;
    if (spectrum.kind !== expect.kind) problems.push(`kind ${spectrum.kind}, expected ${String(expect.kind)}`);
    if (spectrum.wavelengthNm.length !== expect.points)
      problems.push(`${spectrum.wavelengthNm.length} points, expected ${String(expect.points)}`);
    if (expect.axis0 !== undefined && !close(spectrum.wavelengthNm[0], expect.axis0))
      problems.push(`first λ ${String(spectrum.wavelengthNm[0])} nm, expected ${expect.axis0}`);
    if (expect.value0 !== undefined && !close(spectrum.values[0], expect.value0))
      problems.push(`first value ${String(spectrum.values[0])}, expected ${expect.value0}`);
    for (const field of ['excitationNm', 'emissionNm', 'temperatureC'] as const) {
      const wanted = expect[field];
      if (wanted !== undefined && (spectrum.metadata as unknown as Record<string, unknown>)[field] !== wanted)
        problems.push(
          `${field} ${String((spectrum.metadata as unknown as Record<string, unknown>)[field])}, expected ${wanted}`,
        );
    }
  }
  return problems;
}

function quenchOutcome(entry: LayoutEntry, bytes: Uint8Array): LayoutOutcome {
  try {
    const series = parseQuenchSeries(new TextDecoder().decode(bytes), entry.file);
    const concentrations = series.columns.concentration ?? [];
    const ratios = series.columns.ratio ?? [];
    const result = sternVolmer({ concentrationsM: concentrations, intensityRatios: ratios });
    const problems: string[] = [];
    if (!close(concentrations[1], entry.expect.concentrationM1 ?? Number.NaN))
      problems.push(
        `second concentration ${String(concentrations[1])} M, expected ${String(entry.expect.concentrationM1)}`,
      );
    if (!close(result.ksvPerM, entry.expect.ksvPerM ?? Number.NaN, 1e-3))
      problems.push(`K_SV ${result.ksvPerM} /M, expected ${String(entry.expect.ksvPerM)}`);
    return problems.length === 0
      ? { status: 'read', summary: 'read' }
      : { status: 'misread', summary: `misread: ${problems.join('; ')}` };
  } catch (error) {
    if (error instanceof InputRejected) return { status: 'refused', summary: `refused ${error.code}` };
    throw error;
  }
}

/** Reads the fixture of `entry` and judges the outcome against its expectation. */
export function layoutOutcome(entry: LayoutEntry): LayoutOutcome {
  const bytes = readFileSync(`${LAYOUTS}${entry.file}`);
  if (entry.expect.type === 'quench') return quenchOutcome(entry, bytes);
  let all: ParsedData[];
  try {
    all = readAll(bytes, entry.file);
  } catch (error) {
    if (!(error instanceof InputRejected)) throw error;
    if (entry.expect.type === 'rejected') {
      return error.code === entry.expect.code
        ? { status: 'refused', summary: `refused ${error.code}` }
        : { status: 'refused', summary: `refused ${error.code} (expected ${String(entry.expect.code)})` };
    }
    return { status: 'refused', summary: `refused ${error.code}` };
  }
  if (entry.expect.type === 'rejected') {
    const first = all[0];
    const what =
      first === undefined
        ? 'nothing'
        : first.type === 'spectrum'
          ? `${first.spectrum.kind} spectrum ${first.spectrum.wavelengthNm[0]?.toFixed(0) ?? ''}–${first.spectrum.wavelengthNm[first.spectrum.wavelengthNm.length - 1]?.toFixed(0) ?? ''} nm`
          : `decay of ${first.decay.timeNs.length} channels`;
    return { status: 'misread', summary: `misread: read as ${what}` };
  }
  const problems = checkParsed(all, entry.expect);
  return problems.length === 0
    ? { status: 'read', summary: 'read' }
    : { status: 'misread', summary: `misread: ${problems.join('; ')}` };
}
