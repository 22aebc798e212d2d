// Fits a fixed number of exponentials to one or more prepared decays: builds the parameter layout
// (fixed values, bounds, links shared across decays), automatic start values with several lifetime
// spreads (multi-start), and keeps the converged run with the lowest objective.
import { ConfigInvalid } from '../model/errors.js';
import type { DatasetModel } from './dataset-model.js';
import { FitProblem, type DatasetTerm } from './fit-problem.js';
import { minimiseLevenbergMarquardt, type MinimiserOutcome } from './levenberg-marquardt.js';
import type { ResolvedFitDecayOptions } from './options.js';
import { localParameterCount, localSlotOf, parameterNameOf, type ParameterName } from './parameters.js';
import type { PreparedDecay } from './prepare-decay.js';
import { createReconvolutionModel } from './reconvolution-model.js';
import {
  estimateBackground,
  estimateMomentLifetimeNs,
  estimateTailLifetimeNs,
  LIFETIME_SPREADS,
  linearSolveScratch,
  solveLinearParameters,
  type LinearSolveScratch,
} from './start-values.js';
import { createTailModel } from './tail-model.js';
import { estimatePeeledLifetimesNs } from './peeling.js';
import { PERIODIC_BACKGROUND_DEGENERACY_RATIO } from './earlier-pulses.js';
import { itemAt } from '../model/item-at.js';

export interface ParameterLayout {
  /** Label of each free parameter ('tau1Ns', or 'decay2.photons1' in a global fit). */
  readonly labels: readonly string[];
  readonly lower: Float64Array;
  readonly upper: Float64Array;
  readonly terms: readonly DatasetTerm[];
}

export interface ComponentFit {
  readonly components: number;
  readonly problem: FitProblem;
  readonly layout: ParameterLayout;
  readonly outcome: MinimiserOutcome;
  /** Number of starts tried. */
  readonly starts: number;
  /** Warnings about how the fit was obtained (e.g. the background kept ≥ 0 after a failed refit below 0). */
  readonly warnings: readonly string[];
}

/** Builds the model of one prepared decay on its range (reconvolution with an IRF, else tail). */
export function datasetModelFor(prepared: PreparedDecay, components: number): DatasetModel {
  const { firstChannel, endChannel } = prepared.range;
  if (prepared.irfUnit !== undefined) {
    return createReconvolutionModel({
      irfUnit: prepared.irfUnit,
      channelWidthNs: prepared.channelWidthNs,
      periodNs: prepared.periodNs,
      firstChannel,
      endChannel,
      components,
      irfWithinChannel: prepared.irfWithinChannel,
    });
  }
  return createTailModel({
    timeNs: prepared.timeNs,
    channelWidthNs: prepared.channelWidthNs,
    periodNs: prepared.periodNs,
    firstChannel,
    endChannel,
    components,
  });
}

/** Default bounds of one local slot (see FitDecayOptions.bounds); relaxBackground may lower the background's afterwards. */
function defaultBounds(slot: number, components: number, prepared: PreparedDecay): [number, number] {
  const windowNs = prepared.counts.length * prepared.channelWidthNs;
  if (slot < components) return [prepared.channelWidthNs / 50, 1000 * windowNs];
  if (slot === 2 * components) {
    const limit = Math.max(10 * prepared.channelWidthNs, 2 * (prepared.irfFwhmNs ?? 0));
    return [-limit, limit];
  }
  return [0, Number.POSITIVE_INFINITY];
}

