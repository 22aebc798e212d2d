// Issue 20.8: strict config everywhere. Every section (lists included), rule files and manifests refuse
// unknown keys, naming the key and the nearest valid one; each problem is one line with its full path,
// said once; no problem is reported about a channel the config never wrote.
import { describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/index.js';
import { CONFIG_SECTIONS } from '../../../src/config/schema.js';
import { ConfigInvalid, InputRejected } from '../../../src/model/errors.js';
import { editDistance, nearestName } from '../../../src/model/config-problems.js';
import { parseRuleSet } from '../../../src/qc/index.js';
import { parseManifest } from '../../../src/pipeline/manifest.js';

/** The ConfigInvalid that resolving `raw` throws. */
function problemOf(raw: unknown): ConfigInvalid {
  try {
    resolveConfig(raw, { baseDir: '/', configFile: '/lab/driftlight.yaml' });
  } catch (error) {
    if (error instanceof ConfigInvalid) return error;
    throw error;
  }
  throw new Error('the config was accepted');
}

const ENTRY: Record<string, Record<string, unknown>> = {
  references: { id: 'r6g', sampleIdPattern: '^REF', standardId: 'rhodamine-6g-ethanol' },
  controls: { id: 'teal', sampleIdPattern: '^CTRL' },
};

describe('edit distance and the nearest name', () => {
  it('gives the textbook distances', () => {
    // Levenshtein distance kitten → sitting = 3 (the standard worked example; from memory, common textbook).
    expect(editDistance('kitten', 'sitting')).toBe(3);
    // An adjacent transposition costs 1 (Damerau, CACM 7, 171 (1964)); the optimal-string-alignment variant
    // gives CA → ABC 3, not 2 (no substring edited twice; from memory, the usual illustration of the variant).
    expect(editDistance('sdYeild', 'sdYield')).toBe(1);
    expect(editDistance('CA', 'ABC')).toBe(3);
    expect(editDistance('', 'abc')).toBe(3);
    expect(editDistance('Components', 'components')).toBe(0);
  });

  it('names a near key and nothing for a key that is near none', () => {
    expect(nearestName('sdYeild', ['sdYield', 'sdTauNs', 'targetYield'])).toBe('sdYield');
    expect(nearestName('bogus', ['sdYield', 'sdTauNs', 'targetYield'])).toBeUndefined();
    // A key that is the start of exactly one valid key (redis → redisUrl) is taken as a shortening of it.
    expect(nearestName('redis', ['redisUrl', 'prefix'])).toBe('redisUrl');
  });
});

describe('strict config (issue 20.8)', () => {
  it('refuses an unknown key in every section, naming it with its full path', () => {
    for (const section of Object.keys(CONFIG_SECTIONS)) {
      const entry = ENTRY[section];
      const raw = entry === undefined ? { [section]: { bogusKey: 1 } } : { [section]: [{ ...entry, bogusKey: 1 }] };
      const error = problemOf(raw);
      const path = entry === undefined ? `${section}.bogusKey` : `${section}[0].bogusKey`;
      expect(error.toUserLine(), section).toMatch(
        new RegExp(
          `^/lab/driftlight\\.yaml: CONFIG_INVALID: ${path.replace(/[[\].]/g, '\\$&')}: unknown option "bogusKey" \\(valid here: [^\\n]+\\)$`,
        ),
      );
      expect(error.configPath).toBe(path);
    }
  });

  it('names the nearest valid key inside controls[], alert channels, routing, profiles and nested objects', () => {
    const cases: [unknown, string][] = [
      [
        { controls: [{ ...ENTRY['controls'], sdYeild: 0.01 }] },
        'controls[0].sdYeild: unknown option "sdYeild"; did you mean "sdYield"?',
      ],
      [
        { alerts: { channels: [{ id: 'hook', type: 'webhook', url: 'http://127.0.0.1:9/x', timoutMs: 5 }] } },
        'alerts.channels[0].timoutMs: unknown option "timoutMs"; did you mean "timeoutMs"?',
      ],
      [
        {
          alerts: {
            channels: [
              {
                id: 'm',
                type: 'email',
                to: ['a@b.invalid'],
                from: 'd@b.invalid',
                host: 'localhost',
                requireTls: true,
                prot: 25,
              },
            ],
          },
        },
        'alerts.channels[0].prot: unknown option "prot"; did you mean "port"?',
      ],
      [
        { alerts: { routing: { critcal: ['log'] } } },
        'alerts.routing.critcal: unknown option "critcal"; did you mean "critical"?',
      ],
      [
        { formats: { profiles: [{ match: '*.dat', delimeter: 'tab' }] } },
        'formats.profiles[0].delimeter: unknown option "delimeter"; did you mean "delimiter"?',
      ],
      [
        { queue: { retention: { complitedCount: 5 } } },
        'queue.retention.complitedCount: unknown option "complitedCount"; did you mean "completedCount"?',
      ],
      [{ queue: { redis: 'redis://x' } }, 'queue.redis: unknown option "redis"; did you mean "redisUrl"?'],
      [{ rules: { fiel: 'x.yaml' } }, 'rules.fiel: unknown option "fiel"; did you mean "file"?'],
      [{ analysis: { compnents: 2 } }, 'analysis.compnents: unknown option "compnents"; did you mean "components"?'],
    ];
    for (const [raw, line] of cases)
      expect(problemOf(raw).toUserLine()).toBe(`/lab/driftlight.yaml: CONFIG_INVALID: ${line}`);
  });

  it('says each problem once, on its own line, with its path once', () => {
    const error = problemOf({
      controls: [{ ...ENTRY['controls'], sdYeild: 0.01, bogus: 1 }],
      analysis: { compnents: 2, estimator: 'median' },
      alerts: { channels: [{ type: 'webhook', url: 'http://127.0.0.1:9/x' }] },
    });
    const lines = error.toUserLine().split('\n');
    expect(lines).toHaveLength(5);
    expect(new Set(lines).size).toBe(lines.length);
    for (const line of lines) {
      const [, path] = /^\/lab\/driftlight\.yaml: CONFIG_INVALID: (\S+): /.exec(line) ?? [];
      expect(path, line).toBeDefined();
      // The path appears once in its line.
      expect(line.split(`${path ?? ''}:`).length - 1, line).toBe(1);
    }
    expect(lines.some((line) => line.endsWith('alerts.channels[0].id: required, and missing (expected string)'))).toBe(
      true,
    );
    expect(
      lines.some((line) =>
        line.includes('controls[0].bogus: unknown option "bogus" (valid here: id, label, sampleIdPattern,'),
      ),
    ).toBe(true);
  });

  it('reports nothing about a channel the config never wrote: unwritten routes go to the configured channels', () => {
    const config = resolveConfig(
      { alerts: { channels: [{ id: 'hook', type: 'webhook', url: 'http://127.0.0.1:9/x' }] } },
      { baseDir: '/' },
    );
    expect(config.alerts.routing).toEqual({ info: ['hook'], warning: ['hook'], critical: ['hook'] });
    const defaults = resolveConfig({}, { baseDir: '/' });
    expect(defaults.alerts.routing).toEqual({ info: ['log'], warning: ['log'], critical: ['log'] });
    // A route the user did write is still checked.
    const error = problemOf({
      alerts: {
        channels: [{ id: 'hook', type: 'webhook', url: 'http://127.0.0.1:9/x' }],
        routing: { critical: ['pager'] },
      },
    });
    expect(error.toUserLine()).toBe(
      '/lab/driftlight.yaml: CONFIG_INVALID: alerts.routing.critical[0]: no channel with id "pager" under alerts.channels',
    );
    // A channel of an unknown type is one line about its type, not one per channel type.
    expect(
      problemOf({ alerts: { channels: [{ id: 'x', type: 'webhok', url: 'http://127.0.0.1:9/x' }] } })
        .toUserLine()
        .split('\n'),
    ).toHaveLength(1);
  });
});

describe('strict rule files and manifests (issue 20.8)', () => {
  it('a rule file names an unknown key with the nearest valid one, and a misspelt kind with the nearest kind', () => {
    const yaml = [
      'rules:',
      '  - { id: y-ewma, metric: controlQuantumYield, kind: ewma, severity: warning, lamda: 0.2 }',
      '  - { id: y-w, metric: controlQuantumYield, kind: westgrd, severity: critical }',
      '',
    ].join('\n');
    let error: unknown;
    try {
      parseRuleSet(yaml, 'lab-rules.yaml');
    } catch (caught) {
      error = caught;
    }
    expect(error).toBeInstanceOf(ConfigInvalid);
    const lines = (error as ConfigInvalid).toUserLine().split('\n');
    expect(lines).toEqual([
      'lab-rules.yaml:2: CONFIG_INVALID: rules[0].lamda: unknown option "lamda"; did you mean "lambda"?',
      'lab-rules.yaml:2: CONFIG_INVALID: rules[1].kind: unknown kind "westgrd"; did you mean "westgard"?',
    ]);
  });

  it('a manifest names an unknown key with the nearest valid one', () => {
    expect(() =>
      parseManifest('sampleId: s1\nsolvnt: ethanol\nfiles: [{ file: a.csv, part: emission }]\n', 'set.yaml'),
    ).toThrow(InputRejected);
    expect(() =>
      parseManifest('sampleId: s1\nsolvnt: ethanol\nfiles: [{ file: a.csv, part: emission }]\n', 'set.yaml'),
    ).toThrow('solvnt: unknown option "solvnt"; did you mean "solvent"?');
  });
});
