// The CLI's help, version and usage-error behaviour through the real binary.
import { spawn } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { CLI_PATH, runDriftlight } from '../helpers/cli.js';

describe('driftlight CLI basics', () => {
  it('prints help with the exit-code table and exits 0', () => {
    const run = runDriftlight(['--help']);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('Usage: driftlight');
    expect(run.stdout).toContain('3  one or more inputs rejected');
  });

  it('ends quietly with exit 0 when the reader of its output goes away (driftlight … | head)', async () => {
    // Issue 20 item 9: before, a closed pipe gave exit 1 and an EPIPE stack trace on stderr.
    const child = spawn(process.execPath, [CLI_PATH, 'config', 'docs'], { stdio: ['ignore', 'pipe', 'pipe'] });
    child.stdout.destroy();
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => {
      stderr += chunk.toString();
    });
    const code = await new Promise<number | null>((resolve) => child.once('exit', resolve));
    expect({ code, stderr }).toEqual({ code: 0, stderr: '' });
  });

  it('exits 2 on an unknown option', () => {
    const run = runDriftlight(['--no-such-option']);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('unknown option');
  });
});
