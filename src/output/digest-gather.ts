// Gathers the day's summary for a digest from the ledger, the result files and the outbox: the edge
// that reads; building the digest's forms from it (digest-render.ts) does no I/O.
import { existsSync, readFileSync, statSync } from 'node:fs';
import { basename, dirname, isAbsolute, join } from 'node:path';
import type { AnalysisResult } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/index.js';
import {
  INSTRUMENT_SCOPE,
  METRICS,
  epochMsToIso,
  localParts,
  parseIsoToEpochMs,
  zonedTimeToEpochMs,
  type MetricName,
  type RuleSet,
} from '../qc/index.js';
import { civilFromDays, daysFromCivil } from '../qc/time.js';
import type { Ledger } from '../store/ledger.js';
import { observationHistory } from '../store/qc-store.js';
import { undeliveredAlerts } from '../store/alert-outbox.js';
import { excludedSetIds } from '../store/qc-actions-store.js';
import {
  deliveriesBetween,
  filesReceivedBetween,
  flagsOfControls,
  rejectionsBetween,
  waitingSets,
} from '../store/report-queries.js';
import { resultsBetween } from '../store/results.js';
import { getSet } from '../store/sets.js';
import { controlChartsFromLedger } from './chart-source.js';
import { dayFolderName } from './dated-path.js';
import {
  DIGEST_SCHEMA,
  type ControlVerdict,
  type DecayPlotData,
  type DigestData,
  type HealthTrend,
  type SpectrumPlotData,
} from './digest-model.js';
import { summaryRowOf, type SummaryRow } from './summary-table.js';

/** Instrument metrics whose trends the digest shows (instrument scope), and the control metric of light throughput. */
const INSTRUMENT_METRICS: readonly MetricName[] = ['irfWidthNs', 'ramanSnr', 'ramanPeakErrorNm'];
const CONTROL_HEALTH_METRICS: readonly MetricName[] = ['intensityPerAbsorbedLight'];
/** Control metrics charted in the digest (the two the lab signs off on); `driftlight chart` draws every metric. */
export const DIGEST_CHART_METRICS: readonly MetricName[] = ['controlQuantumYield', 'meanLifetimeNs'];
/** The most spectra overlaid in one plot (more are listed in the plot's notes). */
const MAX_SPECTRA = 8;

/** The day after YYYY-MM-DD. */
export function nextDay(date: string): string {
  const [year, month, day] = date.split('-').map(Number);
  return civilFromDays(daysFromCivil(year ?? 1970, month ?? 1, day ?? 1) + 1);
}

/** The day before YYYY-MM-DD. */
export function previousDay(date: string): string {
  const [year, month, day] = date.split('-').map(Number);
  return civilFromDays(daysFromCivil(year ?? 1970, month ?? 1, day ?? 1) - 1);
}

/** [start, end) of a local day in a zone, epoch ms. */
export function dayBounds(date: string, timeZone: string): { fromMs: number; toMs: number } {
  return { fromMs: zonedTimeToEpochMs(date, 0, timeZone), toMs: zonedTimeToEpochMs(nextDay(date), 0, timeZone) };
}

/** Ordinary least-squares slope of value on time, per day (Draper & Smith, Applied Regression Analysis); undefined below 3 points or with no time spread. O(n). */
export function slopePerDay(points: readonly { epochMs: number; value: number }[]): number | undefined {
  if (points.length < 3) return undefined;
  const n = points.length;
  const meanT = points.reduce((s, p) => s + p.epochMs, 0) / n;
  const meanV = points.reduce((s, p) => s + p.value, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (const p of points) {
    sxy += (p.epochMs - meanT) * (p.value - meanV);
    sxx += (p.epochMs - meanT) ** 2;
  }
  return sxx === 0 ? undefined : (sxy / sxx) * 86_400_000;
}

function readJson(path: string): AnalysisResult | undefined {
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as AnalysisResult;
  } catch {
    // A result file that cannot be read is reported by the caller as a note, not a crash.
    return undefined;
  }
}

/** Columns of an outbox CSV (comment lines "# …" skipped, first other line the header). */
export function readOutboxCsv(text: string): { header: string[]; columns: number[][] } {
  const lines = text.split(/\r?\n/).filter((line) => line !== '' && !line.startsWith('#'));
  const header = (lines[0] ?? '').split(',').map((name) => name.trim());
  const columns = header.map(() => [] as number[]);
  for (const line of lines.slice(1)) {
    const cells = line.split(',');
    header.forEach((_name, i) => columns[i]?.push(Number(cells[i])));
  }
  return { header, columns };
}

