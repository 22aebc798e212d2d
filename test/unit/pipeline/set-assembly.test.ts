// SetAssembly: a chunk of stable files becomes ledger records placed in open sets, in one
// transaction; a manifest claims listed files waiting in a plain set. Real files in a temp folder,
// a real ledger.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { ContentCache } from '../../../src/pipeline/content-cache.js';
import { RunReport } from '../../../src/pipeline/run-report.js';
import { assemblyRulesFrom, SetAssembly } from '../../../src/pipeline/set-assembly.js';
import { filesOfSet } from '../../../src/store/files.js';
import { openLedger, type Ledger } from '../../../src/store/ledger.js';
import { getSet } from '../../../src/store/sets.js';
import { generateIrf, generateSet } from '../../integration/pipeline-helpers.js';
import { tempDir } from '../../helpers/temp-dir.js';

const ledgers: Ledger[] = [];
afterEach(() => {
  for (const ledger of ledgers.splice(0)) ledger.close();
});

function setup(): { assembly: SetAssembly; ledger: Ledger; inbox: string; report: RunReport; contents: ContentCache } {
  const dir = tempDir('dl-set-assembly-');
  const config = resolveConfig(
    { assembly: { setTimeoutMs: 600_000 }, logging: { level: 'silent', stdout: 'off' } },
    { baseDir: dir },
  );
  mkdirSync(config.folders.inbox, { recursive: true });
  const ledger = openLedger(config.folders.state);
  ledgers.push(ledger);
  const report = new RunReport();
  const contents = new ContentCache();
  const assembly = new SetAssembly({
    config,
    ledger,
    logger: pino({ level: 'silent' }),
    rules: assemblyRulesFrom(config),
    contents,
    report,
  });
  return { assembly, ledger, inbox: config.folders.inbox, report, contents };
}

function drop(inbox: string, files: readonly { name: string; content: string }[]): string[] {
  return files.map((f) => {
    const path = join(inbox, f.name);
    writeFileSync(path, f.content);
    return path;
  });
}

describe('SetAssembly', () => {
  it('records the files of a chunk and places them in one open set, quarantining a bad file', () => {
    const { assembly, ledger, inbox, report, contents } = setup();
    const paths = drop(inbox, [
      ...generateSet('asm-one', 41).files,
      { name: 'asm-one_junk.csv', content: 'not,a\nmeasurement,at all\n' },
    ]);
    const { failed, touched } = assembly.intakeChunk(paths, new Date('2026-03-14T12:00:00Z'));
    expect(failed).toEqual([]);
    expect(touched).toHaveLength(1);
    const set = touched[0];
    expect(set?.sampleId).toBe('asm-one');
    expect(set?.files.map((f) => f.part).sort()).toEqual(['absorbance', 'decay', 'emission']);
    expect(assembly.size).toBe(1);
    expect(getSet(ledger, set?.id ?? '')?.state).toBe('open');
    expect(filesOfSet(ledger, set?.id ?? '').map((f) => f.state)).toEqual(['assembled', 'assembled', 'assembled']);
    expect(report.counts).toMatchObject({ filesAccepted: 3, filesRejected: 1 });
    expect(contents.sizeBytes).toBeGreaterThan(0); // bytes kept for the payload
  });

  it('moves files waiting in a plain set into the set of a manifest that lists them, and deletes the emptied sets', () => {
    const { assembly, ledger, inbox } = setup();
    const set = generateSet('asm-mf', 42, { nameStyle: 'opaque' });
    const now = new Date('2026-03-14T12:00:00Z');
    const first = assembly.intakeChunk(drop(inbox, set.files), now);
    // Opaque names and no sample id in the files: each file opens a plain set of its own.
    const plainIds = first.touched.map((s) => s.id);
    expect(plainIds).toHaveLength(3);
    const manifest = `sampleId: asm-mf-declared\nrole: sample\nfiles:\n${set.files.map((f) => `  - { file: ${f.name}, part: ${f.name.endsWith('-e.csv') ? 'emission' : f.name.endsWith('-a.csv') ? 'absorbance' : 'decay'} }`).join('\n')}\n`;
    const second = assembly.intakeChunk(drop(inbox, [{ name: 'asm-mf.set.yaml', content: manifest }]), now);
    expect(second.touched).toHaveLength(1);
    const manifestSet = second.touched[0];
    expect(manifestSet?.sampleId).toBe('asm-mf-declared');
    expect(manifestSet?.files).toHaveLength(3);
    expect(assembly.size).toBe(1);
    for (const id of plainIds) {
      expect(assembly.get(id)).toBeUndefined();
      expect(getSet(ledger, id)).toBeUndefined();
    }
    expect(filesOfSet(ledger, manifestSet?.id ?? '').filter((f) => f.dataType !== 'manifest')).toHaveLength(3);
  });

  it('orders open sets for dispatch: supporting sets first, samples last', () => {
    const { assembly, inbox } = setup();
    const now = new Date('2026-03-14T12:00:00Z');
    assembly.intakeChunk(drop(inbox, generateSet('asm-sample', 43).files), now);
    // An IRF file (role irf in its metadata) forms a stand-alone set.
    assembly.intakeChunk(drop(inbox, [generateIrf('scatter-irf.csv', 44, '2026-03-14T09:00:00Z')]), now);
    const order = assembly.inDispatchOrder();
    expect(order.map((s) => s.standalone)).toEqual([true, false]);
    expect(order[order.length - 1]?.sampleId).toBe('asm-sample');
  });
});