/** Builds the free-parameter layout for `components` exponentials over `decays` (shared names = links). */
export function buildLayout(
  decays: readonly PreparedDecay[],
  models: readonly DatasetModel[],
  components: number,
  options: ResolvedFitDecayOptions,
  shared: readonly ParameterName[],
  strictNames: boolean,
): ParameterLayout {
  const slots = localParameterCount(components);
  const labels: string[] = [];
  const lower: number[] = [];
  const upper: number[] = [];
  const sharedIndex = new Map<number, number>();
  const fixedSlots = new Map<number, number>();
  for (const [name, value] of Object.entries(options.fixed) as [ParameterName, number][]) {
    const slot = localSlotOf(name, components);
    if (slot < 0) {
      if (strictNames)
        throw new ConfigInvalid(`fixed.${name} names a component the ${components}-component model does not have`, {
          configPath: `fixed.${name}`,
        });
      continue;
    }
    fixedSlots.set(slot, value);
  }
  const terms: DatasetTerm[] = decays.map((prepared, d) => {
    const freeIndex = new Int32Array(slots).fill(-1);
    const fixedValues = new Float64Array(slots);
    for (let slot = 0; slot < slots; slot++) {
      const name = parameterNameOf(slot, components);
      const fixedValue = fixedSlots.get(slot);
      const structurallyFixed =
        (prepared.irfUnit === undefined && (name === 'shiftNs' || name === 'scatterCounts')) ||
        (name === 'scatterCounts' && !options.scatter);
      if (fixedValue !== undefined || structurallyFixed) {
        fixedValues[slot] = fixedValue ?? 0;
        continue;
      }
      const isShared = decays.length > 1 && shared.includes(name);
      const existing = isShared ? sharedIndex.get(slot) : undefined;
      if (existing !== undefined) {
        freeIndex[slot] = existing;
        continue;
      }
      const [low, high] = options.bounds[name] ?? defaultBounds(slot, components, prepared);
      freeIndex[slot] = labels.length;
      if (isShared) sharedIndex.set(slot, labels.length);
      labels.push(decays.length > 1 && !isShared ? `decay${d + 1}.${name}` : name);
      lower.push(low);
      upper.push(high);
    }
    return {
      model: itemAt(models, d),
      counts: prepared.counts.subarray(prepared.range.firstChannel, prepared.range.endChannel),
      freeIndex,
      fixedValues,
      backgroundSlot: localSlotOf('backgroundPerChannel', components),
    };
  });
  return { labels, lower: Float64Array.from(lower), upper: Float64Array.from(upper), terms };
}

/** Start vector for one lifetime spread: tail lifetime × spread, shift 0, component photons and background by linear LS. */
function startVector(
  decays: readonly PreparedDecay[],
  layout: ParameterLayout,
  components: number,
  lifetimesNs: readonly number[],
  scratch: readonly LinearSolveScratch[],
): Float64Array {
  const start = new Float64Array(layout.labels.length);
  for (let d = 0; d < decays.length; d++) {
    const term = itemAt(layout.terms, d);
    const local = Float64Array.from(term.fixedValues);
    for (let i = 0; i < components; i++)
      if (itemAt(term.freeIndex, i) >= 0) local[i] = lifetimesNs[i] ?? lifetimesNs[0] ?? 1;
    const linearSlots: number[] = [];
    for (let i = 0; i < components; i++)
      if (itemAt(term.freeIndex, components + i) >= 0) linearSlots.push(components + i);
    const backgroundSlot = 2 * components + 1;
    if (itemAt(term.freeIndex, backgroundSlot) >= 0) linearSlots.push(backgroundSlot);
    if (
      linearSlots.length > 0 &&
      !solveLinearParameters(term.model, term.counts, local, linearSlots, itemAt(scratch, d), backgroundSlot)
    ) {
      for (const slot of linearSlots) local[slot] = slot === backgroundSlot ? 0 : 1;
    }
    for (let slot = 0; slot < local.length; slot++) {
      const free = itemAt(term.freeIndex, slot);
      if (free >= 0) start[free] = itemAt(local, slot);
    }
  }
  for (let i = 0; i < start.length; i++) {
    start[i] = Math.min(Math.max(itemAt(start, i), itemAt(layout.lower, i)), itemAt(layout.upper, i));
  }
  return start;
}

