// Listen addresses, the loopback test and the token rule of the status server; and the token check
// of a real server listening on loopback with a token.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../../src/config/index.js';
import { effectiveRuleSet } from '../../../src/pipeline/qc-rule-set.js';
import {
  isLoopbackHost,
  parseListenAddress,
  resolveServerOptions,
  startStatusServer,
} from '../../../src/server/index.js';
import { openLedger } from '../../../src/store/ledger.js';
import { tempDir } from '../../helpers/temp-dir.js';

describe('status server options', () => {
  it('reads HOST:PORT and [IPv6]:PORT', () => {
    expect(parseListenAddress('127.0.0.1:8470')).toEqual({ host: '127.0.0.1', port: 8470 });
    expect(parseListenAddress('[::1]:0')).toEqual({ host: '::1', port: 0 });
    expect(parseListenAddress('localhost:9000')).toEqual({ host: 'localhost', port: 9000 });
    for (const bad of ['8470', '127.0.0.1', '127.0.0.1:99999', 'http://127.0.0.1:1', '[zz::1]:1'])
      expect(() => parseListenAddress(bad), bad).toThrow(/--http/);
  });

  // Loopback: 127.0.0.0/8 (RFC 1122 §3.2.1.3) and ::1 (RFC 4291 §2.5.3).
  it('knows the loopback range', () => {
    for (const host of ['127.0.0.1', '127.1.2.3', '::1', '0:0:0:0:0:0:0:1', 'localhost', '::ffff:127.0.0.1'])
      expect(isLoopbackHost(host), host).toBe(true);
    for (const host of ['0.0.0.0', '::', '10.0.0.1', '192.168.1.5', '128.0.0.1', 'example.org', '::2'])
      expect(isLoopbackHost(host), host).toBe(false);
  });

  it('refuses a non-loopback bind without a token, and short tokens; takes a token from the environment or a file', () => {
    expect(() => resolveServerOptions({ listen: '0.0.0.0:8470', env: {} })).toThrow(/without a token/);
    expect(() => resolveServerOptions({ listen: '0.0.0.0:8470', env: { DRIFTLIGHT_HTTP_TOKEN: 'too-short' } })).toThrow(
      /at least 16/,
    );
    expect(
      resolveServerOptions({ listen: '0.0.0.0:8470', env: { DRIFTLIGHT_HTTP_TOKEN: 'a'.repeat(24) } }),
    ).toMatchObject({ loopback: false, token: 'a'.repeat(24) });
    const file = join(tempDir('driftlight-token-'), 'token.txt');
    writeFileSync(file, `${'b'.repeat(32)}\nignored second line\n`);
    expect(resolveServerOptions({ listen: '0.0.0.0:1', tokenFile: file, env: {} }).token).toBe('b'.repeat(32));
    expect(() => resolveServerOptions({ tokenFile: join(file, 'missing'), env: {} })).toThrow(/cannot be read/);
    expect(resolveServerOptions({ env: {} })).toMatchObject({
      host: '127.0.0.1',
      port: 8470,
      loopback: true,
      token: undefined,
    });
  });

  it('a server with a token answers 401 without it or with a wrong one, 200 with it; /healthz needs none', async () => {
    const dir = tempDir('driftlight-serve-');
    const config = loadConfig(undefined);
    const ledger = openLedger(join(dir, 'state'));
    const token = 'c'.repeat(20);
    const server = await startStatusServer(
      resolveServerOptions({ listen: '127.0.0.1:0', env: { DRIFTLIGHT_HTTP_TOKEN: token } }),
      {
        ledger,
        config: { ...config, folders: { ...config.folders, results: join(dir, 'results') } },
        ruleSet: effectiveRuleSet(config),
        softwareVersion: 'test',
      },
    );
    try {
      for (const path of ['/', '/metrics', '/digest', '/nowhere']) {
        expect((await fetch(new URL(path, server.url))).status, path).toBe(401);
        expect(
          (await fetch(new URL(path, server.url), { headers: { authorization: `Bearer ${'d'.repeat(20)}` } })).status,
          path,
        ).toBe(401);
        expect((await fetch(new URL(path, server.url), { headers: { authorization: token } })).status, path).toBe(401);
      }
      const ok = await fetch(new URL('/metrics', server.url), { headers: { authorization: `Bearer ${token}` } });
      expect(ok.status).toBe(200);
      expect(await ok.text()).toContain('# TYPE driftlight_fit_duration_seconds histogram');
      expect((await fetch(new URL('/', server.url), { headers: { authorization: `Bearer ${token}` } })).status).toBe(
        200,
      );
      expect((await fetch(new URL('/healthz', server.url))).status).toBe(200);
    } finally {
      await server.close();
      ledger.close();
    }
  });
});
