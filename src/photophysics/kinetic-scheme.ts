// First-order kinetic scheme of excited states (S0, S1, S2, T1, …) solved exactly with the matrix
// exponential: populations over time, process yields, and fluorescence / phosphorescence decays.
import { AnalysisFailed, InputRejected } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';
import { expm } from './expm.js';
import { multiplyVector, solve, type SquareMatrix } from './matrix.js';
import { PROCESS_KINDS, PROCESS_TIME_SCALES, timeScalePlausibility, type ProcessKind } from './time-scales.js';

/** Default states: ground S0, excited singlets S1 and S2, triplet T1. */
export const DEFAULT_STATES = ['S0', 'S1', 'S2', 'T1'] as const;

export interface KineticProcess {
  /** Label for reports; default `${kind} from→to`. */
  readonly name?: string;
  readonly kind: ProcessKind;
  readonly from: string;
  readonly to: string;
  /** First-order rate constant, s⁻¹. */
  readonly ratePerS: number;
}

export interface KineticSchemeInput {
  /** State names; the first is the ground state (default S0, S1, S2, T1). */
  readonly states?: readonly string[];
  readonly processes: readonly KineticProcess[];
  /** Population right after a δ excitation pulse (sums to 1 excitation); default: split over the absorption processes' targets ∝ their rates. */
  readonly initialPopulation?: Readonly<Record<string, number>>;
  /** Times (s) at which populations and emission rates are reported. */
  readonly timesS: readonly number[];
}

export interface ProcessYield {
  readonly name: string;
  readonly kind: ProcessKind;
  readonly radiative: boolean;
  /** Fraction of initial excitations that go through this process, k·∫P_from dt. */
  readonly quantumYield: number;
}

export interface KineticSchemeResult {
  readonly states: readonly string[];
  readonly timesS: readonly number[];
  /** Population of each state at each time (fraction of one excitation). */
  readonly populations: Readonly<Record<string, Float64Array>>;
  readonly processYields: readonly ProcessYield[];
  readonly fluorescenceYield: number;
  readonly phosphorescenceYield: number;
  /** Photons per second per excitation from fluorescence processes at each time: Σ k_f·P_from(t). */
  readonly fluorescenceRatePerS: Float64Array;
  readonly phosphorescenceRatePerS: Float64Array;
  /** 1/Σk_out of each excited state, ns (its decay time when it is not fed by other states). */
  readonly stateLifetimesNs: Readonly<Record<string, number>>;
  readonly warnings: readonly string[];
}

function validate(input: KineticSchemeInput, states: readonly string[]): void {
  if (states.length < 2 || new Set(states).size !== states.length)
    throw new InputRejected('INPUT_INVALID', 'a scheme needs at least two distinct states');
  for (const p of input.processes) {
    if (!states.includes(p.from) || !states.includes(p.to))
      throw new InputRejected('INPUT_INVALID', `process ${p.kind} ${p.from}→${p.to} names an unknown state`);
    if (!PROCESS_KINDS.includes(p.kind)) throw new InputRejected('INPUT_INVALID', `unknown process kind "${p.kind}"`);
    if (!(p.ratePerS >= 0) || !Number.isFinite(p.ratePerS))
      throw new InputRejected('INPUT_INVALID', `the rate of ${p.kind} ${p.from}→${p.to} is ${p.ratePerS} s⁻¹`);
    if (p.from === p.to) throw new InputRejected('INPUT_INVALID', `process ${p.kind} starts and ends in ${p.from}`);
  }
  for (const t of input.timesS)
    if (!(t >= 0) || !Number.isFinite(t))
      throw new InputRejected('INPUT_INVALID', `time ${t} s must be finite and ≥ 0`);
}

function initialPopulation(input: KineticSchemeInput, states: readonly string[]): Float64Array {
  const p0 = new Float64Array(states.length);
  if (input.initialPopulation !== undefined) {
    for (const [state, value] of Object.entries(input.initialPopulation)) {
      const index = states.indexOf(state);
      if (index < 0 || !(value >= 0))
        throw new InputRejected('INPUT_INVALID', `initial population ${state} = ${value} is invalid`);
      p0[index] = value;
    }
    return p0;
  }
  const absorptions = input.processes.filter((p) => p.kind === 'absorption');
  const total = absorptions.reduce((sum, p) => sum + p.ratePerS, 0);
  if (!(total > 0))
    throw new InputRejected(
      'INPUT_INVALID',
      'give an initial population or at least one absorption process with a positive rate',
    );
  for (const p of absorptions) p0[states.indexOf(p.to)] = itemAt(p0, states.indexOf(p.to)) + p.ratePerS / total;
  return p0;
}

