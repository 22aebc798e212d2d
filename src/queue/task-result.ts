// The result of one attempt at one job, as plain data: a value, or a JobFailure.
import type { JobFailure } from './job-queue.js';

export type TaskResult = { readonly ok: true; readonly value: unknown } | { readonly ok: false; readonly failure: JobFailure };
