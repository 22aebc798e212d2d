// The bookkeeping shared by analysis steps: warnings, what is missing and why, corrections applied.
import { DriftlightError } from '../model/errors.js';
import type { AppliedCorrection, MissingItem } from './result.js';

export interface StepContext {
  /** Set when a part was missing or a step failed (not when a quantity simply does not apply). */
  partial: boolean;
  readonly warnings: string[];
  readonly missing: MissingItem[];
  readonly corrections: AppliedCorrection[];
}

/** A fresh, empty context. */
export function createStepContext(): StepContext {
  return { partial: false, warnings: [], missing: [], corrections: [] };
}

/** The reason text for an error: `CODE: message` for driftlight errors, else the message. */
export function reasonOf(error: unknown): string {
  if (error instanceof DriftlightError) return `${error.code}: ${error.message}`;
  return `INTERNAL: ${error instanceof Error ? error.message : String(error)}`;
}

/** Records that `what` could not be had; `failed` (default) marks the result partial. */
export function markMissing(context: StepContext, what: string, reason: string, failed = true): void {
  context.missing.push({ what, reason });
  if (failed) context.partial = true;
}

/** Runs `step`; on failure records `what` as missing with the error as reason (result partial) and returns undefined. */
export function attempt<T>(context: StepContext, what: string, step: () => T): T | undefined {
  try {
    return step();
  } catch (error) {
    markMissing(context, what, reasonOf(error));
    return undefined;
  }
}
