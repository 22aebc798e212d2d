// Where the status page listens and who may read it: `HOST:PORT` (loopback by default), and the
// bearer token that any bind outside the loopback range must have (from the environment or a file).
import { readFileSync } from 'node:fs';
import { isIPv4, isIPv6 } from 'node:net';
import { z } from 'zod';
import { ConfigInvalid } from '../model/errors.js';

/** The environment variable a token is read from when no --token-file is given. */
export const TOKEN_ENV = 'DRIFTLIGHT_HTTP_TOKEN';
/** The default listen address: loopback, a port of our own choosing. */
export const DEFAULT_LISTEN = '127.0.0.1:8470';
/** The shortest token accepted (characters); shorter ones are guessable. */
export const MIN_TOKEN_LENGTH = 16;

/** What the user gives: `listen` as HOST:PORT ([::1]:PORT for IPv6), and where a token comes from. */
export interface ServerOptionsInput {
  /** HOST:PORT to listen on; port 0 picks a free port. Default: 127.0.0.1:8470 */
  readonly listen?: string;
  /** A file whose first line is the token. Default: none (the environment variable DRIFTLIGHT_HTTP_TOKEN). */
  readonly tokenFile?: string;
  /** The environment to read DRIFTLIGHT_HTTP_TOKEN from. Default: process.env */
  readonly env?: NodeJS.ProcessEnv;
}

export interface ServerOptions {
  readonly host: string;
  readonly port: number;
  /** Whether host is a loopback address (127.0.0.0/8, ::1, localhost). */
  readonly loopback: boolean;
  /** The bearer token every request (except /healthz) must carry; undefined on loopback without one. */
  readonly token: string | undefined;
}

const listenSchema = z
  .string()
  .regex(/^(\[[0-9a-fA-F:.]+\]|[A-Za-z0-9.-]+):\d{1,5}$/, 'expected HOST:PORT, e.g. 127.0.0.1:8470 or [::1]:8470');

/** Splits HOST:PORT ([v6]:PORT) and checks the port; throws ConfigInvalid naming the option. */
export function parseListenAddress(text: string): { host: string; port: number } {
  const parsed = listenSchema.safeParse(text);
  if (!parsed.success)
    throw new ConfigInvalid(`--http ${text}: expected HOST:PORT, e.g. 127.0.0.1:8470 or [::1]:8470`, {
      configPath: '--http',
      hint: 'Give an address and port, e.g. --http 127.0.0.1:8470.',
    });
  const at = text.lastIndexOf(':');
  const host = text.slice(0, at).replace(/^\[(.*)\]$/, '$1');
  const port = Number(text.slice(at + 1));
  if (!Number.isInteger(port) || port < 0 || port > 65_535)
    throw new ConfigInvalid(`--http ${text}: port must be 0–65535`, { configPath: '--http' });
  if (host.includes(':') && !isIPv6(host))
    throw new ConfigInvalid(`--http ${text}: "${host}" is not an IPv6 address`, { configPath: '--http' });
  return { host, port };
}

/** Whether a host name or address is on the loopback interface (127.0.0.0/8, ::1, localhost; RFC 1122 §3.2.1.3, RFC 4291 §2.5.3). */
export function isLoopbackHost(host: string): boolean {
  if (host === 'localhost') return true;
  if (isIPv4(host)) return host.startsWith('127.');
  if (isIPv6(host)) return host === '::1' || /^(0{0,4}:){7}0{0,3}1$/.test(host) || /^::ffff:127\./i.test(host);
  return false;
}

function readToken(input: ServerOptionsInput): string | undefined {
  if (input.tokenFile !== undefined) {
    let text: string;
    try {
      text = readFileSync(input.tokenFile, 'utf8');
    } catch (error) {
      throw new ConfigInvalid(
        `--token-file ${input.tokenFile} cannot be read: ${error instanceof Error ? error.message : String(error)}`,
        { configPath: '--token-file', cause: error },
      );
    }
    return text.split(/\r?\n/)[0]?.trim() ?? '';
  }
  const fromEnv = (input.env ?? process.env)[TOKEN_ENV];
  return fromEnv === undefined || fromEnv === '' ? undefined : fromEnv.trim();
}

/**
 * Resolves and freezes the server options. A bind outside loopback without a token is refused
 * (ConfigInvalid), as is a token shorter than 16 characters.
 */
export function resolveServerOptions(input: ServerOptionsInput = {}): ServerOptions {
  const { host, port } = parseListenAddress(input.listen ?? DEFAULT_LISTEN);
  const loopback = isLoopbackHost(host);
  const token = readToken(input);
  if (token !== undefined && token.length < MIN_TOKEN_LENGTH) {
    throw new ConfigInvalid(
      `the status page token is ${token.length} characters; at least ${MIN_TOKEN_LENGTH} are needed`,
      {
        configPath: input.tokenFile === undefined ? TOKEN_ENV : '--token-file',
        hint: 'Make a long random token, e.g. `openssl rand -hex 24 > token.txt`.',
      },
    );
  }
  if (!loopback && token === undefined) {
    throw new ConfigInvalid(`refusing to serve the status page on ${host} (not loopback) without a token`, {
      configPath: '--http',
      hint: `Set ${TOKEN_ENV} or pass --token-file FILE (at least ${MIN_TOKEN_LENGTH} characters); clients send "Authorization: Bearer TOKEN". Or listen on 127.0.0.1.`,
    });
  }
  return Object.freeze({ host, port, loopback, token });
}
