// `driftlight inspect FILE...`: reads each file with the formats module and prints what was found
// (kind, points, axis and value ranges, layout, metadata) for every measurement the file holds, as
// text or one JSON line per measurement. `--explain` adds how each line, column and header key was
// read and, for a refused or ambiguous file, a formats profile that reads it.
import { readFile, stat } from 'node:fs/promises';
import { InvalidArgumentError, type Command } from 'commander';
import type { CommandModule } from './command-module.js';
import { EXIT_CODES, exitCodesHelp } from './exit-codes.js';
import { reportError } from './report-error.js';
import { InputRejected } from '../model/errors.js';
import {
  DEFAULT_MAX_BYTES,
  explainData,
  readMeasurements,
  type Explanation,
  type FormatProfile,
  type ParsedData,
} from '../formats/index.js';
import { loadConfig } from '../config/index.js';
import { withConfigOption } from './config-option.js';
import { itemAt } from '../model/item-at.js';

interface InspectFlags {
  readonly json?: boolean;
  readonly explain?: boolean;
  readonly config?: string;
  readonly maxBytes: number;
  /** Instrument profiles (config formats.profiles); loaded from --config by the command. */
  readonly profiles?: readonly FormatProfile[];
}

/** Summary of one parsed file, the --json line. */
export interface InspectSummary {
  readonly file: string;
  /** The measurement's id: the file name, with "#column" when the file holds several. */
  readonly id: string;
  readonly type: 'spectrum' | 'decay';
  readonly kind: string;
  readonly points: number;
  readonly axis: { readonly unit: 'nm' | 'ns'; readonly min: number; readonly max: number };
  readonly values: { readonly unit: string; readonly column: string; readonly min: number; readonly max: number };
  readonly metadata: object;
  readonly layout: ParsedData['layout'];
}

function range(values: ArrayLike<number>): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const value = itemAt(values, i);
    if (value < min) min = value;
    if (value > max) max = value;
  }
  return { min, max };
}

/** Builds the summary of a parsed file (axis in nm or ns, value range, metadata, layout). */
export function summarise(file: string, data: ParsedData): InspectSummary {
  if (data.type === 'spectrum') {
    const { spectrum } = data;
    return {
      file,
      id: data.id,
      type: 'spectrum',
      kind: spectrum.kind,
      points: spectrum.wavelengthNm.length,
      axis: { unit: 'nm', ...range(spectrum.wavelengthNm) },
      values: { unit: spectrum.valueUnit, column: spectrum.valueColumn, ...range(spectrum.values) },
      metadata: spectrum.metadata,
      layout: data.layout,
    };
  }
  const { decay } = data;
  return {
    file,
    id: data.id,
    type: 'decay',
    kind: 'decay',
    points: decay.timeNs.length,
    axis: { unit: 'ns', ...range(decay.timeNs) },
    values: { unit: 'counts', column: data.layout.valueColumn, ...range(decay.counts) },
    metadata: { ...decay.metadata, channelWidthNs: decay.channelWidthNs, irfColumn: data.layout.irfColumn },
    layout: data.layout,
  };
}

/** The human-readable block for one file. */
export function formatSummary(summary: InspectSummary): string {
  const { layout } = summary;
  const delimiter =
    layout.delimiter === null
      ? ''
      : `; delimiter ${layout.delimiter === '\t' ? 'tab' : layout.delimiter === 'whitespace' ? 'spaces' : `"${layout.delimiter}"`}`;
  const metadata = Object.entries(summary.metadata as Record<string, unknown>).flatMap(([key, value]) =>
    key === 'extra'
      ? Object.entries(value as Record<string, string>).map(([k, v]) => `extra["${k}"]=${v}`)
      : [`${key}=${String(value)}`],
  );
  const lines = [
    summary.id === summary.file ? summary.file : `${summary.file}  [measurement ${summary.id}]`,
    `  kind        ${summary.type === 'decay' ? 'decay histogram' : `${summary.kind} spectrum`}`,
    `  points      ${summary.points}`,
    `  axis        ${shortNumber(summary.axis.min)} … ${shortNumber(summary.axis.max)} ${summary.axis.unit} (file column "${layout.axisColumn}"${layout.axisUnitFound === null ? '' : `, unit as found: ${layout.axisUnitFound}`})`,
    `  values      ${shortNumber(summary.values.min)} … ${shortNumber(summary.values.max)} ${summary.values.unit} (column "${summary.values.column}")`,
    `  layout      ${layout.format}${delimiter}; decimal "${layout.decimalMark}"; ${layout.headerLineCount} header line(s); ${layout.encoding}${layout.hasBom ? ' with BOM' : ''}; line ends ${layout.lineEnding}`,
    `  columns     ${layout.columnNames.join(' | ')}${layout.ignoredColumns.length > 0 ? ` (not used: ${layout.ignoredColumns.join(', ')})` : ''}`,
    ...(layout.jcamp === undefined
      ? []
      : [
          `  jcamp-dx    version ${layout.jcamp.version}; ${layout.jcamp.table}; ${layout.jcamp.compression.join(', ')}`,
        ]),
    ...layout.conversions.map(
      (conversion, index) =>
        `  ${index === 0 ? 'converted  ' : '           '} ${conversion.code}: ${conversion.detail}`,
    ),
    `  metadata    ${metadata.length === 0 ? '(none)' : metadata.join('; ')}`,
  ];
  return `${lines.join('\n')}\n`;
}

