// Replays the demo month through the real watch loop (runWatch, in-process) with an accelerated
// clock: each arrival group's files are written into the inbox at its simulated time, the loop picks
// them up through the file watcher, and the replay moves on once intake and the analyses are done.
// Alerts go to a local webhook receiver. Returns what happened, for the CLI summary and the test.
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { AnalysisResult } from '../analysis/result.js';
import { generateDemoMonth, MONTH_DAYS, monthDate, type DemoMonth } from '../demo/month.js';
import { ConfigInvalid } from '../model/errors.js';
import type { Pipeline } from '../pipeline/runtime.js';
import { writeDemoOutputs, type DemoOutputs } from './demo-outputs.js';
import { startWebhookReceiver, type ReceivedAlert } from './demo-webhook.js';
import { runWatch } from './watch.js';

const MARKER = '.driftlight-demo';

/** A quarantined input and why. */
export interface RejectedInput {
  readonly file: string;
  readonly code: string;
  readonly message: string;
}

export interface DemoRunReport {
  readonly month: DemoMonth;
  readonly workspace: string;
  readonly alerts: readonly ReceivedAlert[];
  readonly results: readonly AnalysisResult[];
  readonly rejected: readonly RejectedInput[];
  readonly setsProcessed: number;
  readonly setsPartial: number;
  /** The last day's digest, the control chart and the month's summary CSV. */
  readonly outputs: DemoOutputs;
  readonly elapsedMs: number;
}

/** Prepares `dir` as a fresh demo workspace (refusing a non-empty folder that is not one). */
export function prepareWorkspace(dir: string): void {
  if (existsSync(dir) && readdirSync(dir).length > 0) {
    if (!existsSync(join(dir, MARKER))) {
      throw new ConfigInvalid(`the workspace ${dir} exists and is not a driftlight demo workspace`, {
        hint: 'Pass an empty or new folder.',
      });
    }
    rmSync(dir, { recursive: true, force: true });
  }
  for (const folder of ['inbox', 'results']) mkdirSync(join(dir, folder), { recursive: true });
  writeFileSync(join(dir, MARKER), 'created by `driftlight demo`; safe to delete\n');
}

/** Every result JSON under results/ (day folders YYYY-MM-DD; digest/, charts/ and export/ are not results). */
export function readResultFiles(resultsDir: string): AnalysisResult[] {
  const out: AnalysisResult[] = [];
  if (!existsSync(resultsDir)) return out;
  for (const day of readdirSync(resultsDir).sort()) {
    const dayDir = join(resultsDir, day);
    if (!/^\d{4}-\d{2}-\d{2}$/.test(day) || !statSync(dayDir).isDirectory()) continue;
    for (const name of readdirSync(dayDir).sort()) {
      if (name.endsWith('.json') && !name.startsWith('.'))
        out.push(JSON.parse(readFileSync(join(dayDir, name), 'utf8')) as AnalysisResult);
    }
  }
  return out;
}

/** Every quarantined input with its code (from the NAME.error.json beside it). */
export function readQuarantine(quarantineDir: string): RejectedInput[] {
  const out: RejectedInput[] = [];
  const walk = (dir: string): void => {
    if (!existsSync(dir)) return;
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const path = join(dir, entry.name);
      if (entry.isDirectory()) walk(path);
      else if (entry.name.endsWith('.error.json')) {
        const record = JSON.parse(readFileSync(path, 'utf8')) as { code?: string; message?: string };
        out.push({
          file: entry.name.slice(0, -'.error.json'.length),
          code: record.code ?? '?',
          message: record.message ?? '',
        });
      }
    }
  };
  walk(quarantineDir);
  return out.sort((a, b) => a.file.localeCompare(b.file));
}

