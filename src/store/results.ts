// Typed queries on the `results` index (one row per set with a durable result JSON).
import type { Ledger } from './ledger.js';

export interface ResultIndexRecord {
  readonly setId: string;
  readonly path: string;
  readonly sampleId: string;
  readonly role: string;
  readonly acquiredAt: string | null;
  readonly analyzedAt: string;
  readonly partial: boolean;
  readonly tauMeanNs: number | null;
  readonly quantumYield: number | null;
  readonly krPerS: number | null;
  readonly knrPerS: number | null;
  readonly configHash: string;
  readonly resultSha256: string;
  /** QC flags (JSON array) as written in the result. */
  readonly flagsJson: string;
}

interface ResultRow {
  set_id: string;
  path: string;
  sample_id: string;
  role: string;
  acquired_at: string | null;
  analyzed_at: string;
  partial: number;
  tau_mean_ns: number | null;
  quantum_yield: number | null;
  kr_per_s: number | null;
  knr_per_s: number | null;
  config_hash: string;
  result_sha256: string;
  flags_json: string;
}

function toRecord(row: ResultRow): ResultIndexRecord {
  return {
    setId: row.set_id,
    path: row.path,
    sampleId: row.sample_id,
    role: row.role,
    acquiredAt: row.acquired_at,
    analyzedAt: row.analyzed_at,
    partial: row.partial === 1,
    tauMeanNs: row.tau_mean_ns,
    quantumYield: row.quantum_yield,
    krPerS: row.kr_per_s,
    knrPerS: row.knr_per_s,
    configHash: row.config_hash,
    resultSha256: row.result_sha256,
    flagsJson: row.flags_json,
  };
}

/** Inserts or replaces the index row of a set's result. */
export function upsertResult(ledger: Ledger, record: ResultIndexRecord): void {
  ledger
    .prepare(
      `INSERT OR REPLACE INTO results (set_id, path, sample_id, role, acquired_at, analyzed_at, partial, tau_mean_ns,
              quantum_yield, kr_per_s, knr_per_s, config_hash, result_sha256, flags_json)
              VALUES (@setId, @path, @sampleId, @role, @acquiredAt, @analyzedAt, @partial, @tauMeanNs, @quantumYield,
              @krPerS, @knrPerS, @configHash, @resultSha256, @flagsJson)`,
    )
    .run({ ...record, partial: record.partial ? 1 : 0 });
}

/** The result index row of a set, if any. */
export function getResult(ledger: Ledger, setId: string): ResultIndexRecord | undefined {
  const row = ledger.prepare('SELECT * FROM results WHERE set_id = ?').get(setId) as ResultRow | undefined;
  return row === undefined ? undefined : toRecord(row);
}

/** Results analysed within [from, to), oldest first (for digests). */
export function resultsBetween(ledger: Ledger, from: Date, to: Date): ResultIndexRecord[] {
  return (
    ledger
      .prepare('SELECT * FROM results WHERE analyzed_at >= ? AND analyzed_at < ? ORDER BY analyzed_at')
      .all(from.toISOString(), to.toISOString()) as ResultRow[]
  ).map(toRecord);
}
