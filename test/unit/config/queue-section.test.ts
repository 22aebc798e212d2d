// The config's queue section: defaults taken from QUEUE_DEFAULTS (one source), runWorker's
// backend-dependent default, and `--redis URL` selecting bullmq over the config file.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { configFromOptions } from '../../../src/cli/config-option.js';
import { resolveConfig } from '../../../src/config/index.js';
import { coordinatorRunsWorker } from '../../../src/config/sections/queue.js';
import { QUEUE_DEFAULTS } from '../../../src/queue/index.js';
import { tempDir } from '../../helpers/temp-dir.js';

describe('config queue section', () => {
  it('fills its defaults from QUEUE_DEFAULTS', () => {
    const queue = resolveConfig({}, { baseDir: '/lab' }).queue;
    const { runWorker: _libraryDefault, ...shared } = QUEUE_DEFAULTS;
    expect(queue).toMatchObject(shared);
    expect(queue.runWorker).toBeUndefined();
  });

  it('runs a worker in the coordinator by default only on bullmq; runWorker: false makes a pure coordinator', () => {
    const queue = (raw: object) => resolveConfig({ queue: raw }, { baseDir: '/lab' }).queue;
    expect(coordinatorRunsWorker(queue({}))).toBe(false);
    expect(coordinatorRunsWorker(queue({ backend: 'bullmq' }))).toBe(true);
    expect(coordinatorRunsWorker(queue({ backend: 'bullmq', runWorker: false }))).toBe(false);
  });

  it('--redis URL selects bullmq at that URL over the config file and keeps its other queue options', () => {
    const dir = tempDir('dl-config-');
    const file = join(dir, 'driftlight.yaml');
    writeFileSync(
      file,
      'queue: { backend: in-process, redisUrl: redis://elsewhere:6379, prefix: lab2, runWorker: false }\n',
    );
    const config = configFromOptions({ config: file, redis: 'redis://queue-host:6380' });
    expect(config.queue).toMatchObject({
      backend: 'bullmq',
      redisUrl: 'redis://queue-host:6380',
      prefix: 'lab2',
      runWorker: false,
    });
    expect(coordinatorRunsWorker(config.queue)).toBe(false);
    expect(Object.isFrozen(config.queue)).toBe(true);
    expect(configFromOptions({ config: file }).queue.backend).toBe('in-process');
  });
});