/**
 * The outbox file of a set: outbox/DAY/SET/SET+suffix, DAY being the day folder of its result file
 * (the outbox and results use the same day), else its acquisition or creation day (UTC).
 */
function outboxFile(
  outboxDir: string,
  located: { result: AnalysisResult; createdAt: string | undefined; path: string },
  suffix: string,
): string | undefined {
  const { result, createdAt, path } = located;
  const days = [
    basename(dirname(path)),
    result.acquiredAt?.slice(0, 10),
    createdAt === undefined ? undefined : dayFolderName(new Date(createdAt)),
  ];
  for (const day of days) {
    if (day === undefined || !/^\d{4}-\d{2}-\d{2}$/.test(day)) continue;
    const candidate = join(outboxDir, day, result.setId, `${result.setId}${suffix}`);
    if (existsSync(candidate)) return candidate;
  }
  return undefined;
}

function decayPlot(
  outboxDir: string,
  located: { result: AnalysisResult; createdAt: string | undefined; path: string },
): DecayPlotData | string {
  const { result } = located;
  const file = outboxFile(outboxDir, located, '.decay.fit.csv');
  if (file === undefined) return `no fitted decay in the outbox for ${result.setId}`;
  const { header, columns } = readOutboxCsv(readFileSync(file, 'utf8'));
  const at = (name: string): number[] | undefined => columns[header.indexOf(name)];
  const timeNs = at('time (ns)');
  const counts = at('counts');
  const fit = at('fit');
  const residual = at('weighted residual');
  if (timeNs === undefined || counts === undefined || fit === undefined || residual === undefined)
    return `${file}: no fit columns`;
  const inRange = fit.map((value, i) => (value !== 0 || residual[i] !== 0 ? i : -1)).filter((i) => i >= 0);
  return {
    setId: result.setId,
    sampleId: result.sampleId,
    timeNs,
    counts,
    fit,
    weightedResidual: residual,
    fitRange: [inRange[0] ?? 0, inRange[inRange.length - 1] ?? 0],
    ...(result.decayFit === undefined ? {} : { chi2Reduced: result.decayFit.chi2Reduced }),
  };
}

function emissionPlot(
  outboxDir: string,
  located: { result: AnalysisResult; createdAt: string | undefined; path: string },
): SpectrumPlotData | undefined {
  const { result } = located;
  const file = outboxFile(outboxDir, located, '.emission.corrected.csv');
  if (file === undefined) return undefined;
  const { header, columns } = readOutboxCsv(readFileSync(file, 'utf8'));
  const wavelengthNm = columns[0];
  const values = columns[1];
  if (wavelengthNm === undefined || values === undefined || !/nm/.test(header[0] ?? '')) return undefined;
  return {
    setId: result.setId,
    sampleId: result.sampleId,
    role: result.role,
    wavelengthNm,
    values,
    valueUnit: result.spectra.emission?.valueUnit ?? 'a.u.',
  };
}

export interface GatherOptions {
  readonly date: string;
  readonly ruleSet: RuleSet;
  readonly now: Date;
  readonly softwareVersion: string;
  /** Set ids excluded from control statistics. Default: those excluded by `driftlight rules exclude` (qc_actions). */
  readonly excludedSetIds?: ReadonlySet<string>;
}