async function waitUntil(what: string, condition: () => boolean, timeoutMs = 30_000): Promise<void> {
  const start = Date.now();
  while (!condition()) {
    if (Date.now() - start > timeoutMs) throw new Error(`demo: timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

/** Runs the month in `workspace` (prepared fresh); `progress` receives one line per day. */
export async function runDemoMonth(
  workspace: string,
  progress: (line: string) => void = () => undefined,
  seed?: number,
): Promise<DemoRunReport> {
  const started = Date.now();
  const dir = resolve(workspace);
  prepareWorkspace(dir);
  const month = generateDemoMonth(seed);
  const receiver = await startWebhookReceiver();
  writeFileSync(join(dir, 'driftlight.yaml'), month.config.replace('{{WEBHOOK_URL}}', receiver.url));
  writeFileSync(join(dir, 'rules.yaml'), month.rules);
  writeFileSync(join(dir, 'truth.json'), `${JSON.stringify(month.truth, null, 2)}\n`);

  let nowMs = Date.parse(`${monthDate(1)}T06:00:00Z`);
  const clock = (): Date => new Date(nowMs);
  let stopWatch: (signal: string) => void = () => undefined;
  const stop = new Promise<string>((r) => {
    stopWatch = r;
  });
  let onReady: (pipeline: Pipeline) => void = () => undefined;
  const ready = new Promise<Pipeline>((r) => {
    onReady = r;
  });
  const watchDone = runWatch({ config: join(dir, 'driftlight.yaml') }, stop, {
    clock,
    clockCheckIntervalMs: 50,
    tickIntervalMs: 20,
    onReady,
  });
  let pipeline: Pipeline;
  try {
    pipeline = await Promise.race([
      ready,
      watchDone.then((): never => {
        throw new Error('demo: the watch loop ended before it was ready');
      }),
    ]);
    const { coordinator, stages } = pipeline;
    const idle = async (): Promise<void> => {
      await Promise.all(stages.map((stage) => stage.idle?.()));
    };
    let written = 0;
    const inbox = join(dir, 'inbox');
    for (let day = 1; day <= MONTH_DAYS; day++) {
      receiver.currentDay = day;
      const todays = month.arrivals.filter((a) => a.day === day);
      const alertsBefore = receiver.alerts.length;
      const doneBefore = coordinator.counts.setsDone;
      const rejectedBefore = coordinator.counts.filesRejected;
      const times = [...new Set(todays.map((a) => a.arriveAt))];
      for (const at of times) {
        nowMs = Date.parse(at);
        for (const arrival of todays.filter((a) => a.arriveAt === at)) {
          writeFileSync(join(inbox, arrival.file.name), arrival.file.content);
          written += 1;
        }
        await waitUntil(
          `intake of the files of ${at}`,
          () => coordinator.counts.filesAccepted + coordinator.counts.filesRejected >= written,
        );
        await waitUntil(`the analyses of ${at}`, () => coordinator.pendingJobs === 0);
      }
      // End of the day: sets still waiting for a part pass their deadline and go out as partial.
      nowMs = Date.parse(`${monthDate(day)}T23:30:00Z`);
      await waitUntil(`the end of day ${day}`, () => coordinator.openSetCount === 0 && coordinator.pendingJobs === 0);
      await idle();
      const dayAlerts = receiver.alerts
        .slice(alertsBefore)
        .map(
          (a) =>
            `${String(a.payload['ruleId'])}${a.payload['type'] === 'recovery' ? ' recovered' : ` (${String(a.payload['severity'])})`}`,
        );
      progress(
        `day ${String(day).padStart(2)} ${monthDate(day)}: ${String(todays.length).padStart(2)} files, ${coordinator.counts.setsDone - doneBefore} sets` +
          `${coordinator.counts.filesRejected > rejectedBefore ? `, ${coordinator.counts.filesRejected - rejectedBefore} rejected` : ''}` +
          `${dayAlerts.length > 0 ? `, alerts: ${dayAlerts.join(', ')}` : ''}`,
      );
    }
  } finally {
    stopWatch('demo finished');
    await watchDone;
    await receiver.close();
  }
  // What the webhook received, with the scenario day of arrival (the test and curious users read it).
  writeFileSync(join(dir, 'webhook-received.json'), `${JSON.stringify(receiver.alerts, null, 2)}\n`);
  progress('writing the digest of the last day, the control chart and the summary CSV');
  const outputs = await writeDemoOutputs(dir, {
    firstDate: monthDate(1),
    lastDate: monthDate(MONTH_DAYS),
    now: clock(),
  });
  return {
    month,
    workspace: dir,
    alerts: receiver.alerts,
    results: readResultFiles(join(dir, 'results')),
    rejected: readQuarantine(join(dir, 'quarantine')),
    setsProcessed: pipeline.coordinator.counts.setsDone,
    setsPartial: pipeline.coordinator.counts.setsPartial,
    outputs,
    elapsedMs: Date.now() - started,
  };
}