/** Inspects each file in turn; returns the exit code (0 all read, 2 a file could not be opened, 3 one or more rejected, 1 internal). */
export async function inspectFiles(
  files: readonly string[],
  flags: InspectFlags,
  stdout: NodeJS.WritableStream,
  stderr: NodeJS.WritableStream,
): Promise<number> {
  let rejected = false;
  let unreadable = false;
  let internal = false;
  for (const file of files) {
    let content: Uint8Array;
    try {
      const info = await stat(file);
      if (!info.isFile()) throw new Error('not a regular file');
      if (info.size > flags.maxBytes) {
        throw new InputRejected(
          'FILE_TOO_LARGE',
          `the file has ${info.size} bytes, over the limit of ${flags.maxBytes} bytes`,
          { file },
        );
      }
      content = await readFile(file);
    } catch (error) {
      if (error instanceof InputRejected) {
        stderr.write(`${error.toUserLine()}\n  hint: ${error.hint}\n`);
        rejected = true;
      } else {
        const reason = error instanceof Error ? error.message : String(error);
        stderr.write(`${file}: cannot open: ${reason}\n  hint: check the path and the file permissions.\n`);
        unreadable = true;
      }
      continue;
    }
    const options = {
      fileName: file,
      maxBytes: flags.maxBytes,
      ...(flags.profiles === undefined ? {} : { profiles: flags.profiles }),
    };
    try {
      try {
        for (const data of readMeasurements(content, options)) {
          const summary = summarise(file, data);
          stdout.write(flags.json === true ? `${JSON.stringify(summary)}\n` : formatSummary(summary));
        }
      } finally {
        if (flags.explain === true) {
          const explanation = explainData(content, options);
          stdout.write(
            flags.json === true ? `${JSON.stringify({ explain: explanation })}\n` : formatExplanation(explanation),
          );
        }
      }
    } catch (error) {
      if (error instanceof InputRejected) {
        stderr.write(`${error.toUserLine()}\n  hint: ${error.hint}\n`);
        rejected = true;
      } else {
        reportError(error, stderr);
        internal = true;
      }
    }
  }
  if (internal) return EXIT_CODES.internal.code;
  if (unreadable) return EXIT_CODES.usage.code;
  return rejected ? EXIT_CODES.rejected.code : EXIT_CODES.ok.code;
}

/** The human-readable --explain block: lines, columns, keys, outcome and a profile when one is offered. */
export function formatExplanation(explanation: Explanation): string {
  const out = [`${explanation.file}: how it was read`];
  const section = (title: string, items: Explanation['lines']) => {
    if (items.length === 0) return;
    out.push(`  ${title}`);
    for (const item of items)
      out.push(
        `    ${item.where.padEnd(12)} ${JSON.stringify(item.text.length > 60 ? `${item.text.slice(0, 57)}...` : item.text)} → ${item.readAs}`,
      );
  };
  section('lines', explanation.lines);
  section('columns', explanation.columns);
  section('header keys', explanation.keys);
  const outcome = explanation.outcome;
  if ('read' in outcome) out.push(`  outcome      read: ${outcome.read.join(', ')}`);
  else
    out.push(
      `  outcome      refused ${outcome.refused.code}${outcome.refused.line === undefined ? '' : ` at line ${outcome.refused.line}`}: ${outcome.refused.message}`,
      `               hint: ${outcome.refused.hint}`,
    );
  if (explanation.ambiguity !== null) out.push(`  why a profile: ${explanation.ambiguity}`);
  if (explanation.profile !== null) {
    out.push(`  profile (${explanation.profile.note}):`);
    for (const line of explanation.profile.yaml.trimEnd().split('\n')) out.push(`    ${line}`);
  } else if (explanation.ambiguity !== null)
    out.push('  no profile offered: the layout cannot be declared by a profile (see the hint)');
  return `${out.join('\n')}\n`;
}

function parseMaxBytes(text: string): number {
  const value = Number(text);
  if (!/^\d+$/.test(text.trim()) || !Number.isSafeInteger(value) || value <= 0) {
    throw new InvalidArgumentError('expected a positive whole number of bytes');
  }
  return value;
}

/** A number for the text report: at most 8 significant digits, so 0.030000000000000002 reads 0.03 (--json keeps full precision). */
function shortNumber(value: number): string {
  return String(Number(value.toPrecision(8)));
}

export const inspectCommand: CommandModule = {
  register(program: Command): void {
    const command = program
      .command('inspect')
      .description(
        'Read data files (delimited text, JCAMP-DX, driftlight JSON) and show what driftlight finds: kind, points, axis and value ranges, layout and metadata.',
      )
      .argument('<files...>', 'data files to read')
      .option('--json', 'print one JSON object per line per measurement instead of text')
      .option(
        '--explain',
        'show how each line, column and header key was read; for a refused or ambiguous file, print a formats profile that reads it',
      )
      .option('--max-bytes <n>', 'largest accepted file in bytes', parseMaxBytes, DEFAULT_MAX_BYTES)
      .addHelpText('after', `\nRejected files are reported on stderr as FILE:LINE: CODE: message.\n${exitCodesHelp()}`)
      .action(async (files: string[], flags: InspectFlags) => {
        // Profiles come from the config only when one is named, so inspect needs no config otherwise.
        const profiles = flags.config === undefined ? undefined : loadConfig(flags.config).formats.profiles;
        process.exitCode = await inspectFiles(
          files,
          { ...flags, ...(profiles === undefined ? {} : { profiles }) },
          process.stdout,
          process.stderr,
        );
      });
    withConfigOption(command);
  },
};
