// The reconvolution model's analytic Jacobian (single-pass component, and the two-pass path used with
// earlier pulses) against central finite differences of its own values, the value-only and derivative
// paths against each other, and the reuse of the shifted IRF against a fresh model.
import { describe, expect, it } from 'vitest';
import { gaussianIrf } from '../../../src/decay/index.js';
import { createReconvolutionModel } from '../../../src/decay/reconvolution-model.js';

const channels = 256;
const widthNs = 0.1;
const irfCounts = gaussianIrf(channels, widthNs, 3, 0.25);
let irfSum = 0;
for (const value of irfCounts) irfSum += value;
const irfUnit = Float64Array.from(irfCounts, (value) => value / irfSum);
const firstChannel = 20;
const endChannel = 240;
const channelCount = endChannel - firstChannel;
const slots = 7; // τ1, τ2, p1, p2, shift, background, scatter
// Shift 0.37 channel: away from the whole-channel kinks of the linear interpolation.
const local = Float64Array.from([0.6, 3.2, 4000, 9000, 0.037, 1.5, 250]);

function modelFor(periodNs: number | undefined) {
  return createReconvolutionModel({
    irfUnit,
    channelWidthNs: widthNs,
    periodNs,
    firstChannel,
    endChannel,
    components: 2,
  });
}

function valuesAt(periodNs: number | undefined, parameters: Float64Array): Float64Array {
  const values = new Float64Array(channelCount);
  modelFor(periodNs).evaluate(parameters, false, values, new Float64Array(slots * channelCount));
  return values;
}

describe.each([
  ['single pulse', undefined],
  ['earlier pulses (period 30 ns over a 25.6 ns histogram)', 30],
])('reconvolution model, %s', (_name, periodNs) => {
  it('has the Jacobian of central finite differences for every parameter', () => {
    const values = new Float64Array(channelCount);
    const jacobian = new Float64Array(slots * channelCount);
    modelFor(periodNs).evaluate(local, true, values, jacobian);
    for (let slot = 0; slot < slots; slot++) {
      const step = 1e-6 * Math.max(Math.abs(local[slot] as number), 0.01);
      const plus = Float64Array.from(local);
      const minus = Float64Array.from(local);
      plus[slot] = (local[slot] as number) + step;
      minus[slot] = (local[slot] as number) - step;
      const up = valuesAt(periodNs, plus);
      const down = valuesAt(periodNs, minus);
      let largest = 0;
      for (let k = 0; k < channelCount; k++)
        largest = Math.max(largest, Math.abs(jacobian[slot * channelCount + k] as number));
      for (let k = 0; k < channelCount; k++) {
        const numeric = ((up[k] as number) - (down[k] as number)) / (2 * step);
        // Central differences are O(step²) accurate; 1e-6 of the column's scale leaves room for rounding.
        expect(Math.abs((jacobian[slot * channelCount + k] as number) - numeric)).toBeLessThan(1e-6 * largest + 1e-9);
      }
    }
  });

  it('gives the same expected counts on the value-only and the derivative path, bit for bit', () => {
    const model = modelFor(periodNs);
    const withDerivatives = new Float64Array(channelCount);
    const valueOnly = new Float64Array(channelCount);
    const jacobian = new Float64Array(slots * channelCount);
    model.evaluate(local, true, withDerivatives, jacobian);
    model.evaluate(local, false, valueOnly, jacobian);
    expect(Array.from(valueOnly)).toEqual(Array.from(withDerivatives));
  });

  it('reuses the shifted IRF only while the shift is unchanged', () => {
    const model = modelFor(periodNs);
    const jacobian = new Float64Array(slots * channelCount);
    const scratch = new Float64Array(channelCount);
    const moved = Float64Array.from(local);
    moved[4] = -0.052;
    // Value-only at one shift, then derivatives at another, then derivatives back at the first.
    model.evaluate(local, false, scratch, jacobian);
    model.evaluate(moved, true, scratch, jacobian);
    const values = new Float64Array(channelCount);
    model.evaluate(local, true, values, jacobian);
    const freshValues = new Float64Array(channelCount);
    const freshJacobian = new Float64Array(slots * channelCount);
    modelFor(periodNs).evaluate(local, true, freshValues, freshJacobian);
    expect(Array.from(values)).toEqual(Array.from(freshValues));
    expect(Array.from(jacobian)).toEqual(Array.from(freshJacobian));
  });
});
