// `driftlight config check [--config F]` validates a config file; `driftlight config docs` prints
// the option table (the generated part of docs/configuration.md).
import type { Command } from 'commander';
import { configOptionsMarkdown } from '../config/options-table.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';

export const configCommand: CommandModule = {
  register(program: Command) {
    const config = program.command('config').description('check a config file or print the option reference');
    withConfigOption(config.command('check').description('validate the config (exit 2 with the bad path if invalid)')).action(
      (options: { config?: string }) => {
        const resolved = configFromOptions(options);
        process.stdout.write(
          `config OK: ${resolved.configFile ?? '(built-in defaults)'}\n` +
            Object.entries(resolved.folders).map(([k, v]) => `  ${k.padEnd(10)} ${v}`).join('\n') + '\n',
        );
      },
    );
    config.command('docs').description('print every option with its unit and default (Markdown)').action(() => {
      process.stdout.write(configOptionsMarkdown());
    });
  },
};
