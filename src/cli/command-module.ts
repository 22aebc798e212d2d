// The shape of one CLI command: a file under src/cli/ exports a CommandModule; commands.ts lists them.
import type { Command } from 'commander';

export interface CommandModule {
  /** Adds the command (with its options and action) to the program via `program.command(...)`. */
  register(program: Command): void;
}
