// Public entry of the status server: start it on a resolved address (options.ts) over a ledger.
import type { AddressInfo } from 'node:net';
import { buildStatusApp, type StatusAppOptions } from './app.js';
import type { ServerOptions } from './options.js';

export {
  resolveServerOptions,
  isLoopbackHost,
  parseListenAddress,
  DEFAULT_LISTEN,
  TOKEN_ENV,
  type ServerOptions,
  type ServerOptionsInput,
} from './options.js';
export { METRIC_NAMES } from './metrics.js';

export interface RunningStatusServer {
  /** http://HOST:PORT/ (the port actually bound when 0 was asked). */
  readonly url: string;
  close(): Promise<void>;
}

/** Starts the status server on `server.host:server.port`; resolves once it listens. */
export async function startStatusServer(
  server: ServerOptions,
  app: Omit<StatusAppOptions, 'token'>,
): Promise<RunningStatusServer> {
  const instance = buildStatusApp({ ...app, token: server.token });
  await instance.listen({ host: server.host, port: server.port });
  const address = instance.server.address() as AddressInfo;
  const host = address.family === 'IPv6' ? `[${address.address}]` : address.address;
  return { url: `http://${host}:${address.port}/`, close: () => instance.close() };
}
