// Fuzzing manifests, configs and rule files (issue 20.10): mutations of real ones (the example day's
// manifest and config, the built-in rule set, the demo month's config) and fast-check-generated
// documents; every case ends in a parsed value or a typed rejection (InputRejected for manifests,
// ConfigInvalid for configs and rule files) within one second. 1000 cases per target here.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { stringify } from 'yaml';
import { afterAll, describe, expect, it } from 'vitest';
import { configFromText, CONFIG_SECTIONS } from '../../src/config/index.js';
import { ConfigInvalid, InputRejected } from '../../src/model/errors.js';
import { parseManifest } from '../../src/pipeline/manifest.js';
import { parseRuleSet } from '../../src/qc/index.js';
import {
  applyByteMutation,
  applyLineMutation,
  byteMutation,
  expectTypedOutcome,
  FUZZ_RUNS,
  FUZZ_SEED,
  lineMutation,
  slowest,
} from './fuzz-harness.js';

const text = (relative: string): string =>
  readFileSync(fileURLToPath(new URL(`../../${relative}`, import.meta.url)), 'utf8');
const MANIFESTS = [
  text('examples/day/inbox/CTRL-teal-0314.set.yaml'),
  JSON.stringify({
    sampleId: 's-1',
    role: 'sample',
    excitationNm: 480,
    files: [
      { file: 'a.csv', part: 'emission' },
      { file: 'b.csv', part: 'decay', role: 'sample' },
    ],
  }),
];
const CONFIGS = [text('examples/day/driftlight.yaml')];
const RULE_SETS = [text('rules/default.yaml')];
const encoder = new TextEncoder();
const decoder = new TextDecoder();
const params = (runs = FUZZ_RUNS): fc.Parameters<unknown> => ({ numRuns: runs, seed: FUZZ_SEED, endOnFailure: true });

/** A text mutated by byte edits or by line edits. */
const mutatedText = (sources: readonly string[]): fc.Arbitrary<string> =>
  fc
    .tuple(fc.constantFrom(...sources), fc.boolean(), byteMutation, lineMutation)
    .map(([source, byLines, bytes, lines]) =>
      byLines ? applyLineMutation(source, lines) : decoder.decode(applyByteMutation(encoder.encode(source), bytes)),
    );

/** A YAML document of generated keys and values, some of them the real keys of `keys`. */
const generatedYaml = (keys: readonly string[]): fc.Arbitrary<string> =>
  fc
    .dictionary(
      fc.oneof(fc.constantFrom(...keys), fc.string({ maxLength: 10 })),
      fc.oneof(
        fc.jsonValue({ maxDepth: 3 }),
        fc.dictionary(fc.oneof(fc.constantFrom(...keys), fc.string({ maxLength: 8 })), fc.jsonValue({ maxDepth: 2 }), {
          maxKeys: 5,
        }),
      ),
      { maxKeys: 8 },
    )
    .map((value) => stringify(value));

/** Counts of each outcome ('result' or a code). */
function tally(outcomes: Map<string, number>, outcome: string): void {
  outcomes.set(outcome, (outcomes.get(outcome) ?? 0) + 1);
}

describe(`fuzzing manifests, configs and rule files (${FUZZ_RUNS} cases each; seed ${FUZZ_SEED})`, () => {
  afterAll(() => {
    console.info(
      `fuzz manifests/configs/rules, slowest case (ms): ${[...slowest].map(([target, ms]) => `${target} ${ms.toFixed(1)}`).join(', ')}`,
    );
  });

  it('manifests: a parsed manifest or MANIFEST_INVALID', () => {
    const outcomes = new Map<string, number>();
    const keys = [
      'schema',
      'sampleId',
      'role',
      'solvent',
      'excitationNm',
      'standardId',
      'notes',
      'files',
      'file',
      'part',
    ];
    fc.assert(
      fc.property(fc.oneof(mutatedText(MANIFESTS), generatedYaml(keys)), (manifest) => {
        tally(
          outcomes,
          expectTypedOutcome('manifest', [InputRejected], () => parseManifest(manifest, 'fuzz.set.yaml')),
        );
      }),
      params(),
    );
    expect(outcomes.get('result') ?? 0).toBeGreaterThan(0);
    expect([...outcomes.keys()].filter((k) => k !== 'result')).toEqual(['MANIFEST_INVALID']);
  });

  it('configs: a resolved config or CONFIG_INVALID', () => {
    const outcomes = new Map<string, number>();
    const keys = [
      ...Object.keys(CONFIG_SECTIONS),
      'inbox',
      'components',
      'estimator',
      'channels',
      'routing',
      'id',
      'type',
      'url',
      'sampleIdPattern',
      'stabilityWindowMs',
    ];
    fc.assert(
      fc.property(fc.oneof(mutatedText(CONFIGS), generatedYaml(keys)), (config) => {
        tally(
          outcomes,
          expectTypedOutcome('config', [ConfigInvalid], () => configFromText(config, '/fuzz/driftlight.yaml')),
        );
      }),
      params(),
    );
    expect(outcomes.get('result') ?? 0).toBeGreaterThan(0);
    expect([...outcomes.keys()].filter((k) => k !== 'result')).toEqual(['CONFIG_INVALID']);
  });

  it('rule files: a rule set or CONFIG_INVALID', () => {
    const outcomes = new Map<string, number>();
    const keys = [
      'version',
      'name',
      'timeZone',
      'controls',
      'rules',
      'id',
      'kind',
      'metric',
      'severity',
      'lambda',
      'scope',
      'westgard',
      'ewma',
      'cusum',
    ];
    fc.assert(
      fc.property(fc.oneof(mutatedText(RULE_SETS), generatedYaml(keys)), (rules) => {
        tally(
          outcomes,
          expectTypedOutcome('rule-set', [ConfigInvalid], () => parseRuleSet(rules, 'fuzz-rules.yaml')),
        );
      }),
      params(),
    );
    expect(outcomes.get('result') ?? 0).toBeGreaterThan(0);
    expect([...outcomes.keys()].filter((k) => k !== 'result')).toEqual(['CONFIG_INVALID']);
  });
});
