// /metrics in the Prometheus text exposition format (prom-client): every value is read from the
// ledger when scraped, so `serve` (a separate process) and `watch --http` report the same numbers.
import { Counter, Gauge, Histogram, Registry } from 'prom-client';
import { openQcFlagCounts } from '../store/alert-outbox.js';
import type { Ledger } from '../store/ledger.js';
import { alertOutcomeCounts, analysisDurationsMs, failedDeliveryAttempts } from '../store/metrics-queries.js';
import { ledgerStatus } from '../store/status.js';

/** Buckets of the fit-duration histogram, seconds (a set's analysis takes from milliseconds to a minute). */
export const FIT_DURATION_BUCKETS_S: readonly number[] = [
  0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30, 60,
];

/** The names /metrics exposes (documented in the README; the tests parse each). */
export const METRIC_NAMES = {
  filesProcessed: 'driftlight_files_processed',
  filesRejected: 'driftlight_files_rejected',
  filesFailed: 'driftlight_files_failed',
  queueDepth: 'driftlight_queue_depth',
  setsWaiting: 'driftlight_sets_waiting',
  results: 'driftlight_results',
  fitDuration: 'driftlight_fit_duration_seconds',
  alertsSent: 'driftlight_alerts_sent_total',
  alertsFailed: 'driftlight_alerts_failed_total',
  alertsExpired: 'driftlight_alerts_expired_total',
  alertsPending: 'driftlight_alerts_pending',
  openQcFlags: 'driftlight_qc_flags_open',
} as const;

/** A registry whose metrics read `ledger` at each scrape (collect callbacks); `registry.metrics()` gives the text. */
export function createMetricsRegistry(ledger: Ledger): Registry {
  const registry = new Registry();
  const registers = [registry];
  const status = (): ReturnType<typeof ledgerStatus> => ledgerStatus(ledger, 0);
  new Gauge({
    name: METRIC_NAMES.filesProcessed,
    help: 'Files analysed into a result (ledger state done).',
    registers,
    collect() {
      this.set(status().files.done);
    },
  });
  new Gauge({
    name: METRIC_NAMES.filesRejected,
    help: 'Files rejected as bad input and quarantined (ledger state rejected).',
    registers,
    collect() {
      this.set(status().files.rejected);
    },
  });
  new Gauge({
    name: METRIC_NAMES.filesFailed,
    help: 'Files whose set failed to analyse (ledger state failed).',
    registers,
    collect() {
      this.set(status().files.failed);
    },
  });
  new Gauge({
    name: METRIC_NAMES.queueDepth,
    help: 'Measurement sets dispatched to the job queue and not yet finished.',
    registers,
    collect() {
      this.set(status().sets.queued);
    },
  });
  new Gauge({
    name: METRIC_NAMES.setsWaiting,
    help: 'Measurement sets open, waiting for parts or their deadline.',
    registers,
    collect() {
      this.set(status().sets.open);
    },
  });
  new Gauge({
    name: METRIC_NAMES.results,
    help: 'Results written (one per analysed set).',
    registers,
    collect() {
      this.set(status().results);
    },
  });
  new Histogram({
    name: METRIC_NAMES.fitDuration,
    help: "Wall time of one set's analysis in the worker (reading, corrections, decay fits, yields), seconds.",
    buckets: [...FIT_DURATION_BUCKETS_S],
    registers,
    collect() {
      this.reset();
      for (const ms of analysisDurationsMs(ledger)) this.observe(ms / 1000);
    },
  });
  const byChannel = (status: 'delivered' | 'expired' | 'pending'): Map<string, number> => {
    const counts = new Map<string, number>();
    for (const row of alertOutcomeCounts(ledger)) if (row.status === status) counts.set(row.channelId, row.count);
    return counts;
  };
  new Counter({
    name: METRIC_NAMES.alertsSent,
    help: 'Alert messages delivered, by channel.',
    labelNames: ['channel'],
    registers,
    collect() {
      this.reset();
      for (const [channel, n] of byChannel('delivered')) this.inc({ channel }, n);
    },
  });
  new Counter({
    name: METRIC_NAMES.alertsFailed,
    help: 'Alert delivery rounds that failed (each is retried until delivered or expired), by channel.',
    labelNames: ['channel'],
    registers,
    collect() {
      this.reset();
      for (const row of failedDeliveryAttempts(ledger)) this.inc({ channel: row.channelId }, row.count);
    },
  });
  new Counter({
    name: METRIC_NAMES.alertsExpired,
    help: 'Alert messages given up undelivered after alerts.deliveryExpiryHours, by channel.',
    labelNames: ['channel'],
    registers,
    collect() {
      this.reset();
      for (const [channel, n] of byChannel('expired')) this.inc({ channel }, n);
    },
  });
  new Gauge({
    name: METRIC_NAMES.alertsPending,
    help: 'Alert messages not yet delivered and still retried, by channel.',
    labelNames: ['channel'],
    registers,
    collect() {
      this.reset();
      for (const [channel, n] of byChannel('pending')) this.set({ channel }, n);
    },
  });
  new Gauge({
    name: METRIC_NAMES.openQcFlags,
    help: 'QC flags open (not recovered or acknowledged), by severity.',
    labelNames: ['severity'],
    registers,
    collect() {
      const counts = openQcFlagCounts(ledger);
      for (const severity of ['info', 'warning', 'critical'] as const) this.set({ severity }, counts[severity]);
    },
  });
  return registry;
}
