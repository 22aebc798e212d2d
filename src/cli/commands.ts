// The command table: one row per command file. Add a command by adding a file and a row.
import type { CommandModule } from './command-module.js';
import { configCommand } from './config.js';
import { demoCommand } from './demo.js';
import { reprocessCommand } from './reprocess.js';
import { processCommand } from './process.js';
import { statusCommand } from './status.js';
import { watchCommand } from './watch.js';
import { workerCommand } from './worker.js';
import { correctCommand } from './correct.js';
import { yieldCommand } from './yield.js';
import { ratesCommand } from './rates.js';
import { quenchCommand } from './quench.js';
import { inspectCommand } from './inspect.js';
import { rulesCommand } from './rules.js';
import { fitDecayCommand } from './fit-decay.js';
import { chartCommand } from './chart.js';
import { exportCommand } from './export.js';
import { digestCommand } from './digest.js';
import { serveCommand } from './serve.js';

export const COMMANDS: readonly CommandModule[] = [
  watchCommand,
  processCommand,
  statusCommand,
  configCommand,
  demoCommand,
  reprocessCommand,
  workerCommand,
  correctCommand,
  yieldCommand,
  ratesCommand,
  quenchCommand,
  inspectCommand,
  rulesCommand,
  fitDecayCommand,
  chartCommand,
  exportCommand,
  digestCommand,
  serveCommand,
];
