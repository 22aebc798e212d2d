// Photophysical processes, whether each is radiative, and their usual time scales (plausibility checks only).

/** Processes of a Jablonski scheme. */
export const PROCESS_KINDS = [
  'absorption',
  'internal-conversion',
  'vibrational-relaxation',
  'intersystem-crossing',
  'fluorescence',
  'phosphorescence',
  'nonradiative-decay',
] as const;
export type ProcessKind = (typeof PROCESS_KINDS)[number];

export interface ProcessTimeScale {
  readonly radiative: boolean;
  /** Usual time range in s, [shortest, longest]; undefined when the trade tables give none. */
  readonly timeRangeS: readonly [number, number] | undefined;
}

/** Time scales from the field's standard Jablonski tables (REFERENCES.md, "Trade time scales"; practice). */
export const PROCESS_TIME_SCALES: Readonly<Record<ProcessKind, ProcessTimeScale>> = Object.freeze({
  absorption: { radiative: true, timeRangeS: [1e-16, 1e-14] },
  'internal-conversion': { radiative: false, timeRangeS: [1e-14, 1e-11] },
  'vibrational-relaxation': { radiative: false, timeRangeS: [1e-12, 1e-10] },
  'intersystem-crossing': { radiative: false, timeRangeS: [1e-10, 1e-8] },
  fluorescence: { radiative: true, timeRangeS: [1e-10, 1e-7] },
  phosphorescence: { radiative: true, timeRangeS: [1e-4, 1e2] },
  'nonradiative-decay': { radiative: false, timeRangeS: undefined },
});

/**
 * Usual times of the two non-radiative processes that end in the ground state. The trade tables above
 * describe S_n→S1 internal conversion (Kasha's rule) and S1→T1 crossing; S1→S0 internal conversion
 * competes with fluorescence and T1→S0 crossing with phosphorescence, so their times span those
 * processes' ranges, widened to the ps–µs and 100 ns–100 s seen in practice (practice; Turro, Modern
 * Molecular Photochemistry, ch. 5, from memory).
 */
export const TO_GROUND_STATE_TIME_SCALES: Readonly<Partial<Record<ProcessKind, readonly [number, number]>>> =
  Object.freeze({
    'internal-conversion': [1e-12, 1e-6],
    'intersystem-crossing': [1e-7, 1e2],
  });

/** Warnings when a time (ns) assigned to a process lies outside its usual time scale (REFERENCES.md trade time scales; to-ground ranges above, practice). */
export function timeScalePlausibility(process: ProcessKind, timeNs: number, endsInGroundState = false): string[] {
  const toGroundRange = endsInGroundState ? TO_GROUND_STATE_TIME_SCALES[process] : undefined;
  const range = toGroundRange ?? PROCESS_TIME_SCALES[process].timeRangeS;
  if (range === undefined) return [];
  const timeS = timeNs * 1e-9;
  if (timeS < range[0] || timeS > range[1]) {
    return [
      `a ${process}${toGroundRange === undefined ? '' : ' (to the ground state)'} time of ${timeNs} ns lies outside the usual ${range[0]}–${range[1]} s for this process; ` +
        'check the assignment (e.g. a scattered-light or phosphorescence component)',
    ];
  }
  return [];
}
