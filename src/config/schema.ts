// The driftlight.yaml schema: one zod schema per section (src/config/sections/), composed here.
// Add a section by adding a file and a row to CONFIG_SECTIONS.
import { z } from 'zod';
import { alertsSection } from './sections/alerts.js';
import { analysisSection } from './sections/analysis.js';
import { assemblySection } from './sections/assembly.js';
import { controlsSection } from './sections/controls.js';
import { digestSection } from './sections/digest.js';
import { foldersSection } from './sections/folders.js';
import { formatsSection } from './sections/formats.js';
import { instrumentSection } from './sections/instrument.js';
import { limitsSection } from './sections/limits.js';
import { loggingSection } from './sections/logging.js';
import { queueSection } from './sections/queue.js';
import { referencesSection } from './sections/references.js';
import { rulesSection } from './sections/rules.js';
import { watchSection } from './sections/watch.js';

export const CONFIG_SECTIONS = {
  folders: foldersSection,
  watch: watchSection,
  assembly: assemblySection,
  instrument: instrumentSection,
  references: referencesSection,
  controls: controlsSection,
  analysis: analysisSection,
  queue: queueSection,
  logging: loggingSection,
  limits: limitsSection,
  formats: formatsSection,
  rules: rulesSection,
  alerts: alertsSection,
  digest: digestSection,
} as const;

export const configSchema = z.strictObject(CONFIG_SECTIONS);

/** What a user writes in driftlight.yaml: every field optional. */
export type DriftlightConfigInput = z.input<typeof configSchema>;
/** The validated config with every default filled in (before path resolution). */
export type DriftlightConfigParsed = z.output<typeof configSchema>;
