// The command table: one row per command file. Add a command by adding a file and a row.
import type { CommandModule } from './command-module.js';

export const COMMANDS: readonly CommandModule[] = [];
