// Runs every benchmark scenario in bench/ (or the ones named on the command line), each in its own
// Node process so peak memory is measured per scenario. Each scenario prints JSON lines to stdout.
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const benchDir = fileURLToPath(new URL('.', import.meta.url));
const requested = process.argv.slice(2);
const scenarios = readdirSync(benchDir)
  .filter((name) => name.endsWith('.js') && name !== 'run.js')
  .map((name) => name.slice(0, -3))
  .filter((name) => requested.length === 0 || requested.includes(name))
  .sort();

let failed = 0;
for (const scenario of scenarios) {
  const run = spawnSync(process.execPath, ['--expose-gc', `${benchDir}${scenario}.js`], { stdio: 'inherit' });
  if (run.status !== 0) {
    failed += 1;
    process.stdout.write(`${JSON.stringify({ bench: scenario, error: `exited with ${run.status ?? run.signal}` })}\n`);
  }
}
process.exitCode = failed === 0 ? 0 : 1;
