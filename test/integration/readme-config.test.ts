// The README's own config, run as a new lab would: the config block it tells a user to save and the
// "First run, step by step" lines are read from README.md itself (not copied here), written into a
// temporary folder and followed in order on the demo day the project's generator makes. The only
// change is the inbox path (/data/fluorometer-exports → a temporary folder); the `watch` line is the
// long-running service and is covered by the watch tests. Checked: the exit codes the README gives,
// rejected inputs on stderr as it says, every control of the config judged (qc.judgement, ledger runs
// and verdicts), every result valid against schemas/result.schema.json, and `config check` on
// examples/day before any run.
import { mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv } from 'ajv';
import { parse as parseYaml } from 'yaml';
import { describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../src/analysis/result.js';
import { resolveConfig } from '../../src/config/index.js';
import { generateDemoDay } from '../../src/demo/scenario.js';
import { openLedger } from '../../src/store/ledger.js';
import { observationHistory } from '../../src/store/qc-store.js';
import { REPO_ROOT, runDriftlight } from '../helpers/cli.js';
import { tempDir } from '../helpers/temp-dir.js';

const readme = readFileSync(join(REPO_ROOT, 'README.md'), 'utf8');
const schema = JSON.parse(readFileSync(join(REPO_ROOT, 'schemas/result.schema.json'), 'utf8')) as object;
const validate = new Ajv({ allErrors: true, strict: false }).compile(schema);
const README_INBOX = '/data/fluorometer-exports';

/** The fenced block of `language` after the first line containing `marker`. */
function blockAfter(marker: string, language: string): string {
  const at = readme.indexOf(marker);
  expect(at, `README has "${marker}"`).toBeGreaterThanOrEqual(0);
  const open = readme.indexOf('```' + language + '\n', at);
  return readme.slice(open + language.length + 4, readme.indexOf('\n```', open + 3));
}

/** A shell line's words without its comment (the README's steps use no quoting). */
function words(line: string): string[] {
  return line.replace(/#.*$/, '').trim().split(/\s+/).filter(Boolean);
}

function jsonFilesUnder(dir: string): string[] {
  return readdirSync(dir, { recursive: true, encoding: 'utf8' })
    .filter((name) => name.endsWith('.json') && !name.startsWith('digest'))
    .map((name) => join(dir, name));
}

describe('README: the config a new lab writes, run step by step', () => {
  it('follows "First run, step by step" on the demo day: exit codes, rejections, every control judged', () => {
    const folder = tempDir('driftlight-readme-run-');
    const inbox = join(folder, 'inbox');
    const config = blockAfter('A config of three lines works', 'yaml');
    writeFileSync(join(folder, 'driftlight.yaml'), config.replaceAll(README_INBOX, inbox));
    const steps = blockAfter('First run, step by step', 'sh')
      .split('\n')
      .map((line) => words(line.replaceAll(README_INBOX, inbox)))
      .filter((line) => line.length > 0);
    expect(steps.map((line) => line.slice(0, 3).join(' '))).toEqual([
      `mkdir -p ${inbox}`,
      'npx driftlight config',
      'npx driftlight process',
      'npx driftlight status',
      'npx driftlight watch',
    ]);
    const cli = (line: readonly string[]) => runDriftlight(line.slice(2), { cwd: folder, timeoutMs: 300_000 });

    // 1. mkdir -p the inbox, as the README says; then the instrument (the demo generator) exports into it.
    mkdirSync(steps[0]?.[2] ?? '', { recursive: true });
    const day = generateDemoDay();
    for (const file of day.files) writeFileSync(join(inbox, file.name), file.content);

    // 2. config check: exit 0; folders the first run creates are marked so.
    const check = cli(steps[1] ?? []);
    expect(check.stderr).toBe('');
    expect(check.status).toBe(0);
    expect(check.stdout).toContain(`results    ${join(folder, 'results')}  (will be created by the first run)`);
    expect(check.stdout).not.toMatch(new RegExp(`inbox +${inbox}  \\(will be created`));

    // 3. process: the demo day holds one malformed export (orchid-03_em.csv, "12.5.3" on a data line,
    // src/demo/scenario.ts), so exit 3 with that file on stderr as FILE:LINE: CODE: message and a hint.
    const run = cli(steps[2] ?? []);
    expect(run.status, run.stderr).toBe(3);
    expect(run.stderr).toMatch(/^orchid-03_em\.csv:\d+: NON_NUMERIC: .*12\.5\.3/m);
    expect(run.stderr).toMatch(/^ {2}hint: .*quarantined as /m);

    // 4. status: exit 0, the rejection among the last errors.
    const status = cli(steps[3] ?? []);
    expect(status.status, status.stderr).toBe(0);
    expect(status.stdout).toContain('orchid-03_em.csv: NON_NUMERIC');

    // Every result is schema-valid; every control the config defines is judged, in the result and the ledger.
    const results = jsonFilesUnder(join(folder, 'results')).map(
      (path) => JSON.parse(readFileSync(path, 'utf8')) as AnalysisResult,
    );
    expect(results.length).toBeGreaterThan(0);
    for (const result of results) expect(validate(result), JSON.stringify(validate.errors)).toBe(true);
    const controlIds = (parseYaml(config) as { controls: { id: string }[] }).controls.map((control) => control.id);
    expect(controlIds).toEqual(['teal']);
    const ledger = openLedger(join(folder, 'state'), { readonly: true });
    try {
      const runs = observationHistory(ledger);
      for (const id of controlIds) {
        const judged = results.filter((r) => r.qc.judgement?.control === id && r.qc.judgement.judged);
        expect(judged.length, `control ${id} judged in a result`).toBeGreaterThan(0);
        for (const result of judged) {
          expect(result.qc.judgement?.metrics).toContain('controlQuantumYield');
          expect(runs.some((o) => o.controlId === id && o.setId === result.setId)).toBe(true);
          const verdicts = ledger.database
            .prepare('SELECT COUNT(*) AS n FROM qc_verdicts WHERE set_id = ?')
            .get(result.setId) as { n: number };
          expect(verdicts.n, `verdicts of ${result.setId}`).toBeGreaterThan(0);
        }
      }
    } finally {
      ledger.close();
    }
  }, 900_000);

  it('examples/day: `config check` passes before any run, and a missing inbox is refused naming it', () => {
    const check = runDriftlight(['config', 'check', '--config', join(REPO_ROOT, 'examples/day/driftlight.yaml')]);
    expect(check.stderr).toBe('');
    expect(check.status).toBe(0);
    const folder = tempDir('driftlight-readme-noinbox-');
    writeFileSync(
      join(folder, 'driftlight.yaml'),
      blockAfter('A config of three lines works', 'yaml').replaceAll(README_INBOX, join(folder, 'inbox')),
    );
    const missing = runDriftlight(['config', 'check', '--config', join(folder, 'driftlight.yaml')]);
    expect(missing.status).toBe(2);
    expect(missing.stderr).toContain('FOLDER_MISSING: folders.inbox');
    expect(missing.stderr).toContain('mkdir');
  }, 300_000);

  it('every config block in the README is a valid config', () => {
    const blocks = [...readme.matchAll(/```yaml\n([\s\S]*?)\n```/g)].map((m) => m[1] ?? '');
    expect(blocks.length).toBeGreaterThanOrEqual(2);
    for (const block of blocks) expect(() => resolveConfig(parseYaml(block), { baseDir: '/lab' }), block).not.toThrow();
  });
});
