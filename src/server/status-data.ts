// What the status page shows, read from the ledger and the digest folder: the latest digest's
// summary, each control's charts and open flags, queue and ledger counts, waiting sets and what
// they lack, recent rejections, and alerts not delivered (durable outbox).
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { DriftlightConfig } from '../config/index.js';
import type { RuleSet } from '../qc/index.js';
import type { ControlChartData } from '../output/chart-series.js';
import { controlChartsFromLedger } from '../output/chart-source.js';
import { DIGEST_CHART_METRICS, waitingWithLacks, type WaitingWithLacks } from '../output/digest-gather.js';
import type { DigestData } from '../output/digest-model.js';
import { digestFolder } from '../output/digest-write.js';
import { undeliveredAlerts } from '../store/alert-outbox.js';
import type { Ledger } from '../store/ledger.js';
import { excludedSetIds } from '../store/qc-actions-store.js';
import { latestObservationEpochMs } from '../store/qc-store.js';
import { openFlagsByControl, type OpenControlFlag } from '../store/report-queries.js';
import { ledgerStatus, type LedgerStatus } from '../store/status.js';

/** How many recent rejections the page lists. */
const REJECTIONS_SHOWN = 20;
const DIGEST_NAME = /^(\d{4}-\d{2}-\d{2})\.json$/;

/** The summary of the latest written digest (from its JSON form). */
export interface LatestDigest {
  readonly date: string;
  readonly generatedAt: string;
  readonly setsProcessed: number;
  readonly rejected: number;
  readonly controls: readonly { readonly controlId: string; readonly verdict: string }[];
  /** Whether DATE.html exists beside the JSON (served at /digest). */
  readonly hasHtml: boolean;
}

export interface StatusData {
  readonly generatedAt: string;
  readonly softwareVersion: string;
  readonly counts: LedgerStatus;
  readonly latestDigest?: LatestDigest;
  readonly controls: readonly {
    readonly controlId: string;
    readonly label: string;
    readonly openFlags: readonly OpenControlFlag[];
  }[];
  /** Open flags of the instrument scope and of controls no longer in the rule set. */
  readonly otherOpenFlags: readonly { readonly controlId: string; readonly flags: readonly OpenControlFlag[] }[];
  readonly charts: readonly ControlChartData[];
  readonly chartDays: number;
  /** End of the charts' window (ISO): the latest control run, or now if earlier. */
  readonly chartEnd: string;
  readonly waiting: readonly WaitingWithLacks[];
  readonly rejections: LedgerStatus['lastErrors'];
  readonly alerts: ReturnType<typeof undeliveredAlerts>;
}

/** The date of the newest digest written under results/digest/ (by its DATE.json), if any; the file name comes from the folder listing, never from a request. */
export function latestDigestDate(config: DriftlightConfig): string | undefined {
  let names: string[];
  try {
    names = readdirSync(digestFolder(config));
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
    throw error;
  }
  return names
    .flatMap((name) => DIGEST_NAME.exec(name)?.[1] ?? [])
    .sort()
    .pop();
}

function readLatestDigest(config: DriftlightConfig): LatestDigest | undefined {
  const date = latestDigestDate(config);
  if (date === undefined) return undefined;
  const folder = digestFolder(config);
  const data = JSON.parse(readFileSync(join(folder, `${date}.json`), 'utf8')) as DigestData;
  const hasHtml = readdirSync(folder).includes(`${date}.html`);
  return {
    date,
    generatedAt: data.generatedAt,
    setsProcessed: data.sets.processed,
    rejected: data.rejections.length,
    controls: data.controls.map((c) => ({ controlId: c.controlId, verdict: c.verdict })),
    hasHtml,
  };
}

/** Reads everything the status page shows at `now`. */
export function gatherStatus(
  ledger: Ledger,
  config: DriftlightConfig,
  ruleSet: RuleSet,
  options: { now: Date; softwareVersion: string },
): StatusData {
  const chartDays = config.digest.historyDays;
  // The window ends at the latest control run (or now, if earlier): a workspace looked at after
  // weeks without runs still shows its last historyDays days rather than empty charts.
  const latestRunMs = latestObservationEpochMs(ledger);
  const chartEndMs = Math.min(options.now.getTime(), latestRunMs ?? options.now.getTime());
  const sinceEpochMs = chartEndMs - chartDays * 86_400_000;
  const excluded = excludedSetIds(ledger);
  const charts = DIGEST_CHART_METRICS.flatMap((metric) =>
    controlChartsFromLedger(ledger, ruleSet, { metric, sinceEpochMs, excludedSetIds: excluded }),
  )
    .filter((chart) => chart.points.length > 0)
    .sort((a, b) => a.controlId.localeCompare(b.controlId));
  const open = openFlagsByControl(ledger);
  const known = new Set(ruleSet.controls.map((c) => c.id));
  const latestDigest = readLatestDigest(config);
  return {
    generatedAt: options.now.toISOString(),
    softwareVersion: options.softwareVersion,
    counts: ledgerStatus(ledger, 0),
    ...(latestDigest === undefined ? {} : { latestDigest }),
    controls: ruleSet.controls.map((c) => ({
      controlId: c.id,
      label: c.label ?? c.id,
      openFlags: open.find((o) => o.controlId === c.id)?.flags ?? [],
    })),
    otherOpenFlags: open.filter((o) => !known.has(o.controlId)),
    charts,
    chartDays,
    chartEnd: new Date(chartEndMs).toISOString(),
    waiting: waitingWithLacks(ledger, config),
    rejections: ledgerStatus(ledger, REJECTIONS_SHOWN).lastErrors,
    alerts: undeliveredAlerts(ledger, 50),
  };
}
