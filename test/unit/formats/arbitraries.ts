// fast-check generators of model spectra and decays for the round-trip tests. Names, keys and text
// values avoid what the text formats document as not round-tripping (line breaks, ":" and "=" in
// keys, keys from the vocabulary, "$$" in JCAMP-DX, −0, the transmittance kind).
import fc from 'fast-check';
import { createDecay, createSpectrum, type Decay, type Spectrum } from '../../../src/model/index.js';
import { MEASUREMENT_ROLES } from '../../../src/model/spectrum.js';
import { lookupKey } from '../../../src/formats/metadata-vocabulary.js';

const finite = fc.double({ noNaN: true, noDefaultInfinity: true }).map((value) => value + 0);
/** Doubles whose shortest text has no exponent (1e-6 ≤ |v| < 1e21, or 0). */
const plain = fc
  .double({ min: -1e9, max: 1e9, noNaN: true })
  .map((value) => value + 0)
  .filter((value) => !String(value).includes('e'));
const positive = fc.double({ min: 1e-6, max: 1e6, noNaN: true });
const word = fc.stringMatching(/^[a-z][a-z0-9]{0,7}$/);
const text = fc.stringMatching(/^[A-Za-z0-9][A-Za-z0-9 .,;()_+-]{0,20}[A-Za-z0-9)]$/);
const extraKey = fc
  .stringMatching(/^[A-Za-z][A-Za-z0-9 _-]{0,12}[A-Za-z0-9]$/)
  .filter((key) => lookupKey(key) === undefined && !/^header line/i.test(key) && !/^(title|origin|owner)$/i.test(key));
const extra = fc.dictionary(extraKey, fc.oneof(text, fc.constant('')), { maxKeys: 3 });

/** Strictly ascending axis of `n` points starting in [lo, hi]. */
function ascending(n: number, lo: number, hi: number): fc.Arbitrary<number[]> {
  return fc
    .tuple(
      fc.double({ min: lo, max: hi, noNaN: true }),
      fc.array(fc.double({ min: 1e-3, max: 50, noNaN: true }), { minLength: n - 1, maxLength: n - 1 }),
    )
    .map(([start, steps]) =>
      steps.reduce<number[]>((axis, step) => [...axis, (axis[axis.length - 1] as number) + step], [start]),
    )
    .filter((axis) => axis.every((value, i) => i === 0 || value > (axis[i - 1] as number)));
}

/** A random spectrum (kind ≠ transmittance) with up to two other columns and random metadata; `uniform` makes the axis first + i·step. */
export function spectrumArbitrary(
  options: { uniform?: boolean; otherColumns?: boolean; plainValues?: boolean } = {},
): fc.Arbitrary<Spectrum> {
  return fc
    .integer({ min: 2, max: 30 })
    .chain((n) =>
      fc.record({
        kind: fc.constantFrom('emission', 'excitation', 'absorbance', 'blank', 'detector-correction' as const),
        axis:
          options.uniform === true
            ? fc
                .tuple(fc.integer({ min: 200, max: 800 }), fc.constantFrom(0.5, 1, 2, 0.25))
                .map(([start, step]) => Array.from({ length: n }, (_, i) => start + i * step))
            : ascending(n, 150, 900),
        values: fc.array(options.plainValues === true ? plain : finite, { minLength: n, maxLength: n }),
        valueColumn: word.map((name) => `v ${name}`),
        valueUnit: fc.constantFrom('counts', 'cps', 'a.u.', 'absorbance', 'factor'),
        others:
          options.otherColumns === false
            ? fc.constant([])
            : fc
                .uniqueArray(
                  word.map((name) => `o${name}`),
                  { maxLength: 2 },
                )
                .chain((names) =>
                  fc.tuple(
                    ...names.map((name) =>
                      fc.tuple(fc.constant(name), fc.array(finite, { minLength: n, maxLength: n })),
                    ),
                  ),
                ),
        metadata: fc.record(
          {
            excitationNm: positive,
            emissionNm: positive,
            excitationSlitNm: positive,
            emissionSlitNm: positive,
            integrationTimeS: positive,
            pathLengthCm: positive,
            temperatureC: finite,
            solvent: text,
            sampleId: text,
            acquiredAt: text,
            role: fc.constantFrom(...MEASUREMENT_ROLES),
            extra,
          },
          { requiredKeys: ['extra'] },
        ),
      }),
    )
    .map((record) =>
      createSpectrum({
        kind: record.kind,
        wavelengthNm: record.axis,
        values: record.values,
        valueUnit: record.valueUnit,
        valueColumn: record.valueColumn,
        otherColumns: Object.fromEntries(record.others),
        metadata: record.metadata,
      }),
    );
}

/** A random decay histogram with an optional IRF and random metadata. */
export function decayArbitrary(): fc.Arbitrary<Decay> {
  const count = fc.double({ min: 0, max: 1e7, noNaN: true }).map((value) => value + 0);
  return fc
    .integer({ min: 4, max: 40 })
    .chain((n) =>
      fc.record({
        startNs: fc.constantFrom(0, 0.5, -1),
        widthNs: fc.constantFrom(0.004, 0.016, 0.025, 0.05, 1, 1e3),
        counts: fc.array(count, { minLength: n, maxLength: n }),
        irf: fc.option(fc.array(count, { minLength: n, maxLength: n }), { nil: undefined }),
        metadata: fc.record(
          {
            excitationNm: positive,
            emissionNm: positive,
            repetitionRateHz: positive,
            countRatePerS: positive,
            collectionTimeS: positive,
            temperatureC: finite,
            solvent: text,
            sampleId: text,
            acquiredAt: text,
            role: fc.constantFrom(...MEASUREMENT_ROLES),
            extra,
          },
          { requiredKeys: ['extra'] },
        ),
      }),
    )
    .map((record) =>
      createDecay({
        timeNs: record.counts.map((_, i) => record.startNs + i * record.widthNs),
        counts: record.counts,
        ...(record.irf === undefined ? {} : { irfCounts: record.irf }),
        metadata: record.metadata,
      }),
    );
}
