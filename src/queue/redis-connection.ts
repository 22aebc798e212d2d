// BullMQ connection options from a Redis URL. `maxRetriesPerRequest: null` is what BullMQ requires
// for workers: commands wait for a reconnect instead of failing, so a Redis restart is survived.
import type { ConnectionOptions } from 'bullmq';

/** BullMQ connection options for `redisUrl` (redis:// or rediss://). */
export function bullmqConnection(redisUrl: string): ConnectionOptions {
  return { url: redisUrl, maxRetriesPerRequest: null, retryStrategy: (times: number) => Math.min(times * 200, 2_000) };
}

/** The URL with any password replaced by ***, for logs. */
export function redactRedisUrl(redisUrl: string): string {
  try {
    const url = new URL(redisUrl);
    if (url.password !== '') url.password = '***';
    return url.href;
  } catch {
    return 'redis://(unparseable url)';
  }
}
