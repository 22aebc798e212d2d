// The summary table for a spreadsheet or a LIMS: one row per set from its result JSON (sample, role,
// acquisition time, Φ ± u, τ ± u and fractions per component, mean τ, χ², k_r, k_nr, τ0, flags,
// what is missing and why, result path), as RFC 4180 CSV or JSON.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { AnalysisResult } from '../analysis/result.js';
import { RESULT_SCHEMA } from '../analysis/result.js';
import { acquisitionEpochMs } from '../model/acquisition-time.js';

export interface SummaryComponent {
  readonly tauNs: number;
  /** Standard error of τ in ns; null when the fit gave none. */
  readonly tauNsStdErr: number | null;
  readonly amplitudeFraction: number;
  readonly intensityFraction: number;
}

export interface SummaryRow {
  readonly setId: string;
  readonly sampleId: string;
  readonly role: string;
  readonly acquiredAt: string | null;
  readonly analyzedAt: string;
  readonly quantumYield: number | null;
  readonly quantumYieldStdUncertainty: number | null;
  readonly standardId: string | null;
  readonly components: readonly SummaryComponent[];
  readonly tauMeanIntensityNs: number | null;
  readonly chi2Reduced: number | null;
  readonly fitConverged: boolean | null;
  readonly krPerS: number | null;
  readonly knrPerS: number | null;
  readonly tau0Ns: number | null;
  readonly partial: boolean;
  /** QC and yield flags: "rule (severity)" and yield flags such as "above-one-within-uncertainty". */
  readonly flags: readonly string[];
  /** What could not be computed and why ("quantumYield: no reference measurement"). */
  readonly missing: readonly string[];
  /** Result JSON path relative to the results folder. */
  readonly resultPath: string;
}

/** One summary row from a result (no computation: the numbers are the result's own). */
export function summaryRowOf(result: AnalysisResult, resultPath: string): SummaryRow {
  const fit = result.decayFit;
  const qy = result.quantumYield;
  return {
    setId: result.setId,
    sampleId: result.sampleId,
    role: result.role,
    acquiredAt: result.acquiredAt ?? null,
    analyzedAt: result.provenance.analyzedAt,
    quantumYield: qy?.value ?? null,
    quantumYieldStdUncertainty: qy?.standardUncertainty ?? null,
    standardId: qy?.standardId ?? null,
    components: (fit?.components ?? []).map((c) => ({
      tauNs: c.tauNs,
      tauNsStdErr: c.tauNsStdErr ?? null,
      amplitudeFraction: c.amplitudeFraction,
      intensityFraction: c.intensityFraction,
    })),
    tauMeanIntensityNs: fit?.tauMeanIntensityNs ?? null,
    chi2Reduced: fit?.chi2Reduced ?? null,
    fitConverged: fit?.converged ?? null,
    krPerS: result.rates?.krPerS ?? null,
    knrPerS: result.rates?.knrPerS ?? null,
    tau0Ns: result.rates?.tau0Ns ?? null,
    partial: result.partial,
    flags: [
      ...result.qc.flags.map((flag) => `${flag.rule} (${flag.severity})`),
      ...(qy?.flags ?? []),
      ...(fit !== undefined && !fit.converged ? ['lifetime fit did not converge'] : []),
    ],
    missing: result.missing.map((m) => `${m.what}: ${m.reason}`),
    resultPath,
  };
}

/** Whether a parsed JSON value is a driftlight result (by its schema tag). */
function isResult(value: unknown): value is AnalysisResult {
  return typeof value === 'object' && value !== null && (value as { schema?: unknown }).schema === RESULT_SCHEMA;
}

/** The instant a row is dated by: acquisition time, else analysis time (epoch ms; NaN when unreadable). */
export function rowTimeMs(row: Pick<SummaryRow, 'acquiredAt' | 'analyzedAt'>): number {
  const acquired = row.acquiredAt === null ? undefined : acquisitionEpochMs(row.acquiredAt);
  return acquired ?? Date.parse(row.analyzedAt);
}

/**
 * Rows of every result under `resultsDir` (results/YYYY-MM-DD/SET.json) dated in [fromMs, toMs),
 * by acquisition time (analysis time when the files gave none), oldest first. Unreadable files are
 * returned in `skipped` with the reason, never dropped silently.
 */
