// Writes the demo day to examples/day/ (inbox/, truth.json, driftlight.yaml). Run after a build:
// `node dist/src/demo/write-examples.js`. A test checks the committed files match the generator.
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generateDemoDay } from './scenario.js';

/** The examples/day folder of the repository. */
export const EXAMPLES_DAY_DIR = fileURLToPath(new URL('../../../examples/day/', import.meta.url));

/** Writes the generated demo day into `dir` (replacing its inbox). */
export function writeDemoDay(dir: string = EXAMPLES_DAY_DIR): void {
  const day = generateDemoDay();
  rmSync(join(dir, 'inbox'), { recursive: true, force: true });
  mkdirSync(join(dir, 'inbox'), { recursive: true });
  for (const file of day.files) writeFileSync(join(dir, 'inbox', file.name), file.content);
  writeFileSync(join(dir, 'truth.json'), `${JSON.stringify(day.truth, null, 2)}\n`);
  writeFileSync(join(dir, 'driftlight.yaml'), day.config);
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === process.argv[1]) writeDemoDay();
