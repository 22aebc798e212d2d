// `driftlight process` with a pure BullMQ coordinator (queue.runWorker: false) and no worker says on
// stderr, at once, that it is waiting for workers, naming the queue and how to start one, instead of
// hanging silently (issue 20, item 9); once a `driftlight worker` starts, it finishes and exits 0.
// Real Redis (REDIS_URL), a random key prefix, cleaned up afterwards.
import { spawn, type ChildProcess } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, afterEach, expect, it } from 'vitest';
import { CLI_PATH } from '../helpers/cli.js';
import { cleanupQueue, describeRedis, randomPrefix, REDIS_URL } from '../helpers/redis.js';
import { dropSet, generateSet, makeWorkspace, readResults, removeWorkspaces, waitFor } from './pipeline-helpers.js';
import { spawnWorker, type WorkerProcess } from './queue-processes.js';

const QUEUE_NAME = 'analyze-nw';
/** The compiled analysis processor the worker runs (`npm run build` first). */
const ANALYZE_PROCESSOR_PATH = fileURLToPath(new URL('../../dist/workers/analyze-job.js', import.meta.url));

describeRedis('process with no worker', () => {
  const prefix = randomPrefix();
  let worker: WorkerProcess | undefined;
  let coordinator: ChildProcess | undefined;
  afterEach(async () => {
    if (coordinator?.exitCode === null) coordinator.kill('SIGKILL');
    await worker?.stop('SIGKILL');
    await cleanupQueue(prefix, QUEUE_NAME);
  });
  afterAll(() => removeWorkspaces());

  it('says it waits for workers (queue, command to start one), then finishes once a worker comes', async () => {
    const dir = makeWorkspace();
    writeFileSync(
      join(dir, 'driftlight.yaml'),
      [
        'assembly: { setTimeoutMs: 60000 }',
        `queue: { runWorker: false, prefix: ${prefix}, queueName: ${QUEUE_NAME}, concurrency: 2, backoffMs: 50, outcomeSweepMs: 500 }`,
        'logging: { level: info, stdout: off }',
        '',
      ].join('\n'),
    );
    const inbox = join(dir, 'inbox');
    dropSet(inbox, generateSet('nw-01', 31));
    dropSet(inbox, generateSet('nw-02', 32));
    const child = spawn(
      process.execPath,
      [CLI_PATH, 'process', inbox, '--redis', REDIS_URL, '--config', join(dir, 'driftlight.yaml')],
      { cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] },
    );
    coordinator = child;
    let stderr = '';
    child.stderr.setEncoding('utf8').on('data', (chunk: string) => {
      stderr += chunk;
    });
    const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
    await waitFor('the waiting-for-workers message', () => stderr.includes('waiting for workers'), 30_000);
    expect(stderr).toContain(`queue "${QUEUE_NAME}"`);
    expect(stderr).toContain(`driftlight worker --prefix ${prefix} --queue ${QUEUE_NAME} --redis redis://`);
    expect(readResults(dir)).toEqual([]);

    worker = spawnWorker({
      redisUrl: REDIS_URL,
      prefix,
      queue: QUEUE_NAME,
      concurrency: 1,
      processor: ANALYZE_PROCESSOR_PATH,
    });
    expect(await exited).toBe(0);
    expect(
      readResults(dir)
        .map((r) => r.result.sampleId)
        .sort(),
    ).toEqual(['nw-01', 'nw-02']);
  }, 120_000);
});
