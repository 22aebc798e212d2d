// The result stages every pipeline runs, in order: one row per stage factory. The QC module adds its
// rule stage (and alerts in afterCommit) by adding a row here; see result-stage.ts for the contract.
import type { Logger } from 'pino';
import type { DriftlightConfig } from '../config/resolve.js';
import type { ResultStage } from './result-stage.js';
import { qcStageFromConfig } from './qc-stage.js';
import { supersededInputsStage } from './input-versions.js';

/** Builds a stage from the resolved config and the pipeline's logger. */
export type ResultStageFactory = (
  config: DriftlightConfig,
  context: { readonly logger: Logger; readonly clock?: () => Date },
) => ResultStage;

export const RESULT_STAGE_FACTORIES: readonly ResultStageFactory[] = [
  // Earlier versions of inputs that changed at their path (issue 20) into provenance.supersededInputs.
  () => supersededInputsStage,
  // Control QC: rules from config.rules.file (or rules/default.yaml), flags into the result, alerts after commit.
  (config, { logger, clock }) =>
    qcStageFromConfig(config, { logger, ...(clock === undefined ? {} : { nowMs: () => clock().getTime() }) }),
];

/** The configured stages, in table order; `clock` (default: the system clock) times alert cooldowns. */
export function defaultResultStages(config: DriftlightConfig, logger: Logger, clock?: () => Date): ResultStage[] {
  return RESULT_STAGE_FACTORIES.map((factory) =>
    factory(config, { logger, ...(clock === undefined ? {} : { clock }) }),
  );
}
