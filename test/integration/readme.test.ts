// The README cannot drift: its example commands run against the real CLI, its three-line config
// validates, and its exit-code table matches the one the CLI prints.
import { readFileSync, writeFileSync } from 'node:fs';
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
  return line.replace(/#.*$/, '').trim().split(/\s+/).filter((word) => word.length > 0);
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
    const run = runDriftlight(['config', 'check', '--config', file]);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
  });

  it('documents every exit code the CLI uses', () => {
    for (const { code } of Object.values(EXIT_CODES)) {
      expect(readme).toMatch(new RegExp(`\\n\\| ${code} \\| `));
    }
  });
});
