// The day's summary a digest is built from (plain data, also written as the digest's JSON form):
// what arrived, what was processed or rejected, alerts, each control's verdict and chart, instrument
// health with trends, the samples table, what is waiting, and the data of the day's plots.
import type { MetricName } from '../qc/index.js';
import type { OpenControlFlag } from '../store/report-queries.js';
import type { ControlChartData } from './chart-series.js';
import type { SummaryRow } from './summary-table.js';

export const DIGEST_SCHEMA = 'driftlight.digest/1' as const;

/** An open QC flag as the digest shows it: the store's open-flag row, one per rule and metric. */
export type DigestFlag = OpenControlFlag;

export interface ControlVerdict {
  readonly controlId: string;
  readonly label: string;
  /** 'in control': runs today and no warning or critical flag; 'flagged': at least one; 'no run': none today. */
  readonly verdict: 'in control' | 'flagged' | 'no run';
  readonly runs: readonly {
    readonly setId: string;
    readonly acquiredAt: string;
    readonly metrics: Readonly<Partial<Record<MetricName, number>>>;
  }[];
  readonly flags: readonly DigestFlag[];
  /** Flags of this control still open (any day). */
  readonly openFlags: number;
}

export interface HealthTrend {
  readonly scope: string;
  readonly metric: MetricName;
  readonly label: string;
  readonly unit: string;
  readonly points: readonly { readonly acquiredAt: string; readonly epochMs: number; readonly value: number }[];
  readonly latest?: number;
  /** Ordinary least-squares slope over the window, per day (metric unit/day); absent below 3 points. */
  readonly slopePerDay?: number;
  readonly windowMean?: number;
}

export interface DetectorCurveAge {
  readonly file?: string;
  /** Days since the curve file was last modified (the file's own date; the curve's measurement date is not recorded). */
  readonly ageDays?: number;
  /** Why no age is given (no curve configured, file missing). */
  readonly note?: string;
}

export interface DecayPlotData {
  readonly setId: string;
  readonly sampleId: string;
  readonly timeNs: readonly number[];
  readonly counts: readonly number[];
  readonly fit: readonly number[];
  readonly weightedResidual: readonly number[];
  /** First and last channel index of the fit range (fit and residual are 0 outside it). */
  readonly fitRange: readonly [number, number];
  readonly chi2Reduced?: number;
}

export interface SpectrumPlotData {
  readonly setId: string;
  readonly sampleId: string;
  readonly role: string;
  readonly wavelengthNm: readonly number[];
  readonly values: readonly number[];
  readonly valueUnit: string;
}

export interface DigestData {
  readonly schema: typeof DIGEST_SCHEMA;
  /** The local day covered (YYYY-MM-DD in timeZone) and its bounds (ISO, UTC). */
  readonly date: string;
  readonly timeZone: string;
  readonly fromIso: string;
  readonly toIso: string;
  readonly generatedAt: string;
  readonly softwareVersion: string;
  readonly files: { readonly received: number; readonly byState: Readonly<Record<string, number>> };
  readonly sets: {
    readonly processed: number;
    readonly partial: number;
    readonly byRole: Readonly<Record<string, number>>;
  };
  readonly rejections: readonly {
    readonly name: string;
    readonly state: string;
    readonly code: string;
    readonly message: string;
    readonly at: string;
  }[];
  readonly alerts: {
    readonly delivered: number;
    readonly failed: number;
    readonly deliveries: readonly {
      readonly channelId: string;
      readonly key: string;
      readonly type: string;
      readonly severity: string;
      readonly status: string;
      readonly attempts: number;
      readonly error: string | null;
      readonly at: string;
    }[];
    /** Alerts not delivered (any day) from the durable alert outbox: 'pending' still retried, 'expired' given up; newest first. */
    readonly undelivered: readonly {
      readonly channelId: string;
      readonly key: string;
      readonly severity: string;
      readonly status: 'pending' | 'expired';
      readonly attempts: number;
      readonly error: string | null;
      readonly at: string;
    }[];
  };
  readonly controls: readonly ControlVerdict[];
  readonly charts: readonly ControlChartData[];
  readonly health: {
    readonly trends: readonly HealthTrend[];
    readonly detectorCurve: DetectorCurveAge;
    readonly historyDays: number;
  };
  readonly samples: readonly SummaryRow[];
  readonly waiting: readonly {
    readonly setId: string;
    readonly sampleId: string;
    readonly role: string;
    readonly state: string;
    readonly since: string;
    readonly has: readonly string[];
    readonly lacks: readonly string[];
  }[];
  readonly plots: {
    readonly controlDecay?: DecayPlotData;
    readonly emission: readonly SpectrumPlotData[];
    readonly notes: readonly string[];
  };
}
