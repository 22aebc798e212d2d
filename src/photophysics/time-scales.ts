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

/** Warnings when a time (ns) assigned to a process lies outside its usual time scale (REFERENCES.md trade time scales). */
export function timeScalePlausibility(process: ProcessKind, timeNs: number): string[] {
  const range = PROCESS_TIME_SCALES[process].timeRangeS;
  if (range === undefined) return [];
  const timeS = timeNs * 1e-9;
  if (timeS < range[0] || timeS > range[1]) {
    return [
      `a ${process} time of ${timeNs} ns lies outside the usual ${range[0]}–${range[1]} s for this process; ` +
        'check the assignment (e.g. a scattered-light or phosphorescence component)',
    ];
  }
  return [];
}
