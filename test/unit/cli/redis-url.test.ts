// The Redis URL (with its password) can come from a file or the environment instead of the command
// line, where `ps` shows it to every user (issue 20 item 9).
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { configFromOptions, redisUrlFrom, REDIS_URL_ENV } from '../../../src/cli/config-option.js';

const dirs: string[] = [];
afterEach(() => {
  for (const dir of dirs.splice(0)) rmSync(dir, { recursive: true, force: true });
});

function workspace(): string {
  const dir = mkdtempSync(join(tmpdir(), 'dl-redis-url-'));
  dirs.push(dir);
  writeFileSync(join(dir, 'driftlight.yaml'), 'queue: { backend: in-process }\n');
  return dir;
}

describe('Redis URL from a file or the environment', () => {
  const secret = 'redis://:s3cret@127.0.0.1:6390/2';

  it('--redis @FILE reads the first line of FILE and selects the bullmq backend', () => {
    const dir = workspace();
    writeFileSync(join(dir, 'redis.url'), `${secret}\n# comment lines after the first are ignored\n`);
    const config = configFromOptions({ config: join(dir, 'driftlight.yaml'), redis: `@${join(dir, 'redis.url')}` }, {});
    expect(config.queue).toMatchObject({ backend: 'bullmq', redisUrl: secret });
  });

  it('--redis env reads $DRIFTLIGHT_REDIS_URL; without --redis the variable replaces queue.redisUrl only', () => {
    const dir = workspace();
    const env = { [REDIS_URL_ENV]: secret };
    expect(configFromOptions({ config: join(dir, 'driftlight.yaml'), redis: 'env' }, env).queue).toMatchObject({
      backend: 'bullmq',
      redisUrl: secret,
    });
    expect(configFromOptions({ config: join(dir, 'driftlight.yaml') }, env).queue).toMatchObject({
      backend: 'in-process',
      redisUrl: secret,
    });
    expect(configFromOptions({ config: join(dir, 'driftlight.yaml') }, {}).queue.redisUrl).toBe(
      'redis://127.0.0.1:6379',
    );
  });

  it('names what is wrong: an unreadable file, a file or variable without a URL', () => {
    const dir = workspace();
    writeFileSync(join(dir, 'empty.url'), '\n');
    expect(() => redisUrlFrom(`@${join(dir, 'missing.url')}`, {})).toThrow(/cannot read .*missing\.url \(ENOENT\)/);
    expect(() => redisUrlFrom(`@${join(dir, 'empty.url')}`, {})).toThrow(
      /does not hold a redis:\/\/ or rediss:\/\/ URL/,
    );
    expect(() => redisUrlFrom('env', {})).toThrow(/\$DRIFTLIGHT_REDIS_URL does not hold/);
    expect(redisUrlFrom(secret, {})).toBe(secret);
  });
});
