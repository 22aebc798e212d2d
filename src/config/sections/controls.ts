// Config section `controls`: the daily control fluorophore(s). The QC engineer extends the entry.
import { z } from 'zod';

const fraction = z
  .number({ error: 'expected a number between 0 and 1' })
  .min(0, { error: 'expected a number between 0 and 1' })
  .max(1, { error: 'expected a number between 0 and 1' });

export const controlEntry = z.looseObject({
  id: z.string().min(1).describe('Name of the control.'),
  sampleIdPattern: z.string().min(1).describe('Regular expression matched against sample ids; a match makes the set a control set.'),
  targetYield: fraction.optional().describe('Expected quantum yield. Default: none'),
  sdYield: z.number().positive().optional().describe('Expected standard deviation of the yield. Default: none'),
  targetTauNs: z.number().positive().optional().describe('Expected intensity-weighted lifetime in ns. Default: none'),
  sdTauNs: z.number().positive().optional().describe('Expected standard deviation of that lifetime in ns. Default: none'),
  baselineRuns: z.number().int().min(2).default(20)
    .describe('Metrics without a declared target are judged against the mean and SD of this many first runs (Levey–Jennings practice). Default: 20'),
});

export const controlsSection = z.array(controlEntry).default([])
  .describe('Control fluorophores checked by the QC rules. Default: []');

export type ControlConfig = z.output<typeof controlEntry>;
