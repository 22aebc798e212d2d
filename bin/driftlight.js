#!/usr/bin/env node
// driftlight command entry: runs the compiled CLI (built by `npm ci` through the `prepare` script).
import { existsSync } from 'node:fs';

const compiledMain = new URL('../dist/src/cli/main.js', import.meta.url);
if (!existsSync(compiledMain)) {
  process.stderr.write(
    'driftlight: the compiled program is missing (dist/src/cli/main.js).\n' +
      'hint: run `npm ci` (it builds automatically) or `npm run build` in the driftlight folder.\n',
  );
  process.exit(1);
}
const { runCli } = await import(compiledMain.href);
process.exitCode = await runCli(process.argv);
