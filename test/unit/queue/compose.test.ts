// Static checks of docker-compose.yml, the Dockerfile and the compose config in docs/deployment.md
// (no Docker engine runs in CI): services, volumes, health check, Redis persistence, and every
// command and flag against the real CLI (the built bin/driftlight.js, as `npm test` builds first).
import { readFileSync } from 'node:fs';
import { parse } from 'yaml';
import { describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/index.js';
import { REPO_ROOT, runDriftlight } from '../../helpers/cli.js';

interface ComposeService {
  readonly image?: string;
  readonly build?: unknown;
  readonly command?: readonly string[];
  readonly volumes?: readonly string[];
  readonly depends_on?: Record<string, { condition?: string }>;
  readonly healthcheck?: { test?: readonly string[] };
  readonly container_name?: string;
  readonly ports?: readonly string[];
  readonly init?: boolean;
}
interface ComposeFile {
  readonly services: Record<string, ComposeService>;
  readonly volumes?: Record<string, unknown>;
}

const compose = parse(readFileSync(`${REPO_ROOT}docker-compose.yml`, 'utf8')) as ComposeFile;
const dockerfile = readFileSync(`${REPO_ROOT}Dockerfile`, 'utf8');
const deploymentDoc = readFileSync(`${REPO_ROOT}docs/deployment.md`, 'utf8');

function service(name: string): ComposeService {
  const found = compose.services[name];
  if (found === undefined) throw new Error(`docker-compose.yml has no service "${name}"`);
  return found;
}

/** A short-syntax volume's container path (the source may hold ":" in a ${VAR:-default}). */
function volumeTarget(volume: string): string {
  const parts = volume.split(':');
  if (parts.at(-1) === 'ro' || parts.at(-1) === 'rw') parts.pop();
  return parts.at(-1) ?? '';
}

/** The long options of a real CLI command, read from the built CLI's `--help` (flag → takes a value). */
function cliOptions(name: string): Map<string, boolean> {
  const help = runDriftlight([name, '--help']);
  expect(help.status, `\`driftlight ${name} --help\` succeeds: ${help.stderr}`).toBe(0);
  expect(help.stdout, `the CLI registers a "${name}" command`).toMatch(new RegExp(`^Usage: driftlight ${name} `));
  const options = new Map<string, boolean>();
  for (const match of help.stdout.matchAll(/^ {2}(?:-\w, )?(--[\w-]+)( [<[])?/gm)) {
    if (match[1] !== undefined) options.set(match[1], match[2] !== undefined);
  }
  return options;
}

/** Checks `args` ([command, ...flags]) against the real CLI command; returns the flag values. */
function checkCliArgs(args: readonly string[]): Map<string, string> {
  const [name, ...rest] = args;
  const options = cliOptions(name ?? '');
  const values = new Map<string, string>();
  for (let i = 0; i < rest.length; i += 1) {
    const flag = rest[i] ?? '';
    expect([...options.keys()], `"${name} ${flag}" is a real option`).toContain(flag);
    if (options.get(flag) === true) {
      values.set(flag, rest[i + 1] ?? '');
      i += 1;
    }
  }
  return values;
}

function composeConfigFromDocs(): unknown {
  const marker = deploymentDoc.indexOf('<!-- compose-config');
  const block = /```yaml\n([\s\S]*?)```/.exec(deploymentDoc.slice(marker));
  if (marker < 0 || block?.[1] === undefined) throw new Error('docs/deployment.md lost its compose-config yaml block');
  return parse(block[1]);
}

describe('docker-compose.yml', () => {
  it('runs Redis with AOF, noeviction, a volume and a health check', () => {
    const redis = service('redis');
    expect(redis.command?.join(' ')).toMatch(/--appendonly yes/);
    expect(redis.command?.join(' ')).toMatch(/--maxmemory-policy noeviction/);
    expect(redis.volumes?.some((v) => v.endsWith(':/data'))).toBe(true);
    expect(redis.healthcheck?.test).toEqual(['CMD', 'redis-cli', 'ping']);
  });

  it("runs the coordinator with a real `watch --config --redis` on the workers' Redis and every data folder mounted", () => {
    const coordinator = service('coordinator');
    const flags = checkCliArgs(coordinator.command ?? []);
    expect(coordinator.command?.[0]).toBe('watch');
    expect(flags.get('--config')).toBe('/config/driftlight.yaml');
    expect(flags.get('--redis')).toBe(checkCliArgs(service('worker').command ?? []).get('--redis'));
    const targets = (coordinator.volumes ?? []).map(volumeTarget);
    for (const folder of ['inbox', 'results', 'archive', 'quarantine', 'outbox', 'state'])
      expect(targets).toContain(`/data/${folder}`);
    expect(targets).toContain('/config');
    expect(coordinator.depends_on?.['redis']?.condition).toBe('service_healthy');
  });

  it('has a scalable worker service running a real `driftlight worker` against the redis service', () => {
    const worker = service('worker');
    const flags = checkCliArgs(worker.command ?? []);
    expect(worker.command?.[0]).toBe('worker');
    expect(new URL(flags.get('--redis') ?? '').hostname).toBe('redis');
    expect(worker.container_name).toBeUndefined();
    expect(worker.ports).toBeUndefined();
    expect(worker.init).toBe(true);
    expect(worker.depends_on?.['redis']?.condition).toBe('service_healthy');
    expect(worker.image).toBe(service('coordinator').image);
  });

  it('declares every named volume it uses', () => {
    const named = Object.values(compose.services)
      .flatMap((s) => s.volumes ?? [])
      .map((v) => v.split(':')[0] ?? '')
      .filter((source) => /^[a-z][\w-]*$/.test(source));
    for (const name of named) expect(Object.keys(compose.volumes ?? {})).toContain(name);
  });

  it('builds the image from node:20-bookworm-slim with npm ci and the build', () => {
    expect(dockerfile).toMatch(/^FROM node:20-bookworm-slim/m);
    expect(dockerfile).toMatch(/npm ci/);
    expect(dockerfile).toMatch(/npm run build/);
    expect(dockerfile).toMatch(/ENTRYPOINT \["node", "\/app\/bin\/driftlight\.js"\]/);
  });

  it('matches the documented coordinator config: valid, a pure coordinator, same folders, same queue as the workers', () => {
    const config = resolveConfig(composeConfigFromDocs(), { baseDir: '/config' });
    const workerFlags = checkCliArgs(service('worker').command ?? []);
    expect(config.queue.backend).toBe('bullmq');
    expect(config.queue.runWorker).toBe(false);
    expect(config.queue.redisUrl).toBe(workerFlags.get('--redis'));
    expect(config.queue.prefix).toBe(workerFlags.get('--prefix'));
    expect(config.queue.queueName).toBe(workerFlags.get('--queue'));
    const targets = (service('coordinator').volumes ?? []).map(volumeTarget);
    for (const folder of Object.values(config.folders)) expect(targets).toContain(folder);
  });
});
