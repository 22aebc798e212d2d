// Issue 15.7: an IRF recorded on its own time axis (another channel width, another start time) is put on
// the decay's channels by its axis, not paired channel by channel. Known truth: the channel integrals of a
// Gaussian IRF (src/decay/simulate.ts gaussianIrf, erf differences) are additive, so an IRF integrated on
// 25 ps channels and rebinned onto 50 ps channels must equal the same Gaussian integrated on 50 ps channels
// (to rounding); the lifetime fitted with it must match the simulation's truth.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, fitDecay, gaussianIrf, simulateDecay } from '../../../src/decay/index.js';
import { alignIrfToDecay } from '../../../src/decay/irf-axis.js';
import { InputRejected } from '../../../src/model/index.js';

const channels = 512;
const widthNs = 0.05;
const decayAxis = {
  timeNs: Float64Array.from({ length: channels }, (_unused, k) => k * widthNs),
  channelWidthNs: widthNs,
};
const centreNs = 2;
const fwhmNs = 0.25;

/** A Gaussian IRF integrated over channels of `width` starting at `startNs` (absolute centre `centreNs`). */
function irfOn(
  width: number,
  count: number,
  startNs: number,
): { timeNs: Float64Array; counts: Float64Array; channelWidthNs: number } {
  // gaussianIrf integrates from 0; shifting the centre by −startNs puts channel k at startNs + k·width.
  return {
    timeNs: Float64Array.from({ length: count }, (_unused, k) => startNs + k * width),
    counts: gaussianIrf(count, width, centreNs - startNs, fwhmNs),
    channelWidthNs: width,
  };
}

describe('IRF on its own time axis', () => {
  it("rebins a finer IRF (25 ps) onto the decay's 50 ps channels exactly (channel integrals add up)", () => {
    const fine = irfOn(0.025, 1024, 0);
    const aligned = alignIrfToDecay(fine, decayAxis);
    const truth = gaussianIrf(channels, widthNs, centreNs, fwhmNs);
    for (let k = 0; k < channels; k++) expect(aligned.counts[k]).toBeCloseTo(truth[k] as number, 12);
    expect(aligned.note).toMatch(/resampled from 0\.02500 ns/);
  });

  it('applies a time offset: an IRF whose axis starts 3.2 ns earlier (and a non-nesting 20 ps width) lands where its axis says', () => {
    const shifted = irfOn(0.02, 1500, -3.2);
    const aligned = alignIrfToDecay(shifted, decayAxis);
    const truth = gaussianIrf(channels, widthNs, centreNs, fwhmNs);
    // 20 ps channels straddle the 50 ps ones: within a straddled IRF channel the counts are split by time
    // (flat within the channel): 0.5 % of the peak here (IRF σ ≈ 5 IRF channels), below 1 %.
    let worst = 0;
    for (let k = 0; k < channels; k++)
      worst = Math.max(worst, Math.abs((aligned.counts[k] as number) - (truth[k] as number)));
    expect(worst / Math.max(...truth)).toBeLessThan(0.01);
    let sum = 0;
    for (const value of aligned.counts) sum += value;
    expect(sum).toBeCloseTo(1, 9);
    expect(aligned.note).toMatch(/own time axis/);
    // Same width, fractional offset of 0.3 channel: the IRF's content stays whole and its centroid moves by the offset.
    const same = irfOn(widthNs, channels, 0.015);
    const moved = alignIrfToDecay(same, decayAxis);
    const centroid = (values: ArrayLike<number>, startNs: number): number => {
      let sum = 0;
      let weighted = 0;
      for (let k = 0; k < values.length; k++) {
        sum += values[k] as number;
        weighted += (values[k] as number) * (startNs + (k + 0.5) * widthNs);
      }
      return weighted / sum;
    };
    expect(centroid(moved.counts, 0)).toBeCloseTo(centroid(same.counts, 0.015), 10);
  });

  it('recovers the lifetime with the aligned IRF where channel-by-channel pairing does not (truth 3.4 ns)', () => {
    const decay = simulateDecay(
      {
        channels,
        channelWidthNs: widthNs,
        tauNs: [3.4],
        photons: 2e5,
        irf: gaussianIrf(channels, widthNs, centreNs, fwhmNs),
        backgroundPerChannel: 2,
      },
      createSeededRandom(17),
    );
    const recorded = irfOn(0.025, 1200, -3);
    const aligned = alignIrfToDecay(recorded, decayAxis);
    const fit = fitDecay(decay, { irfCounts: aligned.counts, profileIntervals: false });
    const component = fit.components[0];
    expect(Math.abs((component?.tauNs ?? 0) - 3.4)).toBeLessThan(3 * (component?.tauNsStdErr ?? 0));
    expect(Math.abs(fit.shiftNs)).toBeLessThan(0.01);
    // The old pairing (the first 512 IRF channels taken as the decay's) puts the IRF 3 ns and a factor of 2 off.
    const paired = fitDecay(decay, { irfCounts: recorded.counts.subarray(0, channels), profileIntervals: false });
    expect(
      paired.acceptable &&
        Math.abs((paired.components[0]?.tauNs ?? 0) - 3.4) < 3 * (paired.components[0]?.tauNsStdErr ?? 0),
    ).toBe(false);
  });

  it("refuses an IRF coarser than the decay, and one that falls outside the decay's window, with IRF_AXIS_MISMATCH and a hint", () => {
    const coarse = irfOn(0.1, 256, 0);
    expect(() => alignIrfToDecay(coarse, decayAxis)).toThrow(InputRejected);
    try {
      alignIrfToDecay(coarse, decayAxis);
    } catch (error) {
      expect((error as InputRejected).code).toBe('IRF_AXIS_MISMATCH');
      expect((error as InputRejected).hint).toMatch(/finer channels/);
      expect((error as InputRejected).message).toMatch(/coarser/);
    }
    const late = irfOn(widthNs, channels, 24);
    expect(() => alignIrfToDecay(late, decayAxis)).toThrow(/outside the decay's window/);
  });

  it('passes an IRF on the same axis through unchanged, with no note', () => {
    const same = irfOn(widthNs, channels, 0);
    const aligned = alignIrfToDecay(same, decayAxis);
    expect(Array.from(aligned.counts)).toEqual(Array.from(same.counts));
    expect(aligned.note).toBeUndefined();
  });
});
