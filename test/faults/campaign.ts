// The fault campaign (issue 20): `driftlight watch` as a real process, killed with SIGKILL at seeded
// random moments and restarted, with storage outages (the results folder replaced by a file for a
// while), while sets arrive: plain sets, one in five declared by a manifest (written before or
// after its files), symbolic links to files outside the inbox (to be refused, never followed), slow
// writers (files appended in pieces, each pause shorter than the stability window), writers that
// hold the decay file open and pause for three stability windows halfway, and decay files rewritten
// at the same path with new bytes a moment after they were written. At the end one clean run drains
// everything, and the campaign counts what happened: every set must have exactly one result (lost
// 0, duplicated 0) computed from the final bytes of every input (stale 0), nothing may stay in the
// inbox or the ledger unfinished (stuck 0), every link must be quarantined and its target left alone.
import { spawnSync, type ChildProcess } from 'node:child_process';
import Database from 'better-sqlite3';
import {
  appendFileSync,
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readFileSync,
  symlinkSync,
  writeFileSync,
  writeSync,
} from 'node:fs';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import { createSeededRandom } from '../../src/decay/index.js';
import { blockFolder, unblockFolder } from '../helpers/blocked-folder.js';
import { CLI_PATH } from '../helpers/cli.js';
import {
  generateSet,
  listFiles,
  makeWorkspace,
  readResults,
  startWatch,
  stopWatch,
  waitFor,
  type GeneratedSet,
} from '../integration/pipeline-helpers.js';

export interface CampaignOptions {
  readonly sets: number;
  /** SIGKILL restarts while sets arrive. */
  readonly kills: number;
  /** Storage outages (results folder gone for `outageMs`). */
  readonly outages: number;
  readonly outageMs: number;
  readonly seed: number;
  /** Sets written per step (a step every 100 ms); by default spread so the sets arrive over the first 80 % of the fault schedule, each fault striking while sets still arrive. */
  readonly setsPerStep?: number;
  /** How long the final drain may take, in ms. */
  readonly drainTimeoutMs: number;
}

/** One row of the campaign table. */
export interface CampaignRow {
  readonly faultsInjected: number;
  readonly kills: number;
  readonly outages: number;
  readonly sets: number;
  readonly manifestSets: number;
  readonly slowWriterSets: number;
  /** Sets whose decay writer held the file open and paused for three stability windows halfway. */
  readonly pausedWriterSets: number;
  /** Sets whose decay file was rewritten at its path with new bytes after it was written. */
  readonly rewrittenSets: number;
  readonly symlinks: number;
  readonly results: number;
  readonly lost: number;
  readonly duplicated: number;
  readonly stuck: number;
  /** Results computed from bytes an input no longer has (a half-written or earlier version). */
  readonly stale: number;
  /** Runs of watch that ended on their own with an error (a refused restart, a crash), not by the campaign's kill or stop. */
  readonly unexpectedExits: number;
  /** Links not quarantined, or whose target was moved or changed. */
  readonly linksFollowed: number;
  readonly seconds: number;
}

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

interface PlannedSet {
  readonly set: GeneratedSet;
  readonly kind: 'plain' | 'manifest-first' | 'manifest-last' | 'slow' | 'paused' | 'rewritten';
  /** The final content of each file (a rewritten file's second version), by name. */
  readonly finalContent: Map<string, string>;
}

const sha256 = (text: string): string => createHash('sha256').update(text).digest('hex');
/** The campaign's stability window (ms): paused writers pause for three of them. */
const STABILITY_WINDOW_MS = 400;

function manifestText(set: GeneratedSet): string {
  const part = (name: string): string =>
    name.includes('-e.') ? 'emission' : name.includes('-a.') ? 'absorbance' : 'decay';
  return [
    `sampleId: ${set.sampleId}`,
    'role: sample',
    'files:',
    ...set.files.map((f) => `  - { file: ${f.name}, part: ${part(f.name)} }`),
    '',
  ].join('\n');
}

/**
 * What became of each lost set, for the report: its sets in the ledger (state, error, whether the
 * result file named there exists), its files (state, error code), and what of it is left in the
 * inbox or quarantine. One line per lost sample id.
 */
