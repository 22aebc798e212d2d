// driftlight CLI entry: builds the program from the command table, maps errors to exit codes.
import { Command, CommanderError } from 'commander';
import { COMMANDS } from './commands.js';
import { EXIT_CODES, exitCodesHelp } from './exit-codes.js';
import { reportError } from './report-error.js';
import { softwareVersion } from './version.js';

/** Builds the commander program with every command of the table registered. */
export function buildProgram(): Command {
  const program = new Command('driftlight')
    .description(
      'Unattended analysis of fluorescence spectra and TCSPC lifetimes: corrections, lifetimes, ' +
        'quantum yields, excited-state rate constants and control-dye QC.',
    )
    .version(softwareVersion(), '-V, --version')
    .exitOverride()
    .showHelpAfterError('(run with --help for usage)');
  program.addHelpText('after', `\n${exitCodesHelp()}`);
  for (const command of COMMANDS) command.register(program);
  return program;
}

const quietStreams = new WeakSet<NodeJS.WriteStream>();

/**
 * Ends the process quietly (exit 0) when the reader of standard output goes away (`driftlight … |
 * head`): what it did not read was not wanted, and an EPIPE stack trace would only be noise.
 */
export function endQuietlyOnClosedOutput(stream: NodeJS.WriteStream = process.stdout): void {
  if (quietStreams.has(stream)) return;
  quietStreams.add(stream);
  stream.on('error', (error: NodeJS.ErrnoException) => {
    if (error.code !== 'EPIPE') throw error;
    process.exit(EXIT_CODES.ok.code);
  });
}

/** Runs the CLI on `argv` and returns the exit code (never throws). */
export async function runCli(argv: readonly string[]): Promise<number> {
  process.exitCode = undefined;
  endQuietlyOnClosedOutput();
  try {
    await buildProgram().parseAsync([...argv], { from: 'node' });
    return typeof process.exitCode === 'number' ? process.exitCode : EXIT_CODES.ok.code;
  } catch (error) {
    if (error instanceof CommanderError) {
      const benign = ['commander.helpDisplayed', 'commander.version', 'commander.help'].includes(error.code);
      return benign ? EXIT_CODES.ok.code : EXIT_CODES.usage.code;
    }
    return reportError(error);
  }
}
