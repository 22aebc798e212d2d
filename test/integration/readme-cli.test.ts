// The README's command reference cannot drift from the CLI: every command `driftlight --help` lists
// has a row in the README table and every row names a real command, and every option a row names
// (--name) is one that command's own `--help` prints.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { REPO_ROOT, runDriftlight } from '../helpers/cli.js';

const readme = readFileSync(join(REPO_ROOT, 'README.md'), 'utf8');

/** Rows of the README's command table: the command words and the options the row names. */
function readmeRows(): { words: string[]; options: string[] }[] {
  const start = readme.indexOf('## Command reference');
  expect(start, 'README has a "## Command reference" section').toBeGreaterThanOrEqual(0);
  const section = readme.slice(start, readme.indexOf('\n## ', start + 3));
  return section
    .split('\n')
    .filter((line) => line.startsWith('| `driftlight '))
    .map((line) => {
      const cell = line.slice(3, line.indexOf('` |')).replaceAll('\\|', '|');
      // The command and its subcommands: the leading lowercase words, up to the first argument or option.
      const words: string[] = [];
      for (const token of cell.replace(/^driftlight /, '').split(/\s+/)) {
        if (!/^[a-z][a-z-]*(\|[a-z-]+)*$/.test(token)) break;
        words.push(token);
      }
      return { words, options: [...cell.matchAll(/--[a-z][a-z-]*/g)].map((m) => m[0]) };
    });
}

/** Command names in a `--help` text's "Commands:" block. */
function helpCommands(help: string): string[] {
  const block = help.slice(help.indexOf('Commands:'));
  return [...block.matchAll(/^ {2}([a-z][a-z-]*)/gm)].map((m) => m[1] ?? '').filter((name) => name !== 'help');
}

describe('README command reference', () => {
  const rows = readmeRows();
  const top = runDriftlight(['--help']);

  it('lists exactly the commands `driftlight --help` lists', () => {
    expect(top.status).toBe(0);
    const fromHelp = new Set(helpCommands(top.stdout));
    const fromReadme = new Set(rows.map((row) => row.words[0] ?? ''));
    expect([...fromReadme].sort()).toEqual([...fromHelp].sort());
  });

  it.each(rows.map((row) => [row.words.join(' '), row] as const))(
    '`%s`: its subcommands and options exist in its --help',
    (_name, row) => {
      const [command, sub] = row.words;
      const subcommands = sub === undefined ? [] : sub.split('|');
      const help = runDriftlight([command ?? '', '--help']);
      expect(help.status).toBe(0);
      if (subcommands.length > 0) expect(helpCommands(help.stdout)).toEqual(expect.arrayContaining(subcommands));
      const texts = [help.stdout, ...subcommands.map((s) => runDriftlight([command ?? '', s, '--help']).stdout)].join(
        '\n',
      );
      for (const option of row.options) expect(texts, `${option} in ${row.words.join(' ')} --help`).toContain(option);
    },
  );
});
