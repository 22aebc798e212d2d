// `driftlight quench SERIES.csv`: Stern–Volmer analysis of a quenching series in driftlight's quench-series
// CSV layout (docs/photophysics.md): `# key: value` lines, a header row, one row per quencher concentration.
import { readFileSync } from 'node:fs';
import type { Command } from 'commander';
import { InputRejected } from '../model/errors.js';
import { readConcentrationName } from '../formats/index.js';
import { sternVolmer, type QuenchSeriesInput } from '../photophysics/index.js';
import type { CommandModule } from './command-module.js';
import { finiteNumber, toJson } from './correct.js';

/** Column aliases after normalisation (lower case, non-alphanumerics → '_'). */
const COLUMNS = {
  concentration: ['quencher_m', 'concentration_m', 'q_m', 'quencher'],
  ratio: ['f0_over_f', 'f0_f'],
  intensity: ['intensity', 'f'],
  ratioUncertainty: ['f0_over_f_uncertainty', 'u_f0_f', 'u_f0_over_f'],
  lifetime: ['tau_ns', 'lifetime_ns'],
} as const;

function normalize(name: string): string {
  return name
    .trim()
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '');
}

interface ParsedSeries {
  readonly columns: Partial<Record<keyof typeof COLUMNS, number[]>>;
  readonly metadata: Readonly<Record<string, string>>;
}

/** Parses the quench-series CSV (comma, semicolon, tab or whitespace separated); throws InputRejected with file:line. */
export function parseQuenchSeries(text: string, file: string): ParsedSeries {
  const metadata: Record<string, string> = {};
  let header: string[] | undefined;
  let rawHeader: string[] = [];
  const rows: { line: number; cells: string[] }[] = [];
  text.split(/\r\n|\n|\r/).forEach((raw, index) => {
    const line = raw.trim();
    if (line === '') return;
    if (line.startsWith('#')) {
      const match = /^#\s*([^:=]+?)\s*[:=]\s*(.*)$/.exec(line);
      if (match !== null) metadata[normalize(match[1] ?? '')] = (match[2] ?? '').trim();
      return;
    }
    // One separator per line (comma, semicolon or tab; else runs of spaces), so "[KI] (mM)" stays one name.
    const separator = /\t/.test(line) ? /\s*\t\s*/ : /;/.test(line) ? /\s*;\s*/ : /,/.test(line) ? /\s*,\s*/ : /\s+/;
    const cells = line.split(separator).filter((c) => c !== '');
    if (header === undefined) {
      rawHeader = cells;
      header = cells.map(normalize);
    } else rows.push({ line: index + 1, cells });
  });
  if (header === undefined || rows.length === 0)
    throw new InputRejected('NO_DATA', 'no header row and data rows found', { file });
  const names = header;
  const columns: Partial<Record<keyof typeof COLUMNS, number[]>> = {};
  for (const [role, aliases] of Object.entries(COLUMNS) as [keyof typeof COLUMNS, readonly string[]][]) {
    let index = names.findIndex((name) => aliases.includes(name));
    // A concentration column is also any name with a concentration unit: "[KI] (mM)", "acrylamide (µM)", "quencher_M".
    const concentration = role === 'concentration' ? rawHeader.map((name) => readConcentrationName(name)) : [];
    if (role === 'concentration' && index < 0) index = concentration.findIndex((reading) => reading !== undefined);
    if (index < 0) continue;
    const toMolar = concentration[index]?.toMolar ?? 1;
    columns[role] = rows.map(({ line, cells }) => {
      const value = Number(cells[index]);
      if (cells[index] === undefined || !Number.isFinite(value)) {
        throw new InputRejected('NON_NUMERIC', `column "${names[index]}" holds "${cells[index] ?? ''}"`, {
          file,
          line,
        });
      }
      return value * toMolar;
    });
  }
  if (columns.concentration === undefined) {
    throw new InputRejected(
      'MISSING_COLUMN',
      `no quencher concentration column (one of ${COLUMNS.concentration.join(', ')}, or a name with a unit M, mM, µM, nM such as "[KI] (mM)"); found ${rawHeader.join(', ')}`,
      { file, line: 1 },
    );
  }
  if (columns.ratio === undefined && columns.intensity === undefined) {
    throw new InputRejected('MISSING_COLUMN', `no F0/F (f0_over_f) or intensity column; found ${names.join(', ')}`, {
      file,
    });
  }
  return { columns, metadata };
}

interface QuenchCliOptions {
  readonly tau0Ns?: number;
  readonly solvent?: string;
  readonly viscosityMpas?: number;
  readonly temperatureK?: number;
  readonly json?: boolean;
}