/**
 * Geometric mean over decays of the lifetime start (ns): the tail log-slope, or the first-moment estimate
 * when that is shorter (a decay faster than the IRF falls with the IRF's edge, not with τ).
 */
export function baseLifetimeNs(decays: readonly PreparedDecay[]): number {
  let logSum = 0;
  for (const prepared of decays) {
    const { firstChannel, endChannel } = prepared.range;
    const background = estimateBackground(prepared.counts, prepared.irfRiseChannel);
    let tauNs = estimateTailLifetimeNs(
      prepared.timeNs,
      prepared.counts,
      background,
      firstChannel,
      endChannel,
      prepared.channelWidthNs,
    );
    if (prepared.irfUnit !== undefined) {
      const momentNs = estimateMomentLifetimeNs(
        prepared.timeNs,
        prepared.counts,
        prepared.irfUnit,
        background,
        firstChannel,
        endChannel,
      );
      if (momentNs !== undefined && momentNs < tauNs) tauNs = Math.max(momentNs, prepared.channelWidthNs / 20);
    }
    logSum += Math.log(tauNs);
  }
  return Math.exp(logSum / decays.length);
}

/** Peeled [short, long] lifetimes (ns), geometric mean over decays, when every decay shows two slopes. */
function peeledLifetimesNs(decays: readonly PreparedDecay[]): number[] | undefined {
  let logShort = 0;
  let logLong = 0;
  for (const prepared of decays) {
    const background = estimateBackground(prepared.counts, prepared.irfRiseChannel);
    const pair = estimatePeeledLifetimesNs(
      prepared.timeNs,
      prepared.counts,
      background,
      prepared.range.firstChannel,
      prepared.range.endChannel,
    );
    if (pair === undefined) return undefined;
    logShort += Math.log(pair[0]);
    logLong += Math.log(pair[1]);
  }
  return [Math.exp(logShort / decays.length), Math.exp(logLong / decays.length)];
}

/**
 * The fit problem, its layout and a lazy source of start vectors (free parameters): the peeled lifetimes
 * first when the data show two slopes, then the lifetime spreads ranked by the objective at the start
 * (computed only when asked for). At most options.multiStart starts (one for a single exponential).
 */
export function startSource(
  decays: readonly PreparedDecay[],
  components: number,
  options: ResolvedFitDecayOptions,
  shared: readonly ParameterName[],
  strictNames: boolean,
): { problem: FitProblem; layout: ParameterLayout; nextStart: () => Float64Array | undefined } {
  const models = decays.map((prepared) => datasetModelFor(prepared, components));
  const layout = buildLayout(decays, models, components, options, shared, strictNames);
  const problem = new FitProblem(layout.terms, options.estimator, layout.labels.length);
  const baseTauNs = baseLifetimeNs(decays);
  const spreads = (LIFETIME_SPREADS[components] ?? [[1]]).map((spread) => spread.map((factor) => factor * baseTauNs));
  const peeled = components === 2 ? peeledLifetimesNs(decays) : undefined;
  const limit = components === 1 ? 1 : Math.min(options.multiStart, spreads.length + (peeled === undefined ? 0 : 1));
  const scratch = layout.terms.map((term) => linearSolveScratch(term.model, localParameterCount(components)));
  let given = 0;
  let ranked: Float64Array[] | undefined;
  const nextStart = (): Float64Array | undefined => {
    if (given >= limit) return undefined;
    given++;
    if (given === 1 && peeled !== undefined) return startVector(decays, layout, components, peeled, scratch);
    if (ranked === undefined) {
      const normal = new Float64Array(layout.labels.length ** 2);
      const gradient = new Float64Array(layout.labels.length);
      ranked = spreads
        .map((lifetimesNs) => {
          const start = startVector(decays, layout, components, lifetimesNs, scratch);
          const objective = problem.evaluate(start, false, normal, gradient);
          return { start, objective: Number.isFinite(objective) ? objective : Number.POSITIVE_INFINITY };
        })
        .sort((a, b) => a.objective - b.objective)
        .map((candidate) => candidate.start);
    }
    return ranked.shift();
  };
  return { problem, layout, nextStart };
}

