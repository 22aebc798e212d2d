// The normalized decay histogram (TCSPC or multichannel scaling): equally spaced time channels in ns,
// photon counts per channel, and optionally the instrument response (IRF) on the same channels.
import { InputRejected } from './errors.js';
import type { MeasurementRole } from './spectrum.js';
import { assertAllFinite, assertNonNegative, assertStrictlyAscending } from './invariants.js';
import { itemAt } from './item-at.js';

export interface DecayMetadata {
  /** Excitation wavelength in nm. */
  readonly excitationNm?: number;
  /** Emission (detection) wavelength in nm. */
  readonly emissionNm?: number;
  /** Laser or lamp repetition rate in Hz. */
  readonly repetitionRateHz?: number;
  /** Detected photon rate (count rate) in counts per second. */
  readonly countRatePerS?: number;
  /** Collection time in s. */
  readonly collectionTimeS?: number;
  /** Sample temperature in °C. */
  readonly temperatureC?: number;
  readonly solvent?: string;
  readonly sampleId?: string;
  readonly role?: MeasurementRole;
  /** Acquisition time as an ISO 8601 string, as written by the instrument. */
  readonly acquiredAt?: string;
  /** Every other header entry, verbatim (key → value). */
  readonly extra: Readonly<Record<string, string>>;
}

export interface Decay {
  /** Start time of each channel in ns, strictly ascending and equally spaced. */
  readonly timeNs: Float64Array;
  /** Photon counts per channel (finite, ≥ 0). */
  readonly counts: Float64Array;
  /** Channel width in ns. */
  readonly channelWidthNs: number;
  /** Instrument response counts on the same channels, when recorded with the decay. */
  readonly irfCounts?: Float64Array;
  readonly metadata: DecayMetadata;
}

export interface DecayInput {
  readonly timeNs: ArrayLike<number>;
  readonly counts: ArrayLike<number>;
  readonly channelWidthNs?: number;
  readonly irfCounts?: ArrayLike<number>;
  readonly metadata?: Partial<DecayMetadata>;
}

/** Relative tolerance on channel spacing before a time axis counts as non-uniform. */
const UNIFORM_TOLERANCE = 1e-3;

/** Builds a Decay and enforces its invariants (≥ 4 channels, finite non-negative counts, uniform ascending ns axis, equal lengths); throws InputRejected. */
export function createDecay(input: DecayInput): Decay {
  const timeNs = Float64Array.from(input.timeNs);
  const counts = Float64Array.from(input.counts);
  if (timeNs.length < 4) {
    throw new InputRejected('TOO_FEW_POINTS', `a decay needs at least 4 channels, got ${timeNs.length}`);
  }
  if (counts.length !== timeNs.length) {
    throw new InputRejected(
      'LENGTH_MISMATCH',
      `the counts column has ${counts.length} channels but the time axis has ${timeNs.length}`,
    );
  }
  assertAllFinite(timeNs, 'time axis');
  assertAllFinite(counts, 'counts');
  assertStrictlyAscending(timeNs, 'time axis');
  assertNonNegative(counts, 'counts');
  const spanNs = itemAt(timeNs, timeNs.length - 1) - itemAt(timeNs, 0);
  const meanWidthNs = spanNs / (timeNs.length - 1);
  for (let i = 1; i < timeNs.length; i++) {
    const widthNs = itemAt(timeNs, i) - itemAt(timeNs, i - 1);
    if (Math.abs(widthNs - meanWidthNs) > UNIFORM_TOLERANCE * meanWidthNs) {
      throw new InputRejected(
        'AXIS_NOT_UNIFORM',
        `channel ${i + 1} is ${widthNs} ns wide but the mean channel width is ${meanWidthNs} ns`,
      );
    }
  }
  const channelWidthNs = input.channelWidthNs ?? meanWidthNs;
  if (!(channelWidthNs > 0) || Math.abs(channelWidthNs - meanWidthNs) > UNIFORM_TOLERANCE * meanWidthNs) {
    throw new InputRejected(
      'METADATA_INVALID',
      `the stated channel width ${channelWidthNs} ns disagrees with the time axis (${meanWidthNs} ns per channel)`,
    );
  }
  let irfCounts: Float64Array | undefined;
  if (input.irfCounts !== undefined) {
    irfCounts = Float64Array.from(input.irfCounts);
    if (irfCounts.length !== timeNs.length) {
      throw new InputRejected(
        'LENGTH_MISMATCH',
        `the IRF column has ${irfCounts.length} channels but the time axis has ${timeNs.length}`,
      );
    }
    assertAllFinite(irfCounts, 'IRF counts');
    assertNonNegative(irfCounts, 'IRF counts');
  }
  return Object.freeze({
    timeNs,
    counts,
    channelWidthNs,
    ...(irfCounts === undefined ? {} : { irfCounts }),
    metadata: Object.freeze({ ...input.metadata, extra: Object.freeze({ ...(input.metadata?.extra ?? {}) }) }),
  });
}

/** Total photon count of a histogram (sum over channels). */
export function totalCounts(counts: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < counts.length; i++) sum += itemAt(counts, i);
  return sum;
}
