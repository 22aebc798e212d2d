// Names and order of the model parameters of one decay: lifetimes, component photons, IRF shift, background,
// scatter. Every fit works on a local vector in this order; fixing, bounds and links refer to the names.

export type ComponentIndex = 1 | 2 | 3 | 4;
export type LifetimeName = `tau${ComponentIndex}Ns`;
/** Photons of component i, pᵢ = aᵢτᵢ/Δ (amplitude × lifetime / channel width): the fitted linear parameter. */
export type PhotonsName = `photons${ComponentIndex}`;
/** Every fit parameter: lifetimes (ns), component photons (counts), shift (ns), background (counts per channel), scatter (counts). */
export type ParameterName = LifetimeName | PhotonsName | 'shiftNs' | 'backgroundPerChannel' | 'scatterCounts';

export const PARAMETER_NAMES: readonly ParameterName[] = [
  'tau1Ns',
  'tau2Ns',
  'tau3Ns',
  'tau4Ns',
  'photons1',
  'photons2',
  'photons3',
  'photons4',
  'shiftNs',
  'backgroundPerChannel',
  'scatterCounts',
];

/** Number of local parameters for `components` exponentials: c lifetimes, c photon counts, shift, background, scatter. */
export function localParameterCount(components: number): number {
  return 2 * components + 3;
}

/** Index of a named parameter in the local vector [τ1..τc, p1..pc, shift, background, scatter], or −1 if the model has no such parameter. */
export function localSlotOf(name: ParameterName, components: number): number {
  const lifetime = /^tau([1-4])Ns$/.exec(name);
  if (lifetime !== null) {
    const index = Number(lifetime[1]) - 1;
    return index < components ? index : -1;
  }
  const amplitude = /^photons([1-4])$/.exec(name);
  if (amplitude !== null) {
    const index = Number(amplitude[1]) - 1;
    return index < components ? components + index : -1;
  }
  if (name === 'shiftNs') return 2 * components;
  if (name === 'backgroundPerChannel') return 2 * components + 1;
  return 2 * components + 2;
}

/** Name of local slot `slot` for `components` exponentials (inverse of localSlotOf). */
export function parameterNameOf(slot: number, components: number): ParameterName {
  if (slot < components) return `tau${slot + 1}Ns` as LifetimeName;
  if (slot < 2 * components) return `photons${slot - components + 1}` as PhotonsName;
  if (slot === 2 * components) return 'shiftNs';
  if (slot === 2 * components + 1) return 'backgroundPerChannel';
  return 'scatterCounts';
}
