// The README cannot drift: its example commands run against the real CLI, its three-line config
// validates, and its exit-code table matches the one the CLI prints.
import { cpSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EXIT_CODES } from '../../src/cli/exit-codes.js';
import { REPO_ROOT, runDriftlight } from '../helpers/cli.js';
import { tempDir } from '../helpers/temp-dir.js';

const readme = readFileSync(join(REPO_ROOT, 'README.md'), 'utf8');

/** The fenced block of the given language that follows the first line containing `marker`. */
function blockAfter(marker: string, language: string): string {
  const at = readme.indexOf(marker);
  expect(at, `README has "${marker}"`).toBeGreaterThanOrEqual(0);
  const open = readme.indexOf('```' + language + '\n', at);
  const close = readme.indexOf('\n```', open + 3);
  return readme.slice(open + language.length + 4, close);
}

/** Splits a shell line into words (the README examples use no quoting). */
function words(line: string): string[] {
  return line
    .replace(/#.*$/, '')
    .trim()
    .split(/\s+/)
    .filter((word) => word.length > 0);
}

describe('README', () => {
  const examples = blockAfter('Examples on the bundled files', 'sh')
    .split('\n')
    .filter((line) => line.startsWith('npx driftlight '));

  it('has example commands', () => {
    expect(examples.length).toBeGreaterThanOrEqual(3);
  });

  it.each(examples)('example runs and exits 0: %s', (line) => {
    const run = runDriftlight(words(line).slice(2));
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(run.stdout.length).toBeGreaterThan(0);
  });

  it('the three-line config passes `config check`', () => {
    const config = blockAfter('A config of three lines works', 'yaml');
    expect(config.trim().split('\n')).toHaveLength(3);
    const folder = tempDir('driftlight-readme-');
    const file = join(folder, 'driftlight.yaml');
    writeFileSync(file, config.replace('/data/fluorometer-exports', join(folder, 'inbox')));
    // The inbox must exist (an unmounted share is refused, not created).
    mkdirSync(join(folder, 'inbox'));
    const run = runDriftlight(['config', 'check', '--config', file]);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
  });

  it('the three-line config, run on the demo day with its control 30 % low, flags the control (issue 16.1)', () => {
    // Before issue 16.1 a config control got no rule (every built-in rule was scoped to a built-in
    // control), so this run raised nothing. The control emission is scaled by 0.7: Φ = 0.8 × 0.7 = 0.56
    // (relative yield is proportional to the integrated emission, Brouwer, Pure Appl. Chem. 83, 2213,
    // 2011), i.e. 8 SD below the config's target 0.8 ± 0.03 — a 1-3s rejection (Westgard rules, common practice).
    const config = blockAfter('A config of three lines works', 'yaml');
    const folder = tempDir('driftlight-readme-qc-');
    const inbox = join(folder, 'inbox');
    cpSync(join(REPO_ROOT, 'examples/day/inbox'), inbox, { recursive: true });
    const emission = join(inbox, 'run0314-a.csv');
    const scaled = readFileSync(emission, 'utf8')
      .split('\n')
      .map((line) =>
        /^\d+(\.\d+)?,[\d.]+$/.test(line)
          ? `${line.split(',')[0]},${(Number(line.split(',')[1]) * 0.7).toFixed(3)}`
          : line,
      )
      .join('\n');
    writeFileSync(emission, scaled);
    const file = join(folder, 'driftlight.yaml');
    writeFileSync(file, config.replace('/data/fluorometer-exports', inbox));
    const check = runDriftlight(['config', 'check', '--config', file]);
    expect(check.stdout).toMatch(
      /teal {2}match: sampleIdPattern \^CTRL-teal\n.*targets: controlQuantumYield 0\.8 ± 0\.03.*\n\s+judged by: yield-westgard/,
    );
    expect(check.stdout).not.toContain('warning:');
    runDriftlight(['process', '--config', file, inbox]);
    const resultsDir = join(folder, 'results');
    const controlFile = readdirSync(resultsDir, { recursive: true, encoding: 'utf8' }).find((name) =>
      /CTRL-teal-0314.*\.json$/.test(name),
    );
    expect(controlFile).toBeDefined();
    const result = JSON.parse(readFileSync(join(resultsDir, controlFile ?? ''), 'utf8')) as {
      quantumYield?: { value: number };
      qc: { flags: { rule: string; severity: string; message: string }[] };
    };
    expect(result.quantumYield?.value).toBeGreaterThan(0.5);
    expect(result.quantumYield?.value).toBeLessThan(0.6);
    const rejection = result.qc.flags.find((flag) => flag.rule === 'yield-westgard:1-3s');
    expect(rejection?.severity).toBe('critical');
    expect(rejection?.message).toMatch(/below target 0\.800/);
  });

  it('documents every exit code the CLI uses', () => {
    for (const { code } of Object.values(EXIT_CODES)) {
      expect(readme).toMatch(new RegExp(`\\n\\| ${code} \\| `));
    }
  });
});
