// Real processes for the queue fault tests: `driftlight worker` children (their pino JSON lines are
// collected so tests can wait for events) and a private redis-server with AOF on a free port.
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { fileURLToPath } from 'node:url';
import { CLI_PATH } from '../helpers/cli.js';

export const COMPUTE_PROCESSOR_PATH = fileURLToPath(new URL('../fixtures/queue/compute.mjs', import.meta.url));

export interface WorkerLogLine {
  readonly event?: string;
  readonly jobId?: string;
  readonly pid?: number;
  readonly [key: string]: unknown;
}

export interface WorkerProcess {
  readonly child: ChildProcess;
  readonly lines: WorkerLogLine[];
  /** Resolves with the first log line (past or future) that matches. */
  waitForLine(match: (line: WorkerLogLine) => boolean, timeoutMs: number, what: string): Promise<WorkerLogLine>;
  /** Sends `signal` and resolves with the exit code (or signal name). */
  stop(signal: NodeJS.Signals): Promise<number | string>;
}

/** Spawns `driftlight worker` on the compute fixture with short lock/stall times. */
export function spawnWorker(options: {
  redisUrl: string;
  prefix: string;
  queue: string;
  concurrency: number;
  processor?: string;
  heartbeatMs?: number;
}): WorkerProcess {
  const args = [
    CLI_PATH,
    'worker',
    '--redis',
    options.redisUrl,
    '--prefix',
    options.prefix,
    '--queue',
    options.queue,
    '--concurrency',
    String(options.concurrency),
    '--processor',
    options.processor ?? COMPUTE_PROCESSOR_PATH,
    '--lock-duration-ms',
    '1000',
    '--stalled-interval-ms',
    '500',
    '--heartbeat-ms',
    String(options.heartbeatMs ?? 0),
  ];
  const child = spawn(process.execPath, args, { stdio: ['ignore', 'pipe', 'pipe'] });
  const lines: WorkerLogLine[] = [];
  const waiters: { match: (line: WorkerLogLine) => boolean; resolve: (line: WorkerLogLine) => void }[] = [];
  let buffered = '';
  child.stdout?.setEncoding('utf8').on('data', (chunk: string) => {
    buffered += chunk;
    const parts = buffered.split('\n');
    buffered = parts.pop() ?? '';
    for (const text of parts.filter(Boolean)) {
      const line = JSON.parse(text) as WorkerLogLine;
      lines.push(line);
      for (const waiter of waiters.filter((w) => w.match(line))) {
        waiters.splice(waiters.indexOf(waiter), 1);
        waiter.resolve(line);
      }
    }
  });
  let stderr = '';
  child.stderr?.setEncoding('utf8').on('data', (chunk: string) => {
    stderr += chunk;
  });
  const exited = new Promise<number | string>((resolve) =>
    child.once('exit', (code, signal) => resolve(code ?? signal ?? 'unknown')),
  );
  return {
    child,
    lines,
    waitForLine(match, timeoutMs, what) {
      const seen = lines.find(match);
      if (seen !== undefined) return Promise.resolve(seen);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(
          () => reject(new Error(`worker ${child.pid}: no ${what} within ${timeoutMs} ms; stderr: ${stderr}`)),
          timeoutMs,
        );
        waiters.push({ match, resolve: (line) => (clearTimeout(timer), resolve(line)) });
      });
    },
    stop(signal) {
      if (child.exitCode === null && child.signalCode === null) child.kill(signal);
      return exited;
    },
  };
}

/** A free TCP port on 127.0.0.1. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address !== null ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

/** Starts /usr/bin/redis-server with fsync-always AOF in `dir`; resolves once it accepts connections. */
export async function startRedisServer(port: number, dir: string): Promise<ChildProcess> {
  const child = spawn(
    '/usr/bin/redis-server',
    [
      '--port',
      String(port),
      '--bind',
      '127.0.0.1',
      '--appendonly',
      'yes',
      '--appendfsync',
      'always',
      '--dir',
      dir,
      '--save',
      '',
      '--maxmemory-policy',
      'noeviction',
    ],
    { stdio: ['ignore', 'pipe', 'pipe'] },
  );
  await new Promise<void>((resolve, reject) => {
    let output = '';
    const timer = setTimeout(() => reject(new Error(`redis-server did not start: ${output}`)), 10_000);
    child.stdout?.setEncoding('utf8').on('data', (chunk: string) => {
      output += chunk;
      if (/Ready to accept connections/i.test(output)) {
        clearTimeout(timer);
        resolve();
      }
    });
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`redis-server exited with ${code}: ${output}`));
    });
  });
  return child;
}

/** SIGKILLs a child process and waits for it to be gone. */
export async function killHard(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const gone = new Promise((resolve) => child.once('exit', resolve));
  child.kill('SIGKILL');
  await gone;
}
