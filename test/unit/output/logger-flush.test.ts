// The logger flushes before exit (issue 20, item 9): once `flushLogger` (and so Pipeline.close())
// has resolved, every line logged before it is in the log file, though the file stream writes
// asynchronously; a process that exits right then loses nothing.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import type { LoggingConfig } from '../../../src/config/sections/logging.js';
import { createLogger, flushLogger } from '../../../src/output/logger.js';
import { openPipeline } from '../../../src/pipeline/runtime.js';
import { tempDir } from '../../helpers/temp-dir.js';

const LINES = 5_000;
const LOGGING: LoggingConfig = { level: 'info', stdout: 'off', file: 'driftlight.log' };

function linesIn(path: string): string[] {
  return readFileSync(path, 'utf8')
    .split('\n')
    .filter((line) => line !== '');
}

describe('log flush', () => {
  it('flushLogger: every line is in the file once it resolves', async () => {
    const file = join(tempDir('dl-logflush-'), 'driftlight.log');
    const logger = createLogger(LOGGING, file);
    for (let i = 0; i < LINES; i++) logger.info({ i }, 'line');
    await flushLogger(logger);
    expect(linesIn(file)).toHaveLength(LINES);
  });

  it('Pipeline.close(): every line is in the file once it resolves', async () => {
    const dir = tempDir('dl-logflush-');
    const config = resolveConfig({ logging: { level: 'info', stdout: 'off' } }, { baseDir: dir });
    const pipeline = openPipeline(config, { softwareVersion: 'test' });
    for (let i = 0; i < LINES; i++) pipeline.logger.info({ i }, 'line');
    await pipeline.close();
    expect(linesIn(config.logFile).filter((line) => line.includes('"msg":"line"'))).toHaveLength(LINES);
  });
});
