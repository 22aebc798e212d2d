// Config: defaults, a three-line config, error messages naming the path, folder resolution, and the
// documented option table matching the schema (docs/configuration.md cannot drift).
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ConfigInvalid } from '../../../src/model/errors.js';
import { configOptionRows, configOptionsMarkdown, loadConfig, resolveConfig } from '../../../src/config/index.js';
import { tempDir } from '../../helpers/temp-dir.js';

function tempConfig(text: string): string {
  const dir = tempDir('dl-config-');
  const file = join(dir, 'driftlight.yaml');
  writeFileSync(file, text);
  return file;
}

describe('config', () => {
  it('fills every default from an empty config and freezes the result', () => {
    const config = resolveConfig({}, { baseDir: '/lab' });
    expect(config.folders.inbox).toBe('/lab/inbox');
    expect(config.limits.maxFileBytes).toBe(50 * 1024 * 1024);
    expect(config.queue).toMatchObject({
      backend: 'in-process',
      attempts: 3,
      backoffMs: 500,
      jobTimeoutMs: 300_000,
      redisUrl: 'redis://127.0.0.1:6379',
      prefix: 'driftlight',
      queueName: 'analyze',
      retention: { completedCount: 1000, failedCount: 5000 },
    });
    expect(config.queue.concurrency).toBeGreaterThanOrEqual(1);
    expect(Object.isFrozen(config.folders)).toBe(true);
  });

  it('accepts a three-line config and resolves folders against the config file directory', () => {
    const file = tempConfig('folders:\n  inbox: exports\nwatch: { stabilityWindowMs: 150 }\n');
    const config = loadConfig(file);
    expect(config.folders.inbox).toBe(join(file, '..', 'exports'));
    expect(config.folders.results).toBe(join(file, '..', 'results'));
    expect(config.watch.stabilityWindowMs).toBe(150);
    expect(config.logFile).toBe(join(file, '..', 'state', 'driftlight.log'));
  });

  it('names the config path and the problem of an invalid value', () => {
    const file = tempConfig('controls:\n  - { id: teal, sampleIdPattern: "^CTRL", targetYield: 1.7 }\n');
    let error: unknown;
    try {
      loadConfig(file);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ConfigInvalid);
    expect((error as ConfigInvalid).message).toContain('controls[0].targetYield: expected a number between 0 and 1');
    expect((error as ConfigInvalid).configPath).toBe('controls[0].targetYield');
  });

  it('rejects unknown options, bad regular expressions and broken YAML with a location', () => {
    expect(() => resolveConfig({ watch: { stabiltyWindowMs: 5 } }, { baseDir: '/' })).toThrow(
      /watch.stabiltyWindowMs: unknown option "stabiltyWindowMs"; did you mean "stabilityWindowMs"\?/,
    );
    expect(() =>
      resolveConfig({ references: [{ id: 'r', sampleIdPattern: '(', standardId: 'x' }] }, { baseDir: '/' }),
    ).toThrow(/invalid regular expression/);
    const file = tempConfig('folders:\n  inbox: [unclosed\n');
    expect(() => loadConfig(file)).toThrow(ConfigInvalid);
  });

  it('documents every option in docs/configuration.md exactly as the schema generates it', () => {
    const rows = configOptionRows();
    expect(rows.map((r) => r.path)).toContain('queue.retention.completedCount');
    for (const row of rows) {
      if (row.type !== 'object') expect(row.description, row.path).not.toBe('');
    }
    const doc = readFileSync(new URL('../../../docs/configuration.md', import.meta.url), 'utf8');
    expect(doc).toContain(configOptionsMarkdown());
  });
});
