// A local webhook receiver for the demo: an HTTP server on 127.0.0.1 (a free port) that stores each
// alert POSTed to it, so the demo's alerts really travel through the webhook channel.
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';

/** One alert as it arrived, with the scenario day that was being replayed when it came. */
export interface ReceivedAlert {
  readonly day: number;
  readonly payload: Readonly<Record<string, unknown>>;
}

export interface WebhookReceiver {
  readonly url: string;
  readonly alerts: ReceivedAlert[];
  /** The scenario day stamped on alerts arriving from now on. */
  currentDay: number;
  close(): Promise<void>;
}

/** Starts the receiver on 127.0.0.1 at a free port; every POST body (JSON) is kept, answered 204. */
export async function startWebhookReceiver(): Promise<WebhookReceiver> {
  const alerts: ReceivedAlert[] = [];
  const receiver = { currentDay: 0 };
  const server: Server = createServer((request, response) => {
    const chunks: Buffer[] = [];
    request.on('data', (chunk: Buffer) => chunks.push(chunk));
    request.on('end', () => {
      try {
        alerts.push({
          day: receiver.currentDay,
          payload: JSON.parse(Buffer.concat(chunks).toString('utf8')) as Record<string, unknown>,
        });
        response.writeHead(204).end();
      } catch (error) {
        response.writeHead(400, { 'content-type': 'text/plain' }).end(`not JSON: ${String(error)}`);
      }
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  return Object.assign(receiver, {
    url: `http://127.0.0.1:${port}/driftlight-alerts`,
    alerts,
    close: () =>
      new Promise<void>((resolve, reject) =>
        server.close((error) => (error === undefined ? resolve() : reject(error))),
      ),
  });
}
