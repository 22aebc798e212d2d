// `driftlight config check [--config F]` validates a config file; `driftlight config docs` prints
// the option table (the generated part of docs/configuration.md).
import { existsSync } from 'node:fs';
import type { Command } from 'commander';
import { configOptionsMarkdown } from '../config/options-table.js';
import { DriftlightError } from '../model/errors.js';
import { effectiveRuleSet } from '../pipeline/qc-rule-set.js';
import { missingFolders } from '../pipeline/runtime.js';
import { ruleSetWarnings } from '../qc/index.js';
import type { CommandModule } from './command-module.js';
import { formatControls } from './rules.js';
import { configFromOptions, withConfigOption } from './config-option.js';

export const configCommand: CommandModule = {
  register(program: Command) {
    const config = program.command('config').description('check a config file or print the option reference');
    withConfigOption(
      config.command('check').description('validate the config (exit 2 with the bad path if invalid)'),
    ).action((options: { config?: string }) => {
      const resolved = configFromOptions(options);
      const missing = missingFolders(resolved);
      if (missing.length > 0) {
        throw new DriftlightError(
          'FOLDER_MISSING',
          `${missing.join(' and ')} ${missing.length > 1 ? 'do' : 'does'} not exist: \`watch\` would refuse to start`,
          {
            file: resolved.configFile ?? '(defaults)',
            hint: 'The inbox (and a results folder named in the config) must exist: driftlight never creates them, so an unmounted share is not replaced by an empty folder. Mount the share or create the folder (mkdir), or fix folders.* in the config; the other folders are created by the first run.',
          },
        );
      }
      const ruleSet = effectiveRuleSet(resolved);
      const warnings = ruleSetWarnings(ruleSet);
      process.stdout.write(
        `config OK: ${resolved.configFile ?? '(built-in defaults)'}\n` +
          Object.entries(resolved.folders)
            .map(([k, v]) => `  ${k.padEnd(10)} ${v}${existsSync(v) ? '' : '  (will be created by the first run)'}`)
            .join('\n') +
          '\n' +
          `QC controls (rules from ${resolved.rules.file ?? 'the built-in rules/default.yaml'}, time zone ${ruleSet.timeZone}):\n` +
          formatControls(ruleSet).join('\n') +
          '\n' +
          warnings.map((warning) => `warning: ${warning}\n`).join(''),
      );
    });
    config
      .command('docs')
      .description('print every option with its unit and default (Markdown)')
      .action(() => {
        process.stdout.write(configOptionsMarkdown());
      });
  },
};
