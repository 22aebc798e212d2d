// The CLI's help, version and usage-error behaviour through the real binary.
import { describe, expect, it } from 'vitest';
import { runDriftlight } from '../helpers/cli.js';

describe('driftlight CLI basics', () => {
  it('prints help with the exit-code table and exits 0', () => {
    const run = runDriftlight(['--help']);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('Usage: driftlight');
    expect(run.stdout).toContain('3  one or more inputs rejected');
  });

  it('exits 2 on an unknown option', () => {
    const run = runDriftlight(['--no-such-option']);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('unknown option');
  });
});
