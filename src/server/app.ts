// The status server (fastify): fixed routes only — `/` the status page, `/digest` the latest digest,
// `/healthz`, `/metrics` — every response generated from the ledger or driftlight's own output; no
// static file serving, no directory listing, and no part of a request path names a file.
import { timingSafeEqual } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import Fastify, { type FastifyInstance, type FastifyReply } from 'fastify';
import type { DriftlightConfig } from '../config/index.js';
import type { RuleSet } from '../qc/index.js';
import { digestFolder } from '../output/digest-write.js';
import type { Ledger } from '../store/ledger.js';
import { ledgerAnswers } from '../store/status.js';
import { createMetricsRegistry } from './metrics.js';
import { gatherStatus, latestDigestDate } from './status-data.js';
import { renderStatusPage } from './status-page.js';

/** Content-Security-Policy of every HTML response: nothing may be loaded from anywhere (inline CSS only). */
const CSP =
  "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

export interface StatusAppOptions {
  readonly ledger: Ledger;
  readonly config: DriftlightConfig;
  readonly ruleSet: RuleSet;
  readonly softwareVersion: string;
  /** Bearer token required on every route but /healthz; undefined: no token (loopback only). */
  readonly token: string | undefined;
  /** Clock of the page's "as of" and chart window. Default: the system clock. */
  readonly now?: () => Date;
  /** Called after each response is sent (the demo's --serve stop-after-first-request uses it). */
  readonly onResponse?: (path: string, statusCode: number) => void;
}

function tokenMatches(header: string | undefined, token: string): boolean {
  const match = /^Bearer (\S+)$/.exec(header ?? '');
  if (match?.[1] === undefined) return false;
  const given = Buffer.from(match[1]);
  const wanted = Buffer.from(token);
  return given.length === wanted.length && timingSafeEqual(given, wanted);
}

const html = (reply: FastifyReply, body: string): FastifyReply =>
  reply.header('content-type', 'text/html; charset=utf-8').header('content-security-policy', CSP).send(body);

/** Builds the fastify app (not listening yet). */
export function buildStatusApp(options: StatusAppOptions): FastifyInstance {
  const { ledger, config, ruleSet, token } = options;
  const now = options.now ?? ((): Date => new Date());
  const app = Fastify({ logger: false, return503OnClosing: true });
  const registry = createMetricsRegistry(ledger);

  app.addHook('onRequest', async (request, reply) => {
    void reply
      .header('x-content-type-options', 'nosniff')
      .header('referrer-policy', 'no-referrer')
      .header('cache-control', 'no-store');
    if (token === undefined || request.routeOptions.url === '/healthz') return;
    if (!tokenMatches(request.headers.authorization, token)) {
      await reply
        .code(401)
        .header('www-authenticate', 'Bearer realm="driftlight"')
        .type('text/plain; charset=utf-8')
        .send('token required: send "Authorization: Bearer TOKEN"\n');
    }
  });
  if (options.onResponse !== undefined) {
    const onResponse = options.onResponse;
    app.addHook('onResponse', async (request, reply) => onResponse(request.url, reply.statusCode));
  }
  app.setNotFoundHandler(async (_request, reply) =>
    reply
      .code(404)
      .type('text/plain; charset=utf-8')
      .send('not found: the status page serves /, /digest, /healthz and /metrics only\n'),
  );
  app.setErrorHandler(async (error, _request, reply) => {
    // The message of an unexpected failure may hold paths; it goes to stderr, the client gets a short text.
    process.stderr.write(
      `status page error: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`,
    );
    return reply.code(500).type('text/plain; charset=utf-8').send('internal error (see the server log)\n');
  });

  app.get('/healthz', async (_request, reply) => {
    return reply
      .type('application/json; charset=utf-8')
      .send({ status: ledgerAnswers(ledger) ? 'ok' : 'ledger unreadable', version: options.softwareVersion });
  });
  app.get('/metrics', async (_request, reply) => reply.type(registry.contentType).send(await registry.metrics()));
  app.get('/', async (_request, reply) => {
    const data = gatherStatus(ledger, config, ruleSet, { now: now(), softwareVersion: options.softwareVersion });
    return html(reply, (await renderStatusPage(data)).html);
  });
  app.get('/digest', async (_request, reply) => {
    const date = latestDigestDate(config);
    if (date === undefined) return reply.code(404).type('text/plain; charset=utf-8').send('no digest written yet\n');
    let body: string;
    try {
      body = readFileSync(join(digestFolder(config), `${date}.html`), 'utf8');
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === 'ENOENT')
        return reply.code(404).type('text/plain; charset=utf-8').send(`the digest of ${date} has no HTML form\n`);
      throw error;
    }
    return html(reply, body);
  });
  return app;
}
