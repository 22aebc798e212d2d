// Phasor (polar-plot) coordinates of a decay histogram, a fit-free lifetime cross-check:
//   g = Σ n_k cos(ωt_k) / Σ n_k,  s = Σ n_k sin(ωt_k) / Σ n_k,  ω = 2π·h·f (harmonic h of frequency f),
// calibrated by dividing by the IRF phasor (complex division: rotate by −φ_IRF, scale by 1/M_IRF), so the
// instrument response and the channel integration cancel. For a single exponential g + is = 1/(1 + iωτ);
// phase and modulation lifetimes τφ = tan φ / ω and τm = √(1/M² − 1)/ω (textbook frequency-domain and
// phasor relations, e.g. Lakowicz, Principles of Fluorescence Spectroscopy, ch. 5; Digman et al.,
// Biophys. J. 94, L14 (2008)). Exact when the histogram spans one excitation period.
import { z } from 'zod';
import type { Decay } from '../model/decay.js';
import { ConfigInvalid, InputRejected } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';

export interface PhasorOptions {
  /** Harmonic of the base frequency (1 = fundamental). Default 1. */
  readonly harmonic?: number;
  /** Base frequency in Hz. Default: the repetition rate (options or metadata), else 1 / histogram span. */
  readonly frequencyHz?: number;
  /** IRF counts on the decay's channels; default decay.irfCounts. Without an IRF the phasor is uncalibrated. */
  readonly irfCounts?: ArrayLike<number>;
  /** Constant background subtracted from every channel before the transform (counts per channel). Default 0. */
  readonly backgroundPerChannel?: number;
}

export interface PhasorResult {
  readonly g: number;
  readonly s: number;
  /** Phase angle φ in rad. */
  readonly phaseRad: number;
  /** Modulation M = √(g² + s²). */
  readonly modulation: number;
  /** Phase lifetime tan φ / ω in ns. */
  readonly tauPhaseNs: number;
  /** Modulation lifetime √(1/M² − 1)/ω in ns (0 when M ≥ 1). */
  readonly tauModulationNs: number;
  readonly frequencyHz: number;
  readonly harmonic: number;
  /** True when divided by the IRF phasor. */
  readonly calibrated: boolean;
}

const phasorSchema = z
  .object({
    harmonic: z.number().int().min(1).default(1),
    frequencyHz: z.number().positive().optional(),
    irfCounts: z
      .custom<ArrayLike<number>>(
        (value) =>
          value instanceof Float64Array || (Array.isArray(value) && value.every((item) => typeof item === 'number')),
        { message: 'expected an array of numbers' },
      )
      .optional(),
    backgroundPerChannel: z.number().min(0).default(0),
  })
  .strict();

export type ResolvedPhasorOptions = Readonly<z.output<typeof phasorSchema>>;

/** Validates phasor options, fills defaults (harmonic 1, background 0) and freezes them; throws ConfigInvalid. */
export function resolvePhasorOptions(options: PhasorOptions | undefined): ResolvedPhasorOptions {
  const parsed = phasorSchema.safeParse(options ?? {});
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new ConfigInvalid(issue?.message ?? 'invalid phasor options', {
      configPath: `phasor.${issue?.path.join('.') ?? ''}`,
    });
  }
  return Object.freeze(parsed.data);
}

/** Raw (uncalibrated) phasor of counts at angular frequency ω (rad/ns) on channel centres; O(n). */
function rawPhasor(
  counts: ArrayLike<number>,
  timeNs: Float64Array,
  channelWidthNs: number,
  omegaPerNs: number,
  background: number,
): [number, number] {
  let total = 0;
  let cosine = 0;
  let sine = 0;
  for (let k = 0; k < counts.length; k++) {
    const value = itemAt(counts, k) - background;
    const angle = omegaPerNs * (itemAt(timeNs, k) + 0.5 * channelWidthNs);
    total += value;
    cosine += value * Math.cos(angle);
    sine += value * Math.sin(angle);
  }
  if (!(total > 0))
    throw new InputRejected('INPUT_INVALID', 'the phasor needs positive total counts after background subtraction');
  return [cosine / total, sine / total];
}

/** Phasor coordinates (g, s), phase and modulation lifetimes (ns) of a decay, IRF-calibrated when an IRF is available; O(n). */
export function phasorOf(decay: Decay, userOptions?: PhasorOptions): PhasorResult {
  const options = resolvePhasorOptions(userOptions);
  const harmonic = options.harmonic;
  const spanNs = decay.counts.length * decay.channelWidthNs;
  const frequencyHz = options.frequencyHz ?? decay.metadata.repetitionRateHz ?? 1e9 / spanNs;
  const omegaPerNs = (2 * Math.PI * harmonic * frequencyHz) / 1e9;
  let [g, s] = rawPhasor(decay.counts, decay.timeNs, decay.channelWidthNs, omegaPerNs, options.backgroundPerChannel);
  const irf = options.irfCounts ?? decay.irfCounts;
  if (irf !== undefined) {
    const [gIrf, sIrf] = rawPhasor(irf, decay.timeNs, decay.channelWidthNs, omegaPerNs, 0);
    const norm = gIrf * gIrf + sIrf * sIrf;
    const calibratedG = (g * gIrf + s * sIrf) / norm;
    const calibratedS = (s * gIrf - g * sIrf) / norm;
    g = calibratedG;
    s = calibratedS;
  }
  const modulation = Math.hypot(g, s);
  const phaseRad = Math.atan2(s, g);
  return {
    g,
    s,
    phaseRad,
    modulation,
    tauPhaseNs: Math.tan(phaseRad) / omegaPerNs,
    tauModulationNs: modulation < 1 ? Math.sqrt(1 / (modulation * modulation) - 1) / omegaPerNs : 0,
    frequencyHz,
    harmonic,
    calibrated: irf !== undefined,
  };
}