export function readSummaryRows(
  resultsDir: string,
  fromMs = -Infinity,
  toMs = Infinity,
): { rows: SummaryRow[]; skipped: { path: string; reason: string }[] } {
  const rows: SummaryRow[] = [];
  const skipped: { path: string; reason: string }[] = [];
  let days: string[] = [];
  try {
    days = readdirSync(resultsDir)
      .filter((name) => /^\d{4}-\d{2}-\d{2}$/.test(name))
      .sort();
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
  }
  for (const day of days) {
    const dayDir = join(resultsDir, day);
    if (!statSync(dayDir).isDirectory()) continue;
    for (const name of readdirSync(dayDir)
      .filter((n) => n.endsWith('.json') && !n.startsWith('.'))
      .sort()) {
      const path = join(dayDir, name);
      let parsed: unknown;
      try {
        parsed = JSON.parse(readFileSync(path, 'utf8'));
      } catch (error) {
        skipped.push({
          path,
          reason: `not readable as JSON: ${error instanceof Error ? error.message : String(error)}`,
        });
        continue;
      }
      if (!isResult(parsed)) {
        skipped.push({ path, reason: `not a ${RESULT_SCHEMA} result` });
        continue;
      }
      const row = summaryRowOf(parsed, relative(resultsDir, path));
      const timeMs = rowTimeMs(row);
      if (timeMs >= fromMs && timeMs < toMs) rows.push(row);
    }
  }
  rows.sort((a, b) => rowTimeMs(a) - rowTimeMs(b) || a.setId.localeCompare(b.setId));
  return { rows, skipped };
}

/** A CSV field per RFC 4180: quoted when it holds a comma, quote, CR or LF (quotes doubled). */
function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

const numberText = (value: number | null | undefined): string =>
  value === null || value === undefined ? '' : String(value);

/** The table as CSV (RFC 4180, CRLF line ends, UTF-8, header row; numbers at full precision, empty when absent). */
export function summaryCsv(rows: readonly SummaryRow[]): string {
  const componentCount = Math.max(0, ...rows.map((row) => row.components.length));
  const header = [
    'set_id',
    'sample_id',
    'role',
    'acquired_at',
    'analyzed_at',
    'quantum_yield',
    'quantum_yield_u',
    'standard_id',
    ...Array.from({ length: componentCount }, (_, i) => [
      `tau${i + 1}_ns`,
      `tau${i + 1}_u_ns`,
      `tau${i + 1}_amplitude_fraction`,
      `tau${i + 1}_intensity_fraction`,
    ]).flat(),
    'tau_mean_intensity_ns',
    'chi2_reduced',
    'fit_converged',
    'kr_per_s',
    'knr_per_s',
    'tau0_ns',
    'partial',
    'flags',
    'missing',
    'result_path',
  ];
  const lines = [header.join(',')];
  for (const row of rows) {
    const components = Array.from({ length: componentCount }, (_, i) => {
      const c = row.components[i];
      return c === undefined
        ? ['', '', '', '']
        : [
            numberText(c.tauNs),
            numberText(c.tauNsStdErr),
            numberText(c.amplitudeFraction),
            numberText(c.intensityFraction),
          ];
    }).flat();
    const cells = [
      row.setId,
      row.sampleId,
      row.role,
      row.acquiredAt ?? '',
      row.analyzedAt,
      numberText(row.quantumYield),
      numberText(row.quantumYieldStdUncertainty),
      row.standardId ?? '',
      ...components,
      numberText(row.tauMeanIntensityNs),
      numberText(row.chi2Reduced),
      row.fitConverged === null ? '' : String(row.fitConverged),
      numberText(row.krPerS),
      numberText(row.knrPerS),
      numberText(row.tau0Ns),
      String(row.partial),
      row.flags.join('; '),
      row.missing.join('; '),
      row.resultPath,
    ];
    lines.push(cells.map(csvField).join(','));
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** The table as JSON: { schema, rows }. */
export function summaryJson(rows: readonly SummaryRow[]): string {
  return `${JSON.stringify({ schema: 'driftlight.summary/1', rows }, null, 2)}\n`;
}