/**
 * Fits `components` exponentials from the starts of startSource, trying the next start while the kept fit
 * is not clean (see isClean); the lowest objective wins.
 */
export function fitComponents(
  decays: readonly PreparedDecay[],
  components: number,
  options: ResolvedFitDecayOptions,
  shared: readonly ParameterName[],
  strictNames: boolean,
): ComponentFit {
  const { problem, layout, nextStart } = startSource(decays, components, options, shared, strictNames);
  const smallestWidthNs = Math.min(...decays.map((prepared) => prepared.channelWidthNs));
  let best: MinimiserOutcome | undefined;
  let tried = 0;
  for (let candidate = nextStart(); candidate !== undefined; candidate = nextStart()) {
    const outcome = settleShiftKink(
      problem,
      layout,
      minimiseLevenbergMarquardt(problem, candidate, layout.lower, layout.upper, options.maxIterations),
      options.maxIterations,
      smallestWidthNs,
    );
    tried++;
    if (best === undefined || isBetter(outcome, best)) best = outcome;
    if (isClean(best, layout)) break;
  }
  if (best === undefined) throw new ConfigInvalid('no start values', { configPath: 'multiStart' });
  return relaxBackground(decays, components, options, {
    components,
    problem,
    layout,
    outcome: best,
    starts: tried,
    warnings: [],
  });
}

/**
 * Issue 17.1: with earlier pulses modelled and τ long against the period (> PERIODIC_BACKGROUND_DEGENERACY_RATIO
 * × T), the bound b ≥ 0 censors the τ–background trade-off and biases τ low (20 ns at 80 MHz: −6.4 %, −8 SE).
 * Such a fit is refitted from its optimum with the background unbounded below — the Poisson likelihood needs only
 * a positive model (fit-problem.ts, POSITIVITY_FLOOR_COUNTS) — and the refit is kept when it converges no worse.
 * Only there: with short τ and few counts the uncensored optimum often lies on the positivity limit (an empty
 * channel at m → 0), where the fit stalls (1.5 ns, 3000 photons, b = 0: 26 of 100 did not converge), so
 * ordinary fits keep b ≥ 0. Not when the caller gave the background bounds. A failed refit keeps b ≥ 0 and warns.
 */
function relaxBackground(
  decays: readonly PreparedDecay[],
  components: number,
  options: ResolvedFitDecayOptions,
  fit: ComponentFit,
): ComponentFit {
  if (options.bounds.backgroundPerChannel !== undefined || !fit.outcome.converged) return fit;
  const { layout, problem, outcome } = fit;
  const lower = Float64Array.from(layout.lower);
  let relaxed = 0;
  decays.forEach((prepared, d) => {
    const term = layout.terms[d];
    if (term === undefined || prepared.periodNs === undefined) return;
    const free = term.freeIndex[localSlotOf('backgroundPerChannel', components)] ?? -1;
    if (free < 0) return;
    let longestNs = 0;
    for (let i = 0; i < components; i++) {
      const index = term.freeIndex[i] ?? -1;
      longestNs = Math.max(longestNs, index >= 0 ? (outcome.parameters[index] ?? 0) : (term.fixedValues[i] ?? 0));
    }
    if (longestNs <= PERIODIC_BACKGROUND_DEGENERACY_RATIO * prepared.periodNs) return;
    lower[free] = Number.NEGATIVE_INFINITY;
    relaxed++;
  });
  if (relaxed === 0) return fit;
  const relaxedLayout: ParameterLayout = { ...layout, lower };
  const smallestWidthNs = Math.min(...decays.map((prepared) => prepared.channelWidthNs));
  const refit = settleShiftKink(
    problem,
    relaxedLayout,
    minimiseLevenbergMarquardt(problem, outcome.parameters, lower, layout.upper, options.maxIterations),
    options.maxIterations,
    smallestWidthNs,
  );
  if (refit.converged && refit.objective <= outcome.objective + 1e-9) {
    return { ...fit, layout: relaxedLayout, outcome: { ...refit, iterations: outcome.iterations + refit.iterations } };
  }
  return {
    ...fit,
    warnings: [
      `the refit with the background allowed below 0 did not converge (${refit.reason}); the background is held ≥ 0, which biases a long τ low (docs/decay.md, Periodic excitation)`,
    ],
  };
}

