// Real Redis for tests: REDIS_URL (default redis://127.0.0.1:6379). If Redis is unreachable, Redis
// suites are skipped with one visible line, except under CI=true where they fail in beforeAll.
// Each suite gets a random key prefix and removes every key under it afterwards.
import { randomBytes } from 'node:crypto';
import { Queue } from 'bullmq';
import { Redis } from 'ioredis';
import { beforeAll, describe } from 'vitest';

export const REDIS_URL = process.env['REDIS_URL'] ?? 'redis://127.0.0.1:6379';
const IN_CI = process.env['CI'] === 'true';

async function probeRedis(url: string): Promise<string | undefined> {
  const client = new Redis(url, {
    lazyConnect: true,
    maxRetriesPerRequest: 0,
    retryStrategy: () => null,
    connectTimeout: 1_000,
  });
  let lastError: string | undefined;
  client.on('error', (error: Error) => {
    lastError = error.message; // more telling than connect()'s "Connection is closed."
  });
  try {
    await client.connect();
    await client.ping();
    return undefined;
  } catch (error) {
    return lastError ?? (error instanceof Error ? error.message : String(error));
  } finally {
    client.disconnect();
  }
}

const unreachableReason = await probeRedis(REDIS_URL);
if (unreachableReason !== undefined && !IN_CI) {
  console.log(
    `[redis] ${REDIS_URL} unreachable (${unreachableReason}): Redis tests skipped; start redis-server or set REDIS_URL`,
  );
}

/** describe() for Redis suites: skipped when Redis is unreachable, failing under CI=true. */
export function describeRedis(name: string, body: () => void): void {
  describe.skipIf(unreachableReason !== undefined && !IN_CI)(name, () => {
    beforeAll(() => {
      if (unreachableReason !== undefined) {
        throw new Error(
          `Redis at ${REDIS_URL} is unreachable (${unreachableReason}); CI=true requires it. Start redis-server or set REDIS_URL.`,
        );
      }
    });
    body();
  });
}

/** A random key prefix for one test, so parallel suites never share queues. */
export function randomPrefix(): string {
  return `dltest-${randomBytes(6).toString('hex')}`;
}

/** Deletes every key under `prefix` (BullMQ keys are `prefix:queue:...`) at `url`. */
export async function deleteKeysByPrefix(prefix: string, url: string = REDIS_URL): Promise<number> {
  const client = new Redis(url, { maxRetriesPerRequest: 3 });
  let deleted = 0;
  try {
    let cursor = '0';
    do {
      const [next, keys] = await client.scan(cursor, 'MATCH', `${prefix}:*`, 'COUNT', 500);
      cursor = next;
      if (keys.length > 0) deleted += await client.del(...keys);
    } while (cursor !== '0');
  } finally {
    client.disconnect();
  }
  return deleted;
}

/** Obliterates the BullMQ queue `queueName` under `prefix`, then deletes any key left under the prefix. */
export async function cleanupQueue(prefix: string, queueName: string, url: string = REDIS_URL): Promise<void> {
  const queue = new Queue(queueName, { connection: { url, maxRetriesPerRequest: 3 }, prefix });
  try {
    await queue.obliterate({ force: true });
  } finally {
    await queue.close();
  }
  await deleteKeysByPrefix(prefix, url);
}
