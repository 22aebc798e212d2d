// Excited-state rate constants from yield and lifetime, yields from rate constants, and rates from time scales.
import { AnalysisFailed, InputRejected } from '../model/errors.js';

export interface RateConstants {
  /** Radiative rate constant k_r = Φ/τ, s⁻¹. */
  readonly krPerS: number;
  /** Non-radiative rate constant k_nr = (1 − Φ)/τ, s⁻¹. */
  readonly knrPerS: number;
  /** Radiative (natural) lifetime τ0 = 1/k_r = τ/Φ, ns. */
  readonly tau0Ns: number;
  /** Total decay rate 1/τ, s⁻¹. */
  readonly totalDecayRatePerS: number;
  /** Standard uncertainties (first-order propagation), present when u(Φ) or u(τ) was given. */
  readonly krStandardUncertaintyPerS?: number;
  readonly knrStandardUncertaintyPerS?: number;
  readonly tau0StandardUncertaintyNs?: number;
}

/** k_r = Φ/τ, k_nr = (1 − Φ)/τ, τ0 = τ/Φ, 1/τ (Birks, J. Res. NBS 80A, 389 (1976)); τ in ns, rates in s⁻¹; u by first-order propagation. */
export function rateConstantsFromYield(input: {
  readonly quantumYield: number;
  readonly tauNs: number;
  readonly quantumYieldUncertainty?: number;
  readonly tauUncertaintyNs?: number;
}): RateConstants {
  const { quantumYield, tauNs } = input;
  if (!(tauNs > 0) || !Number.isFinite(tauNs))
    throw new InputRejected('INPUT_INVALID', `the lifetime ${tauNs} ns must be positive and finite`);
  if (!(quantumYield > 0))
    throw new InputRejected(
      'INPUT_INVALID',
      `the quantum yield ${quantumYield} must be positive for a radiative lifetime`,
    );
  if (quantumYield > 1)
    throw new AnalysisFailed('OUT_OF_RANGE', `the quantum yield ${quantumYield} exceeds 1; k_nr would be negative`);
  const tauS = tauNs * 1e-9;
  const krPerS = quantumYield / tauS;
  const knrPerS = (1 - quantumYield) / tauS;
  const result: RateConstants = { krPerS, knrPerS, tau0Ns: tauNs / quantumYield, totalDecayRatePerS: 1 / tauS };
  if (input.quantumYieldUncertainty === undefined && input.tauUncertaintyNs === undefined) return Object.freeze(result);
  const uPhi = input.quantumYieldUncertainty ?? 0;
  const relTau = (input.tauUncertaintyNs ?? 0) / tauNs;
  return Object.freeze({
    ...result,
    krStandardUncertaintyPerS: Math.hypot(uPhi / tauS, krPerS * relTau),
    knrStandardUncertaintyPerS: Math.hypot(uPhi / tauS, knrPerS * relTau),
    tau0StandardUncertaintyNs: (tauNs / quantumYield) * Math.hypot(uPhi / quantumYield, relTau),
  });
}

/** Φ_i = k_i/Σk and decay time 1/Σk (ns) for first-order processes depopulating one state (textbook kinetics; practice). */
export function yieldsFromRateConstants(processes: readonly { readonly name: string; readonly ratePerS: number }[]): {
  readonly yields: readonly { readonly name: string; readonly quantumYield: number }[];
  readonly totalRatePerS: number;
  readonly decayTimeNs: number;
} {
  if (processes.length === 0) throw new InputRejected('INPUT_INVALID', 'at least one process is needed');
  for (const p of processes) {
    if (!(p.ratePerS >= 0) || !Number.isFinite(p.ratePerS))
      throw new InputRejected('INPUT_INVALID', `the rate of ${p.name} is ${p.ratePerS} s⁻¹; it must be finite and ≥ 0`);
  }
  const totalRatePerS = processes.reduce((sum, p) => sum + p.ratePerS, 0);
  if (!(totalRatePerS > 0)) throw new InputRejected('INPUT_INVALID', 'all rates are zero; the state does not decay');
  return Object.freeze({
    yields: Object.freeze(
      processes.map((p) => Object.freeze({ name: p.name, quantumYield: p.ratePerS / totalRatePerS })),
    ),
    totalRatePerS,
    decayTimeNs: 1e9 / totalRatePerS,
  });
}

/** Approximate first-order rate constant k ≈ 1/t (s⁻¹) for a time scale t in s (REFERENCES.md, trade time scales). */
export function rateFromTimeScale(timeScaleS: number): number {
  if (!(timeScaleS > 0) || !Number.isFinite(timeScaleS))
    throw new InputRejected('INPUT_INVALID', `the time scale ${timeScaleS} s must be positive`);
  return 1 / timeScaleS;
}
