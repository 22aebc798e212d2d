// A set that borrows a file from a set being committed at that moment: the commit has moved the file
// to the archive but not yet recorded where (the record follows the folder's fsync). Building the
// borrowing set's payload must find the moved copy, not fail the set with INPUT_MISSING.
import { createHash } from 'node:crypto';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { buildPayload } from '../../../src/pipeline/dispatch.js';
import { archiveFolderOf } from '../../../src/pipeline/intake.js';
import { openLedger } from '../../../src/store/ledger.js';
import { insertAssembledFile, setFilesOfSetState, type FileFacts } from '../../../src/store/files.js';
import { insertPairing, insertSet, markSetDone } from '../../../src/store/sets.js';
import { tempDir } from '../../helpers/temp-dir.js';

const sha256 = (text: string): string => createHash('sha256').update(text).digest('hex');
const facts = (part: string, dataType: FileFacts['dataType']): FileFacts => ({
  dataType,
  part,
  role: part === 'irf' ? 'irf' : 'sample',
  sampleId: part === 'irf' ? 'irf-monday' : 'dye-1',
  acquiredAt: null,
  excitationNm: null,
  solvent: null,
  hasIrfColumn: false,
});

describe('buildPayload and a borrowed file in the middle of its move', () => {
  it('reads the moved copy from the archive when the recorded path is gone, and still reports a file gone from everywhere as INPUT_MISSING', () => {
    const dir = tempDir('dl-dispatch-');
    const config = resolveConfig({}, { baseDir: dir });
    for (const folder of Object.values(config.folders)) mkdirSync(folder, { recursive: true });
    const ledger = openLedger(config.folders.state);
    const now = new Date('2026-03-14T10:00:00Z');
    const irfText = '# kind: irf\ntime (ns),counts\n0,1\n0.1,5\n0.2,1\n';
    const decayText = '# kind: decay\ntime (ns),counts\n0,10\n0.1,50\n0.2,40\n';
    insertSet(ledger, {
      id: 'irf-monday-aaaa',
      sampleId: 'irf-monday',
      role: 'irf',
      source: 'pattern',
      createdAt: now,
      deadlineAt: now,
    });
    const irfId = insertAssembledFile(
      ledger,
      {
        sha256: sha256(irfText),
        path: join(config.folders.inbox, 'irf.csv'),
        name: 'irf.csv',
        sizeBytes: irfText.length,
      },
      facts('irf', 'decay'),
      'irf-monday-aaaa',
      now,
    );
    markSetDone(ledger, 'irf-monday-aaaa', join(config.folders.results, 'irf.json'), false, now);
    setFilesOfSetState(ledger, 'irf-monday-aaaa', 'done', now);
    insertSet(ledger, {
      id: 'dye-1-bbbb',
      sampleId: 'dye-1',
      role: 'sample',
      source: 'pattern',
      createdAt: now,
      deadlineAt: now,
    });
    insertAssembledFile(
      ledger,
      {
        sha256: sha256(decayText),
        path: join(config.folders.inbox, 'dye-1_decay.csv'),
        name: 'dye-1_decay.csv',
        sizeBytes: decayText.length,
      },
      facts('decay', 'decay'),
      'dye-1-bbbb',
      now,
    );
    writeFileSync(join(config.folders.inbox, 'dye-1_decay.csv'), decayText);
    insertPairing(ledger, { setId: 'dye-1-bbbb', part: 'irf', fileId: irfId, fromSetId: 'irf-monday-aaaa' });
    const context = {
      ledger,
      config,
      configHash: '0'.repeat(64),
      softwareVersion: '0',
      now,
      rules: {
        fileNamePatterns: [],
        referencePatterns: [],
        controlPatterns: [],
        requiredParts: [],
        referenceRequiredParts: [],
        setTimeoutMs: 0,
      },
    };

    // The IRF is neither where it was seen nor anywhere recorded.
    expect(() => buildPayload(context, 'dye-1-bbbb')).toThrow(expect.objectContaining({ code: 'INPUT_MISSING' }));
    // The commit has moved it (a same-named file of other content took the name first, as happens).
    const archive = archiveFolderOf(config, { firstSeenAt: now.toISOString() });
    mkdirSync(archive, { recursive: true });
    writeFileSync(join(archive, 'irf.csv'), "# another day's IRF\n");
    writeFileSync(join(archive, 'irf~1.csv'), irfText);
    const payload = buildPayload(context, 'dye-1-bbbb');
    expect(payload.files.find((f) => f.part === 'irf')).toMatchObject({
      name: 'irf.csv',
      origin: 'paired',
      content: irfText,
      sha256: sha256(irfText),
    });
    ledger.close();
  });
});
