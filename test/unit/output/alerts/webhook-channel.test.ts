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

/** Resolves once `condition` holds, checking at every turn of the event loop (no time limit of its own: vitest's applies). */
async function waitUntil(condition: () => boolean): Promise<void> {
  while (!condition()) await new Promise((resolve) => setImmediate(resolve));
}

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

  it('a hanging endpoint does not delay the caller or the next alert; its attempts are aborted and the failure recorded', async () => {
    // Behaviour, not elapsed time (no timed assertions): the server keeps a log of what it saw. Requests of
    // rule "hang" are never answered; any other is answered at once.
    const events: string[] = [];
    let openHangRequests = 0;
    const { url, received } = await startServer((request, response, index) => {
      const ruleId = String((JSON.parse(received[index - 1]?.body ?? '{}') as { ruleId?: unknown }).ruleId);
      if (ruleId === 'hang') {
        openHangRequests++;
        events.push('hang received');
        // The client's abort (the attempt's time limit) closes the connection: the server sees it end unanswered.
        request.socket.once('close', () => {
          openHangRequests--;
          events.push(response.writableEnded ? 'hang answered' : 'hang closed by the client');
        });
        return;
      }
      events.push(`${ruleId} received while ${openHangRequests} hang request(s) open`);
      response.writeHead(204).end();
    });
    const { dispatcher, recorder, logger } = dispatcherFor(url, { attempts: 2, backoffMs: 10, timeoutMs: 1000 });
    const hangMessages = dispatcher.dispatch([flag('hang', 'critical')]);
    // dispatch returned with the alert queued and nothing delivered or failed yet: the caller did not wait.
    expect(hangMessages).toHaveLength(1);
    expect(recorder.records).toEqual([]);
    await waitUntil(() => events.includes('hang received'));
    dispatcher.dispatch([flag('next', 'critical')]);
    await dispatcher.idle();

    // The next alert went out while the hanging one was still waiting for its answer (a serial queue would
    // have sent it only after both hang attempts had been given up, with none open).
    expect(events).toContain('next received while 1 hang request(s) open');
    expect(recorder.records.find((r) => r.key.includes('next'))).toMatchObject({ status: 'delivered', attempts: 1 });
    // Each attempt's time limit fired its abort signal: fetch closed both connections unanswered, and the
    // delivery is recorded as failed after the configured attempts, with the time limit as its cause.
    // (the server hears of the second close a moment after the client gave up: wait for it; an attempt whose
    // abort did not reach fetch would leave its connection open and the test would end at vitest's limit).
    await waitUntil(() => openHangRequests === 0);
    expect(events.filter((e) => e === 'hang received')).toHaveLength(2);
    expect(events.filter((e) => e === 'hang closed by the client')).toHaveLength(2);
    expect(openHangRequests).toBe(0);
    expect(recorder.records.find((r) => r.key.includes('hang'))).toMatchObject({
      status: 'failed',
      attempts: 2,
      error: 'timed out after 1000 ms',
    });
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
