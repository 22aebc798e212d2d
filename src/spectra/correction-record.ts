// What every spectral correction records about itself (name, input hashes, parameters, warnings),
// so a result's ordered `corrections` list can be replayed and audited.
import { createHash } from 'node:crypto';
import type { Spectrum } from '../model/spectrum.js';

export interface CorrectionRecord {
  /** Name of the correction function, e.g. 'subtractBlank'. */
  name: string;
  /** Role of each input spectrum (e.g. 'blank') → sha256 of its data (see hashSpectrumData). */
  inputs: Record<string, string>;
  /** Every parameter the correction used, after defaults, with units in the key names. */
  parameters: Record<string, number | string | boolean>;
  /** Conditions the user should know about; the correction still ran. */
  warnings: string[];
}

/** A corrected spectrum and the record of the correction that produced it. */
export interface CorrectionResult {
  readonly spectrum: Spectrum;
  readonly record: CorrectionRecord;
}

function updateWithArray(hash: ReturnType<typeof createHash>, label: string, values: Float64Array): void {
  hash.update(`${label}:${values.length};`);
  hash.update(new Uint8Array(values.buffer, values.byteOffset, values.byteLength));
}

/** sha256 (hex) over a spectrum's arrays: wavelength axis (nm), values, then other columns by sorted name; metadata excluded. */
export function hashSpectrumData(spectrum: Spectrum): string {
  const hash = createHash('sha256');
  updateWithArray(hash, 'wavelengthNm', spectrum.wavelengthNm);
  updateWithArray(hash, 'values', spectrum.values);
  for (const name of Object.keys(spectrum.otherColumns).sort()) {
    const column = spectrum.otherColumns[name];
    if (column !== undefined) updateWithArray(hash, `column:${name}`, column);
  }
  return hash.digest('hex');
}

/** Builds a frozen CorrectionRecord; `inputs` maps each role to its spectrum, hashed here. */
export function makeCorrectionRecord(
  name: string,
  inputs: Readonly<Record<string, Spectrum>>,
  parameters: Readonly<Record<string, number | string | boolean | undefined>>,
  warnings: readonly string[],
): CorrectionRecord {
  const hashed: Record<string, string> = {};
  for (const [role, spectrum] of Object.entries(inputs)) hashed[role] = hashSpectrumData(spectrum);
  const kept: Record<string, number | string | boolean> = {};
  for (const [key, value] of Object.entries(parameters)) if (value !== undefined) kept[key] = value;
  return Object.freeze({
    name,
    inputs: Object.freeze(hashed),
    parameters: Object.freeze(kept),
    warnings: Object.freeze([...warnings]) as string[],
  });
}