export function diagnoseLost(dir: string, sampleIds: readonly string[]): string[] {
  if (sampleIds.length === 0) return [];
  const db = new Database(join(dir, 'state', 'ledger.sqlite'), { readonly: true });
  try {
    const inbox = listFiles(join(dir, 'inbox'));
    const quarantine = listFiles(join(dir, 'quarantine'));
    return sampleIds.map((id) => {
      const sets = db.prepare('SELECT id, state, error_code, result_path FROM sets WHERE sample_id = ?').all(id) as {
        id: string;
        state: string;
        error_code: string | null;
        result_path: string | null;
      }[];
      const files = db
        .prepare(`SELECT name, state, error_code FROM files WHERE sample_id = ? OR name LIKE ? ORDER BY id`)
        .all(id, `${id}%`) as { name: string; state: string; error_code: string | null }[];
      const setText =
        sets
          .map(
            (s) =>
              `${s.id} ${s.state}${s.error_code === null ? '' : ` ${s.error_code}`}${s.result_path === null ? '' : existsSync(s.result_path) ? ' result present' : ' RESULT FILE MISSING'}`,
          )
          .join('; ') || 'no set';
      const fileText =
        files.map((f) => `${f.name} ${f.state}${f.error_code === null ? '' : ` ${f.error_code}`}`).join(', ') ||
        'no file recorded';
      const left = inbox.filter((p) => p.includes(id));
      const held = quarantine.filter((p) => p.includes(id) && !p.endsWith('.error.json'));
      return `${id}: sets [${setText}]; files [${fileText}]; inbox [${left.join(', ')}]; quarantine [${held.join(', ')}]`;
    });
  } finally {
    db.close();
  }
}