/**
 * The linearly interpolated IRF makes the objective piecewise smooth in the shift, with kinks at whole-
 * channel shifts; when the optimum sits on a kink, LM crawls or stalls on one-sided derivatives. A fit that
 * did not converge with every shift within 0.02 channel of a whole channel is re-run with the shifts
 * snapped to those channels and held; it counts as converged only when that converges and moving each
 * shift by ±1e-3 channel raises the objective (a kink minimum). Otherwise the original status stands.
 */
function settleShiftKink(
  problem: FitProblem,
  layout: ParameterLayout,
  outcome: MinimiserOutcome,
  maxIterations: number,
  channelWidthNs: number,
): MinimiserOutcome {
  if (outcome.converged || !Number.isFinite(outcome.objective)) return outcome;
  const shiftIndices = layout.labels.flatMap((label, index) =>
    label.endsWith('shiftNs') && layout.lower[index] !== layout.upper[index] ? [index] : [],
  );
  if (shiftIndices.length === 0) return outcome;
  const lower = Float64Array.from(layout.lower);
  const upper = Float64Array.from(layout.upper);
  const start = Float64Array.from(outcome.parameters);
  for (const index of shiftIndices) {
    const channels = itemAt(outcome.parameters, index) / channelWidthNs;
    const whole = Math.round(channels);
    if (Math.abs(channels - whole) > 0.02) return outcome;
    start[index] = whole * channelWidthNs;
    lower[index] = start[index];
    upper[index] = start[index];
  }
  const held = minimiseLevenbergMarquardt(problem, start, lower, upper, maxIterations);
  if (!held.converged || held.objective > outcome.objective + 1e-6) return outcome;
  const normal = new Float64Array(layout.labels.length ** 2);
  const gradient = new Float64Array(layout.labels.length);
  const probe = Float64Array.from(held.parameters);
  for (const index of shiftIndices) {
    for (const direction of [-1, 1]) {
      probe[index] = itemAt(held.parameters, index) + direction * 1e-3 * channelWidthNs;
      if (problem.evaluate(probe, false, normal, gradient) < held.objective) return outcome;
    }
    probe[index] = itemAt(held.parameters, index);
  }
  return {
    ...held,
    iterations: outcome.iterations + held.iterations,
    reason: `converged with the shift on a whole channel (kink of the linearly interpolated IRF); ${held.reason}`,
  };
}

/** A fit needs no further start when it converged, no component has zero photons and no two lifetimes coincide (within 2 %). */
function isClean(outcome: MinimiserOutcome, layout: ParameterLayout): boolean {
  if (!outcome.converged) return false;
  const lifetimes: number[] = [];
  for (let i = 0; i < layout.labels.length; i++) {
    const label = layout.labels[i] ?? '';
    const value = itemAt(outcome.parameters, i);
    if (/photons\d$/.test(label) && value <= itemAt(layout.lower, i)) return false;
    if (/tau\dNs$/.test(label)) lifetimes.push(value);
  }
  lifetimes.sort((a, b) => a - b);
  for (let i = 1; i < lifetimes.length; i++) if (itemAt(lifetimes, i) < 1.02 * itemAt(lifetimes, i - 1)) return false;
  return true;
}

function isBetter(candidate: MinimiserOutcome, incumbent: MinimiserOutcome): boolean {
  if (!Number.isFinite(incumbent.objective)) return Number.isFinite(candidate.objective);
  return candidate.objective < incumbent.objective - 1e-9;
}