/** Reads everything the digest of `date` shows. */
export function gatherDigest(ledger: Ledger, config: DriftlightConfig, options: GatherOptions): DigestData {
  const { date, ruleSet } = options;
  const timeZone = digestTimeZone(config, ruleSet);
  const { fromMs, toMs } = dayBounds(date, timeZone);
  const fromIso = epochMsToIso(fromMs);
  const toIso = epochMsToIso(toMs);
  const historyFromMs = toMs - config.digest.historyDays * 86_400_000;

  const received = filesReceivedBetween(ledger, fromIso, toIso);
  const byState: Record<string, number> = {};
  for (const file of received) byState[file.state] = (byState[file.state] ?? 0) + 1;

  const notes: string[] = [];
  const indexRows = resultsBetween(ledger, new Date(fromMs), new Date(toMs));
  const results: { result: AnalysisResult; createdAt: string | undefined; path: string }[] = [];
  for (const row of indexRows) {
    const result = readJson(row.path);
    if (result === undefined) {
      notes.push(`result ${row.path} could not be read`);
      continue;
    }
    results.push({ result, createdAt: getSet(ledger, row.setId)?.createdAt, path: row.path });
  }
  const byRole: Record<string, number> = {};
  for (const { result } of results) byRole[result.role] = (byRole[result.role] ?? 0) + 1;
  const samples: SummaryRow[] = results.map(({ result, path }) =>
    summaryRowOf(
      result,
      path.startsWith(config.folders.results) ? path.slice(config.folders.results.length + 1) : path,
    ),
  );

  const controlIds = ruleSet.controls.map((control) => control.id);
  const observations = observationHistory(ledger);
  const allFlags = flagsOfControls(ledger, [...controlIds, INSTRUMENT_SCOPE]);
  const todaysSetIds = new Set(results.map(({ result }) => result.setId));
  const controls: ControlVerdict[] = ruleSet.controls.map((control) => {
    const runs = observations.filter((o) => {
      if (o.controlId !== control.id) return false;
      const epochMs = parseIsoToEpochMs(o.acquiredAt) ?? Number.NaN;
      return todaysSetIds.has(o.setId) || (epochMs >= fromMs && epochMs < toMs);
    });
    const runIds = new Set(runs.map((run) => run.setId));
    const flags = allFlags
      .filter(
        (flag) =>
          flag.controlId === control.id &&
          (runIds.has(flag.setId) ||
            (flag.setId === '' &&
              (parseIsoToEpochMs(flag.acquiredAt) ?? Number.NaN) >= fromMs &&
              (parseIsoToEpochMs(flag.acquiredAt) ?? Number.NaN) < toMs)),
      )
      .map((flag) => ({
        ruleId: flag.ruleId,
        check: flag.check,
        severity: flag.severity,
        metric: flag.metric,
        message: flag.message,
        setId: flag.setId,
        acquiredAt: flag.acquiredAt,
      }));
    const serious = flags.some((flag) => flag.severity !== 'info');
    return {
      controlId: control.id,
      label: control.label ?? control.id,
      verdict: serious ? 'flagged' : runs.length === 0 ? 'no run' : 'in control',
      runs: runs.map((run) => ({ setId: run.setId, acquiredAt: run.acquiredAt, metrics: run.metrics })),
      flags,
      openFlags: allFlags.filter((flag) => flag.controlId === control.id && flag.open).length,
    };
  });
  const excluded = options.excludedSetIds ?? excludedSetIds(ledger);
  const charts = DIGEST_CHART_METRICS.flatMap((metric) =>
    controlChartsFromLedger(ledger, ruleSet, { metric, sinceEpochMs: historyFromMs, excludedSetIds: excluded }),
  )
    .filter((chart) => chart.points.length > 0)
    .sort((a, b) => a.controlId.localeCompare(b.controlId));

  // An instrument metric counts from every observation holding it: the IRF width is measured with each
  // control's decay (recorded under the control), the water Raman scans under the instrument scope.
  const trend = (scope: string, metric: MetricName): HealthTrend => {
    const points = observations
      .filter((o) => o.controlId === scope || scope === INSTRUMENT_SCOPE)
      .flatMap((o) => {
        const value = o.metrics[metric];
        const epochMs = parseIsoToEpochMs(o.acquiredAt);
        return value === undefined || epochMs === undefined || epochMs < historyFromMs || epochMs >= toMs
          ? []
          : [{ acquiredAt: o.acquiredAt, epochMs, value }];
      })
      .sort((a, b) => a.epochMs - b.epochMs);
    const slope = slopePerDay(points);
    const latest = points[points.length - 1]?.value;
    return {
      scope,
      metric,
      label: METRICS[metric].label,
      unit: METRICS[metric].unit,
      points,
      ...(latest === undefined ? {} : { latest, windowMean: points.reduce((s, p) => s + p.value, 0) / points.length }),
      ...(slope === undefined ? {} : { slopePerDay: slope }),
    };
  };
  const trends = [
    ...INSTRUMENT_METRICS.map((metric) => trend(INSTRUMENT_SCOPE, metric)),
    ...controlIds.flatMap((id) => CONTROL_HEALTH_METRICS.map((metric) => trend(id, metric))),
  ];
  const curveFile = config.instrument.detectorCorrectionFile;
  const curvePath =
    curveFile === undefined ? undefined : isAbsolute(curveFile) ? curveFile : join(config.baseDir, curveFile);
  const detectorCurve =
    curvePath === undefined
      ? { note: 'no detector curve configured (instrument.detectorCorrectionFile)' }
      : existsSync(curvePath)
        ? { file: curvePath, ageDays: (options.now.getTime() - statSync(curvePath).mtimeMs) / 86_400_000 }
        : { file: curvePath, note: 'the configured detector curve file does not exist' };

  const waiting = waitingWithLacks(ledger, config);

  const controlResults = results.filter(({ result }) => result.role === 'control' && result.decayFit !== undefined);
  const lastControl = controlResults[controlResults.length - 1];
  let controlDecay: DecayPlotData | undefined;
  if (lastControl === undefined) notes.push('no control decay was fitted today');
  else {
    const plot = decayPlot(config.folders.outbox, lastControl);
    if (typeof plot === 'string') notes.push(plot);
    else controlDecay = plot;
  }
  const emission = results
    .filter(({ result }) => result.spectra.emission !== undefined)
    .flatMap((located) => {
      const plot = emissionPlot(config.folders.outbox, located);
      return plot === undefined ? [] : [plot];
    });
  if (emission.length > MAX_SPECTRA)
    notes.push(`${emission.length} corrected emission spectra today; the plot overlays the first ${MAX_SPECTRA}`);

  const deliveries = deliveriesBetween(ledger, fromMs, toMs);
  return {
    schema: DIGEST_SCHEMA,
    date,
    timeZone,
    fromIso,
    toIso,
    generatedAt: options.now.toISOString(),
    softwareVersion: options.softwareVersion,
    files: { received: received.length, byState },
    sets: { processed: results.length, partial: results.filter(({ result }) => result.partial).length, byRole },
    rejections: rejectionsBetween(ledger, fromIso, toIso).map((r) => ({
      name: r.name,
      state: r.state,
      code: r.code ?? '',
      message: r.message ?? '',
      at: r.updatedAt,
    })),
    alerts: {
      delivered: deliveries.filter((d) => d.status === 'delivered').length,
      failed: deliveries.filter((d) => d.status === 'failed').length,
      deliveries: deliveries.map((d) => ({
        channelId: d.channelId,
        key: d.key,
        type: d.type,
        severity: d.severity,
        status: d.status,
        attempts: d.attempts,
        error: d.error,
        at: epochMsToIso(d.atMs),
      })),
      undelivered: undeliveredAlerts(ledger, 100).latest.map((d) => ({
        channelId: d.channelId,
        key: d.key,
        severity: d.severity,
        status: d.status,
        attempts: d.attempts,
        error: d.lastError,
        at: epochMsToIso(d.createdAtMs),
      })),
    },
    controls,
    charts,
    health: { trends, detectorCurve, historyDays: config.digest.historyDays },
    samples,
    waiting,
    plots: { ...(controlDecay === undefined ? {} : { controlDecay }), emission: emission.slice(0, MAX_SPECTRA), notes },
  };
}

