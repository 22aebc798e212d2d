// `process` on a user's folder leaves their files alone (issue 20, item 5): files outside the
// configured inbox are copied and the copies analysed and archived; the originals stay where they
// were, byte for byte, and the summary says so and where the results went. `--move` moves them.
import { existsSync, mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runDriftlight } from '../helpers/cli.js';
import { tempDir } from '../helpers/temp-dir.js';
import { generateSet, listFiles, makeWorkspace, readResults, removeWorkspaces } from './pipeline-helpers.js';

afterAll(removeWorkspaces);

describe('process on a folder outside the inbox', () => {
  it('copies by default: originals untouched, one result, summary says where things went', () => {
    const dir = makeWorkspace();
    const user = tempDir('dl-user-');
    const set = generateSet('adhoc-01', 21);
    mkdirSync(join(user, 'monday'));
    for (const f of set.files) writeFileSync(join(user, 'monday', f.name), f.content);
    const run = runDriftlight(['process', user, '--config', join(dir, 'driftlight.yaml')], { cwd: user });
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('originals:  left in place');
    expect(run.stdout).toContain(`results:    ${join(dir, 'results')}`);
    for (const f of set.files) expect(readFileSync(join(user, 'monday', f.name), 'utf8')).toBe(f.content);
    // Nothing was created in the user's folder (or the current directory).
    expect(readdirSync(user)).toEqual(['monday']);
    expect(readResults(dir).map((r) => r.result.sampleId)).toEqual(['adhoc-01']);
    expect(
      listFiles(join(dir, 'archive'))
        .map((p) => p.split('/').pop())
        .sort(),
    ).toEqual(set.files.map((f) => f.name).sort());
    // The staging copies are gone once archived.
    expect(listFiles(join(dir, 'state', 'process-staging'))).toEqual([]);
  });

  it('--move moves the originals on request', () => {
    const dir = makeWorkspace();
    const user = tempDir('dl-user-move-');
    const set = generateSet('adhoc-02', 22);
    for (const f of set.files) writeFileSync(join(user, f.name), f.content);
    const run = runDriftlight(['process', user, '--move', '--config', join(dir, 'driftlight.yaml')], { cwd: user });
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('originals:  moved (--move)');
    expect(readdirSync(user)).toEqual([]);
    expect(readResults(dir)).toHaveLength(1);
    expect(existsSync(join(user, 'archive'))).toBe(false);
  });
});