/** Rate matrix K (dP/dt = K·P) of the non-absorption processes: K[to][from] += k, K[from][from] −= k. */
export function rateMatrix(states: readonly string[], processes: readonly KineticProcess[]): SquareMatrix {
  const n = states.length;
  const data = new Float64Array(n * n);
  for (const p of processes) {
    if (p.kind === 'absorption') continue;
    const i = states.indexOf(p.from);
    const j = states.indexOf(p.to);
    data[j * n + i] = itemAt(data, j * n + i) + p.ratePerS;
    data[i * n + i] = itemAt(data, i * n + i) - p.ratePerS;
  }
  return { size: n, data };
}

/** Solves a first-order scheme after a δ pulse: P(t) = e^{Kt}·P0 (expm, Higham 2005); yields Φ_i = k_i·∫P_from dt with ∫P dt = −K_ex⁻¹P0 over excited states (practice). */
export function solveKineticScheme(input: KineticSchemeInput): KineticSchemeResult {
  const states = input.states ?? DEFAULT_STATES;
  validate(input, states);
  const warnings: string[] = [];
  const p0 = initialPopulation(input, states);
  const k = rateMatrix(states, input.processes);
  const n = states.length;
  const populations: Record<string, Float64Array> = {};
  for (const s of states) populations[s] = new Float64Array(input.timesS.length);
  input.timesS.forEach((t, ti) => {
    const pt = multiplyVector(expm({ size: n, data: k.data.map((v) => v * t) }), p0);
    states.forEach((s, si) => {
      const series = populations[s];
      if (series !== undefined) series[ti] = itemAt(pt, si);
    });
  });
  // Integrated populations over the excited states (all but the ground state, index 0).
  const excited = states.slice(1).map((_, i) => i + 1);
  const m = excited.length;
  const kExcited = new Float64Array(m * m);
  const rhs = new Float64Array(m * m);
  excited.forEach((si, a) => {
    excited.forEach((sj, c) => (kExcited[a * m + c] = -itemAt(k.data, si * n + sj)));
    rhs[a * m] = itemAt(p0, si);
  });
  const stateLifetimesNs: Record<string, number> = {};
  for (const si of excited) {
    const outRate = -itemAt(k.data, si * n + si);
    const name = itemAt(states, si);
    if (!(outRate > 0)) {
      if (itemAt(p0, si) > 0 || input.processes.some((p) => p.to === name && p.kind !== 'absorption')) {
        throw new AnalysisFailed(
          'OUT_OF_RANGE',
          `state ${name} is populated but has no decay process; yields would be infinite`,
        );
      }
      kExcited[(si - 1) * m + (si - 1)] = 1; // isolated, never populated: keep the system solvable
    }
    stateLifetimesNs[name] = outRate > 0 ? 1e9 / outRate : Number.POSITIVE_INFINITY;
  }
  const integral = solve({ size: m, data: kExcited }, { size: m, data: rhs });
  const integratedPopulationS = (state: string): number => {
    const si = states.indexOf(state);
    return si <= 0 ? 0 : itemAt(integral.data, (si - 1) * m);
  };
  const processYields: ProcessYield[] = input.processes
    .filter((p) => p.kind !== 'absorption')
    .map((p) => ({
      name: p.name ?? `${p.kind} ${p.from}→${p.to}`,
      kind: p.kind,
      radiative: PROCESS_TIME_SCALES[p.kind].radiative,
      quantumYield: p.ratePerS * integratedPopulationS(p.from),
    }));
  const sumYield = (kind: ProcessKind): number =>
    processYields.filter((y) => y.kind === kind).reduce((s, y) => s + y.quantumYield, 0);
  const emissionRate = (kind: ProcessKind): Float64Array =>
    Float64Array.from(input.timesS, (_, ti) =>
      input.processes
        .filter((p) => p.kind === kind)
        .reduce((s, p) => s + p.ratePerS * itemAt(populations[p.from] as Float64Array, ti), 0),
    );
  for (const p of input.processes) {
    if (p.kind !== 'absorption' && p.ratePerS > 0)
      warnings.push(...timeScalePlausibility(p.kind, 1e9 / p.ratePerS, p.to === states[0]));
  }
  return Object.freeze({
    states: [...states],
    timesS: [...input.timesS],
    populations: Object.freeze(populations),
    processYields: Object.freeze(processYields),
    fluorescenceYield: sumYield('fluorescence'),
    phosphorescenceYield: sumYield('phosphorescence'),
    fluorescenceRatePerS: emissionRate('fluorescence'),
    phosphorescenceRatePerS: emissionRate('phosphorescence'),
    stateLifetimesNs: Object.freeze(stateLifetimesNs),
    warnings: Object.freeze(warnings),
  });
}