/** A set not yet finished, with the parts it has and the required parts it still lacks. */
export interface WaitingWithLacks {
  readonly setId: string;
  readonly sampleId: string;
  readonly role: string;
  readonly state: string;
  readonly since: string;
  readonly has: readonly string[];
  readonly lacks: readonly string[];
}

/** Waiting sets (open or queued) with what each has and lacks of the parts its role requires (assembly.requiredParts, assembly.referenceRequiredParts). */
export function waitingWithLacks(ledger: Ledger, config: DriftlightConfig): WaitingWithLacks[] {
  const requiredFor = (role: string): readonly string[] =>
    role === 'reference'
      ? config.assembly.referenceRequiredParts
      : role === 'sample' || role === 'control'
        ? config.assembly.requiredParts
        : [];
  return waitingSets(ledger).map((set) => {
    const has = new Set<string>();
    for (const file of set.files) {
      if (file.part !== null) has.add(file.part);
      if (file.part === 'decay' && file.hasIrfColumn) has.add('irf');
    }
    return {
      setId: set.setId,
      sampleId: set.sampleId,
      role: set.role,
      state: set.state,
      since: set.createdAt,
      has: [...has].sort(),
      lacks: requiredFor(set.role).filter((part) => !has.has(part)),
    };
  });
}

/** The zone a digest day is counted in: digest.timeZone, else the lab's zone of the effective rule set (rules.timeZone). */
export function digestTimeZone(config: DriftlightConfig, ruleSet: RuleSet): string {
  return config.digest.timeZone ?? ruleSet.timeZone;
}

/** The local date (YYYY-MM-DD) of an instant in a zone. */
export function localDate(at: Date, timeZone: string): string {
  return localParts(at.getTime(), timeZone).date;
}