/** Runs the campaign in a fresh workspace and returns its row, what became of each lost set, and the workspace (for inspection). */
export async function runCampaign(
  options: CampaignOptions,
): Promise<{ row: CampaignRow; lostDetail: string[]; staleDetail: string[]; dir: string }> {
  const startedAt = Date.now();
  const dir = makeWorkspace('', { stabilityWindowMs: STABILITY_WINDOW_MS, setTimeoutMs: 600_000 });
  const inbox = join(dir, 'inbox');
  const results = join(dir, 'results');
  const outside = join(dir, 'outside');
  mkdirSync(outside);
  const random = createSeededRandom(options.seed);
  const planned: PlannedSet[] = Array.from({ length: options.sets }, (_u, i) => {
    const id = `camp-${String(i).padStart(4, '0')}`;
    const roll = i % 5;
    // One in five by manifest (alternately before and after its files), one in five slow, one in
    // ten with a paused writer, one in ten rewritten.
    const planned = (set: GeneratedSet, kind: PlannedSet['kind']): PlannedSet => ({
      set,
      kind,
      finalContent: new Map(set.files.map((f) => [f.name, f.content])),
    });
    if (roll === 1)
      return planned(
        generateSet(id, 5000 + i, { nameStyle: 'opaque' }),
        i % 10 === 1 ? 'manifest-first' : 'manifest-last',
      );
    if (roll === 3) return planned(generateSet(id, 5000 + i), 'slow');
    if (roll === 4) {
      const p = planned(generateSet(id, 5000 + i), i % 10 === 4 ? 'paused' : 'rewritten');
      if (p.kind === 'rewritten') {
        // Same sample and acquisition time, new bytes: a re-export, i.e. a new version of the file.
        const decayName = p.set.files.find((f) => f.name.includes('decay'))?.name ?? '';
        p.finalContent.set(
          decayName,
          generateSet(id, 105_000 + i).files.find((f) => f.name === decayName)?.content ?? '',
        );
      }
      return p;
    }
    return planned(generateSet(id, 5000 + i), 'plain');
  });
  const links: { link: string; target: string; content: string }[] = [];
  const slowWrites: Promise<void>[] = [];
  let next = 0;

  const writeSlowly = async (path: string, content: string): Promise<void> => {
    const pieces = 4;
    const size = Math.ceil(content.length / pieces);
    writeFileSync(path, content.slice(0, size));
    for (let p = 1; p < pieces; p++) {
      await sleep(40);
      appendFileSync(path, content.slice(p * size, (p + 1) * size));
    }
  };

  /** One open handle: the first half, a pause of three stability windows, the rest (the file stays open throughout). */
  const writePaused = async (path: string, content: string): Promise<void> => {
    const cut = content.lastIndexOf('\n', Math.floor(content.length / 2)) + 1;
    const fd = openSync(path, 'w');
    try {
      writeSync(fd, content.slice(0, cut));
      await sleep(3 * STABILITY_WINDOW_MS);
      writeSync(fd, content.slice(cut));
    } finally {
      closeSync(fd);
    }
  };

  /** Written whole, then rewritten in place with new bytes 1.5 to 3 s later. */
  const writeTwice = async (path: string, first: string, second: string, delayMs: number): Promise<void> => {
    writeFileSync(path, first);
    await sleep(delayMs);
    writeFileSync(path, second);
  };

  const writeSome = (count: number): void => {
    for (const { set, kind, finalContent } of planned.slice(next, next + count)) {
      if (kind === 'manifest-first') writeFileSync(join(inbox, `${set.sampleId}.set.yaml`), manifestText(set));
      for (const f of set.files) {
        const isDecay = f.name.includes('decay');
        if (kind === 'slow') slowWrites.push(writeSlowly(join(inbox, f.name), f.content));
        else if (kind === 'paused' && isDecay) slowWrites.push(writePaused(join(inbox, f.name), f.content));
        else if (kind === 'rewritten' && isDecay)
          slowWrites.push(
            writeTwice(
              join(inbox, f.name),
              f.content,
              finalContent.get(f.name) ?? '',
              1500 + Math.floor(random.nextUniform() * 1500),
            ),
          );
        else writeFileSync(join(inbox, f.name), f.content);
      }
      if (kind === 'manifest-last') writeFileSync(join(inbox, `${set.sampleId}.set.yaml`), manifestText(set));
      // One link in ten sets, to a file outside the inbox: refused, its target left alone.
      if (next % 10 === 7) {
        const target = join(outside, `${set.sampleId}-outside.csv`);
        const content = set.files[0]?.content ?? '';
        writeFileSync(target, content);
        const link = join(inbox, `${set.sampleId}-link.csv`);
        symlinkSync(target, link);
        links.push({ link, target, content });
      }
      next += 1;
    }
  };

  // Fault schedule: kills and outages at seeded moments while the sets arrive.
  const faults: ('kill' | 'outage')[] = [
    ...Array<'kill'>(options.kills).fill('kill'),
    ...Array<'outage'>(options.outages).fill('outage'),
  ];
  for (let i = faults.length - 1; i > 0; i--) {
    const j = Math.floor(random.nextUniform() * (i + 1));
    [faults[i], faults[j]] = [faults[j] as 'kill' | 'outage', faults[i] as 'kill' | 'outage'];
  }
  const waits = faults.map(() => 500 + Math.floor(random.nextUniform() * 2000));
  const steps = Math.max(1, Math.floor((0.8 * waits.reduce((a, b) => a + b, 0)) / 100));
  const setsPerStep = options.setsPerStep ?? Math.max(1, Math.ceil(planned.length / steps));
  // Every run's end: killed by the campaign, or exited on its own (a refused start, a crash).
  const runs: { killed: boolean; code: number | null; stderr: string }[] = [];
  const runOf = new Map<ChildProcess, { killed: boolean }>();
  const startRun = (): ChildProcess => {
    const run = { killed: false, code: null as number | null, stderr: '' };
    runs.push(run);
    const proc = startWatch(dir);
    proc.stderr?.on('data', (chunk: Buffer) => {
      run.stderr += chunk.toString();
    });
    proc.stdout?.resume();
    proc.once('exit', (code) => {
      run.code = code;
    });
    runOf.set(proc, run);
    return proc;
  };
  const logPath = join(dir, 'state', 'driftlight.log');
  const watchingLines = (): number =>
    existsSync(logPath) ? readFileSync(logPath, 'utf8').split('"msg":"watching"').length - 1 : 0;
  /** Writes sets every 100 ms for `ms`. */
  const arriveFor = async (ms: number): Promise<void> => {
    const started = Date.now();
    while (Date.now() - started < ms) {
      if (next < planned.length) writeSome(setsPerStep);
      await sleep(100);
    }
  };
  let readyCount = 1;
  let child: ChildProcess = startRun();
  for (const [index, fault] of faults.entries()) {
    // A fault strikes a run that is up (a loaded machine may take seconds to start one): sets
    // arrive, and the wait counts, from the moment the run reported it is watching (what a killed
    // run left unfinished is the restart's backlog).
    const target = readyCount;
    await waitFor(
      'the restarted watch to report it is watching',
      () => watchingLines() >= target || child.exitCode !== null,
      120_000,
      50,
    );
    await arriveFor(waits[index] ?? 0);
    if (fault === 'kill') {
      const run = runOf.get(child);
      if (child.exitCode === null && child.signalCode === null) {
        if (run !== undefined) run.killed = true;
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGKILL');
        await exited;
      }
      readyCount = watchingLines() + 1;
      child = startRun();
    } else {
      blockFolder(results);
      await sleep(options.outageMs);
      unblockFolder(results);
    }
  }
  while (next < planned.length) {
    writeSome(setsPerStep);
    await sleep(100);
  }
  await Promise.all(slowWrites);
  // Stop the last faulted run cleanly (it may have been started a moment ago) and drain in one clean run.
  await sleep(1000);
  await stopWatch(child);
  // Every own input of a result must be the final bytes of its file.
  const finalSha = new Map(
    planned.flatMap((p) => [...p.finalContent.entries()].map(([name, content]) => [name, sha256(content)] as const)),
  );
  const staleCount = (results: ReturnType<typeof readResults>): number =>
    results.filter((r) => {
      const inputs = (
        r.result['provenance'] as { inputs: { file: string; sha256: string; origin: string }[] }
      ).inputs.filter((i) => i.origin === 'own');
      return inputs.some((i) => finalSha.has(i.file) && finalSha.get(i.file) !== i.sha256);
    }).length;
  const before = watchingLines();
  const final = startRun();
  const expectedIds = new Set(planned.map((p) => p.set.sampleId));
  try {
    await waitFor('the final watch to start', () => watchingLines() > before, 60_000);
    // A running watch looks at archived copies for archiveRecheckMs (>= 5 s) of its running time
    // after their move: a writer that kept writing into a moved file is taken as a new version once
    // it is stable, so wait for that too and count as stale only what is still stale when the wait ends.
    await waitFor(
      'every set to have a result from its final bytes and the inbox to be empty',
      () => {
        const results = readResults(dir);
        const have = new Set(results.map((r) => r.result.sampleId));
        return (
          [...expectedIds].every((id) => have.has(id)) && listFiles(inbox).length === 0 && staleCount(results) === 0
        );
      },
      options.drainTimeoutMs,
      250,
    ).catch(() => undefined);
    await sleep(500);
  } finally {
    await stopWatch(final);
  }
  const found = readResults(dir);
  const bySample = new Map<string, number>();
  for (const r of found) bySample.set(r.result.sampleId, (bySample.get(r.result.sampleId) ?? 0) + 1);
  const lostIds = [...expectedIds].filter((id) => !bySample.has(id));
  const stale = staleCount(found);
  const kindOf = new Map(planned.map((p) => [p.set.sampleId, p.kind] as const));
  const staleDetail = found
    .filter((r) => staleCount([r]) > 0)
    .map((r) => `${r.result.sampleId} (${kindOf.get(r.result.sampleId) ?? 'unknown'})`);
  const lost = lostIds.length;
  // Extra results for a set, and results under a sample id no set has (invented ids).
  const duplicated = [...bySample.entries()].reduce(
    (n, [id, count]) => n + (expectedIds.has(id) ? count - 1 : count),
    0,
  );
  const status = spawnSync(process.execPath, [CLI_PATH, 'status', '--json', '--config', join(dir, 'driftlight.yaml')], {
    encoding: 'utf8',
  });
  const parsed = JSON.parse(status.stdout) as { sets: Record<string, number> };
  const unfinished = (parsed.sets['open'] ?? 0) + (parsed.sets['queued'] ?? 0);
  const stuck = listFiles(inbox).length + unfinished;
  const quarantined = new Set(listFiles(join(dir, 'quarantine')).map((p) => p.split('/').pop()));
  const linksFollowed = links.filter(({ link, target, content }) => {
    const name = link.split('/').pop() ?? '';
    return !quarantined.has(name) || !existsSync(target) || readFileSync(target, 'utf8') !== content;
  }).length;
  // Runs that ended on their own, other than the clean stops (exit 0): a refused restart or a crash.
  const unexpectedExits = runs.filter((r) => !r.killed && r.code !== null && r.code !== 0);
  const row: CampaignRow = {
    faultsInjected: faults.length,
    kills: options.kills,
    outages: options.outages,
    sets: planned.length,
    manifestSets: planned.filter((p) => p.kind.startsWith('manifest')).length,
    slowWriterSets: planned.filter((p) => p.kind === 'slow').length,
    pausedWriterSets: planned.filter((p) => p.kind === 'paused').length,
    rewrittenSets: planned.filter((p) => p.kind === 'rewritten').length,
    symlinks: links.length,
    results: found.length,
    lost,
    duplicated,
    stuck,
    stale,
    linksFollowed,
    unexpectedExits: unexpectedExits.length,
    seconds: Math.round((Date.now() - startedAt) / 1000),
  };
  writeFileSync(join(dir, 'campaign-runs.json'), JSON.stringify(runs, null, 1));
  const exitDetail = unexpectedExits.map(
    (r) => `watch exited with ${String(r.code)}: ${r.stderr.trim().split('\n').slice(0, 3).join(' | ')}`,
  );
  return { row, lostDetail: [...diagnoseLost(dir, lostIds), ...exitDetail], staleDetail, dir };
}

/** The row as a Markdown table (header + one line). */
export function campaignTable(row: CampaignRow): string {
  const keys = Object.keys(row) as (keyof CampaignRow)[];
  return [
    `| ${keys.join(' | ')} |`,
    `| ${keys.map(() => '---').join(' | ')} |`,
    `| ${keys.map((k) => String(row[k])).join(' | ')} |`,
  ].join('\n');
}
