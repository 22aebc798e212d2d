// The worker-thread side of the task pool: loads the processor module once per thread and runs one
// payload (or each payload of a BatchTask, in order), returning plain data. Errors never cross the
// thread boundary as exceptions (their code, hint and permanence would be lost); they come back as a
// JobFailure instead.
import { workerData } from 'node:worker_threads';
import { toJobFailure } from './job-failure.js';
import { isBatchTask, type TaskResult } from './task-result.js';

type Processor = (payload: unknown) => unknown;

let processorPromise: Promise<Processor> | undefined;

async function loadProcessor(): Promise<Processor> {
  const data = workerData as { processorHref?: unknown } | undefined;
  const href = data?.processorHref;
  if (typeof href !== 'string') throw new Error('pool thread started without processorHref');
  const loaded = (await import(href)) as { default?: unknown };
  if (typeof loaded.default !== 'function') {
    throw Object.assign(new Error(`processor ${href} has no default export function`), { code: 'CONFIG_INVALID' });
  }
  return loaded.default as Processor;
}

/** Runs one payload through the processor; never throws. */
async function runOne(payload: unknown): Promise<TaskResult> {
  try {
    processorPromise ??= loadProcessor();
    const processor = await processorPromise;
    return { ok: true, value: await processor(payload) };
  } catch (error) {
    return { ok: false, failure: toJobFailure(error) };
  }
}

/** Runs one payload, or each payload of a BatchTask in order (one result each: a failure stays that payload's own); never throws. */
export default async function runPoolTask(task: unknown): Promise<TaskResult | TaskResult[]> {
  if (!isBatchTask(task)) return runOne(task);
  const results: TaskResult[] = [];
  for (const payload of task.payloads) results.push(await runOne(payload));
  return results;
}