function metadataNumber(metadata: Readonly<Record<string, string>>, key: string, file: string): number | undefined {
  const text = metadata[key];
  if (text === undefined) return undefined;
  const value = Number(text);
  if (!Number.isFinite(value))
    throw new InputRejected('METADATA_INVALID', `"# ${key}: ${text}" is not a number`, { file });
  return value;
}

function runQuench(path: string, options: QuenchCliOptions): void {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    throw new InputRejected('EMPTY_FILE', `cannot read ${path}: ${(error as Error).message}`, { file: path });
  }
  const { columns, metadata } = parseQuenchSeries(text, path);
  const tau0Ns = options.tau0Ns ?? metadataNumber(metadata, 'tau0_ns', path);
  const viscosityMpas = options.viscosityMpas ?? metadataNumber(metadata, 'viscosity_mpa_s', path);
  const temperatureK = options.temperatureK ?? metadataNumber(metadata, 'temperature_k', path);
  const solvent = options.solvent ?? metadata['solvent'];
  const input: QuenchSeriesInput = {
    concentrationsM: columns.concentration ?? [],
    ...(columns.ratio === undefined ? {} : { intensityRatios: columns.ratio }),
    ...(columns.ratio === undefined && columns.intensity !== undefined ? { intensities: columns.intensity } : {}),
    ...(columns.ratioUncertainty === undefined ? {} : { intensityRatioUncertainties: columns.ratioUncertainty }),
    ...(columns.lifetime === undefined ? {} : { lifetimesNs: columns.lifetime }),
    ...(tau0Ns === undefined ? {} : { tau0Ns }),
    ...(viscosityMpas === undefined ? {} : { viscosityPaS: viscosityMpas * 1e-3 }),
    ...(viscosityMpas === undefined && solvent !== undefined ? { solvent } : {}),
    ...(temperatureK === undefined ? {} : { options: { temperatureK } }),
  };
  let result;
  try {
    result = sternVolmer(input);
  } catch (error) {
    throw error instanceof InputRejected ? error.withLocation(path) : error;
  }
  if (options.json === true) {
    process.stdout.write(`${toJson({ file: path, ...result })}\n`);
    return;
  }
  const fmt = (v: number | undefined, digits = 4): string => (v === undefined ? 'n/a' : v.toPrecision(digits));
  const lines = [
    `K_SV = ${fmt(result.ksvPerM)} ± ${fmt(result.ksvStandardErrorPerM, 2)} M^-1 (intensities)`,
    ...(result.kdPerM === undefined
      ? []
      : [`K_D  = ${fmt(result.kdPerM)} ± ${fmt(result.kdStandardErrorPerM, 2)} M^-1 (lifetimes)`]),
    ...(result.ksPerM === undefined ? [] : [`K_S  = ${fmt(result.ksPerM)} M^-1 (static)`]),
    `k_q  = ${result.kqPerMPerS === undefined ? 'n/a' : `${result.kqPerMPerS.toExponential(3)} ± ${fmt(result.kqStandardUncertaintyPerMPerS, 2)} M^-1 s^-1`}`,
    `mechanism: ${result.mechanism}`,
    ...(result.diffusionLimitPerMPerS === undefined
      ? []
      : [`diffusion limit 8RT/3η = ${result.diffusionLimitPerMPerS.toExponential(3)} M^-1 s^-1`]),
    ...result.warnings.map((w) => `warning: ${w}`),
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
}

export const quenchCommand: CommandModule = {
  register(program: Command): void {
    program
      .command('quench')
      .description(
        'Stern–Volmer analysis of a quenching series: K_SV, k_q = K/τ0, static vs dynamic, diffusion-limit check.',
      )
      .argument(
        '<series>',
        'quench-series CSV: quencher_M, f0_over_f or intensity, optional f0_over_f_uncertainty and tau_ns',
      )
      .option(
        '--tau0-ns <ns>',
        'unquenched lifetime τ0 in ns (default: tau_ns at 0 M, or "# tau0_ns:" in the file)',
        finiteNumber,
      )
      .option('--solvent <name>', 'solvent for the viscosity table (default: "# solvent:" in the file)')
      .option('--viscosity-mpas <mPa·s>', 'solvent viscosity in mPa·s (overrides the table)', finiteNumber)
      .option('--temperature-k <K>', 'temperature in K for the diffusion limit (default 298.15)', finiteNumber)
      .option('--json', 'print the result as JSON')
      .action((path: string, options: QuenchCliOptions) => {
        runQuench(path, options);
      });
  },
};
