// Webhook channel against a real HTTP server on 127.0.0.1: JSON body, HMAC-SHA256 signature checked
// by the server with the shared key, retry after a server error, a hanging endpoint, missing key.
import { createHmac, timingSafeEqual } from 'node:crypto';
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import { alertsSection } from '../../../../src/config/sections/alerts.js';
import { ConfigInvalid } from '../../../../src/model/errors.js';
import {
  createAlertDispatcher,
  createChannels,
  createMemoryAlertState,
  createMemoryRecorder,
  SIGNATURE_HEADER,
} from '../../../../src/output/alerts/index.js';
import { flag, memoryLogger } from './alert-fixtures.js';

const KEY = 'test-hmac-key-not-a-real-secret';
const ENV = { DL_TEST_WEBHOOK_KEY: KEY };

interface Received {
  body: string;
  signature: string | undefined;
}

let server: Server | undefined;

/** Starts a server on a free 127.0.0.1 port; `respond` decides each answer. */
async function startServer(
  respond: (request: IncomingMessage, response: ServerResponse, index: number) => void,
): Promise<{ url: string; received: Received[] }> {
  const received: Received[] = [];
  server = createServer((request, response) => {
    const chunks: Buffer[] = [];
    request.on('data', (chunk: Buffer) => chunks.push(chunk));
    request.on('end', () => {
      const header = request.headers[SIGNATURE_HEADER];
      received.push({
        body: Buffer.concat(chunks).toString('utf8'),
        signature: typeof header === 'string' ? header : undefined,
      });
      respond(request, response, received.length);
    });
  });
  await new Promise<void>((resolve) => server?.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return { url: `http://127.0.0.1:${port}/hooks/qc`, received };
}

afterEach(async () => {
  server?.closeAllConnections();
  await new Promise<void>((resolve) => (server === undefined ? resolve() : server.close(() => resolve())));
  server = undefined;
});

/** What a receiver does: recompute HMAC-SHA256 over `${t}.${body}` with the shared key (RFC 2104). */
function signatureValid(body: string, header: string | undefined, key: string): boolean {
  const match = /^t=(\d+),v1=([0-9a-f]{64})$/.exec(header ?? '');
  if (match === null) return false;
  const expected = createHmac('sha256', key).update(`${match[1]}.${body}`).digest();
  return timingSafeEqual(expected, Buffer.from(match[2] ?? '', 'hex'));
}

function dispatcherFor(url: string, channel: Record<string, unknown>) {
  const alerts = alertsSection.parse({
    channels: [{ id: 'hook', type: 'webhook', url, secretEnv: 'DL_TEST_WEBHOOK_KEY', ...channel }],
    routing: { critical: ['hook'], warning: ['hook'], info: ['hook'] },
  });
  const recorder = createMemoryRecorder();
  const logger = memoryLogger();
  const dispatcher = createAlertDispatcher({
    alerts,
    channels: createChannels(alerts, { env: ENV, logger }),
    state: createMemoryAlertState(),
    recorder,
    logger,
  });
  return { dispatcher, recorder, logger };
}

describe('webhook channel', () => {
  it('POSTs the alert as JSON with a valid HMAC-SHA256 signature', async () => {
    const { url, received } = await startServer((_request, response) => response.writeHead(204).end());
    const { dispatcher, recorder } = dispatcherFor(url, {});
    dispatcher.dispatch([flag('yield-westgard', 'critical')]);
    await dispatcher.idle();
    expect(received).toHaveLength(1);
    const [first] = received;
    expect(signatureValid(first?.body ?? '', first?.signature, KEY)).toBe(true);
    expect(signatureValid(first?.body ?? '', first?.signature, 'another-key')).toBe(false);
    const payload = JSON.parse(first?.body ?? '{}') as Record<string, unknown>;
    expect(payload).toMatchObject({
      schema: 'driftlight.alert/1',
      type: 'flag',
      ruleId: 'yield-westgard',
      severity: 'critical',
    });
    expect(payload['message']).toBe('control yield 0.891 is 3.4 SD below target 0.925 (1-3s).');
    expect(first?.body).not.toContain(KEY);
    expect(recorder.records[0]).toMatchObject({ status: 'delivered', attempts: 1 });
  });

  it('retries after an HTTP 500 with backoff', async () => {
    const { url, received } = await startServer((_request, response, index) =>
      response.writeHead(index === 1 ? 500 : 200).end(),
    );
    const { dispatcher, recorder } = dispatcherFor(url, { attempts: 3, backoffMs: 20 });
    dispatcher.dispatch([flag('w', 'warning')]);
    await dispatcher.idle();
    expect(received).toHaveLength(2);
    expect(recorder.records[0]).toMatchObject({ status: 'delivered', attempts: 2 });
  });

  it('a hanging endpoint does not delay the caller; the failure is recorded after the retries', async () => {
    const { url } = await startServer(() => undefined); // never answers
    const { dispatcher, recorder, logger } = dispatcherFor(url, { attempts: 2, backoffMs: 10, timeoutMs: 200 });
    const started = performance.now();
    dispatcher.dispatch([flag('w', 'critical')]);
    const callerMs = performance.now() - started;
    expect(callerMs).toBeLessThan(50);
    await dispatcher.idle();
    expect(recorder.records[0]).toMatchObject({ status: 'failed', attempts: 2, error: 'timed out after 200 ms' });
    expect(JSON.stringify(logger.lines)).not.toContain(KEY);
  });

  it('refuses to start when the key variable is unset, naming the config path', () => {
    const alerts = alertsSection.parse({
      channels: [{ id: 'hook', type: 'webhook', url: 'http://127.0.0.1:9/x', secretEnv: 'DL_UNSET_KEY' }],
      routing: { info: ['hook'], warning: ['hook'], critical: ['hook'] },
    });
    let error: unknown;
    try {
      createChannels(alerts, { env: {}, logger: memoryLogger() });
    } catch (caught) {
      error = caught;
    }
    expect(error).toBeInstanceOf(ConfigInvalid);
    expect((error as ConfigInvalid).configPath).toBe('alerts.channels[0].secretEnv');
    expect((error as ConfigInvalid).message).toContain('DL_UNSET_KEY');
  });
});
