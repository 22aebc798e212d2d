// Issue 16.6 through the real CLI: `process` on the demo day with its control 30 % low and the
// only alert channel a webhook whose receiver (127.0.0.1) is down. The summary and the exit code
// (3 for the demo's bad file, then 4) say that a QC flag is open and that the alert did not arrive; `status` lists the alert with
// its real cause; a second run with the receiver back delivers it from the outbox.
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EXIT_CODES } from '../../src/cli/exit-codes.js';
import { REPO_ROOT, runDriftlight } from '../helpers/cli.js';
import { tempDir } from '../helpers/temp-dir.js';

/** A free 127.0.0.1 port with nothing listening on it. */
async function closedPort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()));
  const { port } = server.address() as AddressInfo;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

describe('process: open QC flags and undelivered alerts', () => {
  it('exits 4, names both in the summary and in status, and the next run delivers the alert', async () => {
    const folder = tempDir('dl-attention-');
    const inbox = join(folder, 'inbox');
    cpSync(join(REPO_ROOT, 'examples/day/inbox'), inbox, { recursive: true });
    // The control emission scaled by 0.7: Φ = 0.56 against the target 0.8 ± 0.03, a 1-3s rejection
    // (relative yield ∝ integrated emission, Brouwer, Pure Appl. Chem. 83, 2213, 2011; Westgard rules, common practice).
    const emission = join(inbox, 'run0314-a.csv');
    writeFileSync(
      emission,
      readFileSync(emission, 'utf8')
        .split('\n')
        .map((line) =>
          /^\d+(\.\d+)?,[\d.]+$/.test(line)
            ? `${line.split(',')[0]},${(Number(line.split(',')[1]) * 0.7).toFixed(3)}`
            : line,
        )
        .join('\n'),
    );
    const port = await closedPort();
    const config = join(folder, 'driftlight.yaml');
    writeFileSync(
      config,
      [
        `folders: { inbox: ${inbox} }`,
        'references: [{ id: r6g, sampleIdPattern: "^REF-R6G", standardId: rhodamine-6g-ethanol }]',
        'controls: [{ id: teal, sampleIdPattern: "^CTRL-teal", targetYield: 0.8, sdYield: 0.03 }]',
        'logging: { stdout: "off" }',
        `alerts: { channels: [{ id: hook, type: webhook, url: "http://127.0.0.1:${port}/qc", attempts: 2, backoffMs: 10, timeoutMs: 2000 }], routing: { info: [], warning: [hook], critical: [hook] } }`,
      ].join('\n'),
    );

    const run = runDriftlight(['process', '--config', config, inbox]);
    // The demo day holds a deliberately bad file, so this run exits 3 (rejected inputs take precedence over 4).
    expect(run.status).toBe(EXIT_CODES.rejected.code);
    expect(run.stdout).toMatch(/QC flags open: [1-9]\d* \([1-9]\d* critical/);
    expect(run.stdout).toMatch(/alerts NOT delivered: [1-9]\d* \(fetch failed: .*ECONNREFUSED/);

    const status = runDriftlight(['status', '--config', config]);
    expect(status.status).toBe(0);
    expect(status.stdout).toMatch(/alerts not delivered: [1-9]\d* still retried, 0 expired/);
    expect(status.stdout).toMatch(
      /hook {2}yield-[^ ]+ \(critical\): pending, 2 attempt\(s\): fetch failed: .*ECONNREFUSED/,
    );

    // The receiver comes back; the next run (nothing new to process) delivers from the outbox.
    const bodies: string[] = [];
    const receiver = createServer((request, response) => {
      let body = '';
      request.on('data', (chunk: Buffer) => (body += chunk.toString()));
      request.on('end', () => {
        bodies.push(body);
        response.writeHead(204).end();
      });
    });
    await new Promise<void>((resolve) => receiver.listen(port, '127.0.0.1', () => resolve()));
    try {
      const { spawn } = await import('node:child_process');
      const { CLI_PATH } = await import('../helpers/cli.js');
      // Run asynchronously: the receiver lives in this process.
      const second = await new Promise<{ status: number | null; stdout: string }>((resolve) => {
        const child = spawn(process.execPath, [CLI_PATH, 'process', '--config', config, inbox], {
          stdio: ['ignore', 'pipe', 'pipe'],
        });
        let stdout = '';
        child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString()));
        child.on('close', (status) => resolve({ status, stdout }));
      });
      // Nothing rejected now; the flag is still open (no run has recovered it): exit 4.
      expect(second.status).toBe(EXIT_CODES.attention.code);
      expect(second.stdout).toMatch(/QC flags open: [1-9]/);
      expect(second.stdout).not.toContain('alerts NOT delivered');
      expect(bodies.length).toBeGreaterThan(0);
      expect(bodies.some((body) => body.includes('teal'))).toBe(true);
    } finally {
      await new Promise<void>((resolve) => receiver.close(() => resolve()));
    }
  });
});
