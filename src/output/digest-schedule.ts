// The daily digest schedule: a cron job (croner) at digest.time in the digest's zone builds the digest
// of the previous local day; at start, the digest of the latest scheduled run is built when it is
// missing (the service was down at that time). One build at a time; failures are logged, not thrown.
import { Cron } from 'croner';
import type { DriftlightConfig } from '../config/index.js';
import type { RuleSet } from '../qc/index.js';
import { localDate, previousDay } from './digest-gather.js';
import { digestExists } from './digest-write.js';

export interface DigestScheduleOptions {
  readonly config: DriftlightConfig;
  readonly ruleSet: RuleSet;
  readonly timeZone: string;
  /** Builds and writes the digest of a date (the caller owns the ledger). */
  readonly build: (date: string) => Promise<void>;
  readonly onError: (error: unknown, date: string) => void;
  /** The clock; default the system clock. */
  readonly now?: () => Date;
}

export interface DigestSchedule {
  /** The date the start-up catch-up built, if any. */
  readonly caughtUp: Promise<string | undefined>;
  /** Next scheduled build time. */
  nextRun(): Date | null;
  stop(): Promise<void>;
}

/** "07:00" → the croner pattern "0 7 * * *" (minute hour, every day). */
export function cronPatternOf(time: string): string {
  const [hours, minutes] = time.split(':').map(Number);
  return `${minutes ?? 0} ${hours ?? 0} * * *`;
}

/** The date whose digest the latest scheduled run at or before `now` was due to build, or undefined before the first run. */
export function dueDigestDate(time: string, timeZone: string, now: Date): string | undefined {
  const probe = new Cron(cronPatternOf(time), { timezone: timeZone, paused: true });
  try {
    const [latest] = probe.previousRuns(1, now);
    return latest === undefined ? undefined : previousDay(localDate(latest, timeZone));
  } finally {
    probe.stop();
  }
}

/** Starts the schedule: catches up a missed digest now, then builds one at every scheduled time. */
export function startDigestSchedule(options: DigestScheduleOptions): DigestSchedule {
  const now = options.now ?? ((): Date => new Date());
  let chain: Promise<unknown> = Promise.resolve();
  const run = (date: string): Promise<void> => {
    const next = chain.then(() => options.build(date)).catch((error: unknown) => options.onError(error, date));
    chain = next;
    return next;
  };
  const due = dueDigestDate(options.config.digest.time, options.timeZone, now());
  const caughtUp =
    due === undefined || digestExists(options.config, due) ? Promise.resolve(undefined) : run(due).then(() => due);
  const job = new Cron(cronPatternOf(options.config.digest.time), { timezone: options.timeZone, protect: true }, () => {
    void run(previousDay(localDate(now(), options.timeZone)));
  });
  return {
    caughtUp,
    nextRun: () => job.nextRun(),
    async stop(): Promise<void> {
      job.stop();
      await chain;
    },
  };
}
