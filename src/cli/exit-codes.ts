// Exit codes of every driftlight command, documented in `--help` and the README from this one table.
export const EXIT_CODES = {
  ok: { code: 0, meaning: 'all inputs read and processed' },
  internal: { code: 1, meaning: 'internal error (a bug; report it with the input)' },
  usage: { code: 2, meaning: 'usage error (unknown option, missing argument, invalid config)' },
  rejected: {
    code: 3,
    meaning:
      'one or more inputs rejected or not analysable (each on stderr as FILE:LINE: CODE: message), or left for the next run (process: not taken, not committed)',
  },
  attention: {
    code: 4,
    meaning:
      'process: every input processed, but QC flags are open (warning or critical) or alerts were not delivered (see `driftlight status`)',
  },
} as const;

/** The exit-code table as help text, one line per code. */
export function exitCodesHelp(): string {
  return ['Exit codes:', ...Object.values(EXIT_CODES).map((e) => `  ${e.code}  ${e.meaning}`)].join('\n');
}
