// Config section `folders`: where driftlight reads, writes and keeps its state. Relative paths
// resolve against the directory of the config file.
import { z } from 'zod';

export const foldersSection = z
  .strictObject({
    inbox: z
      .string()
      .min(1)
      .default('inbox')
      .describe('Folder the instruments export into (watched, nested folders included). Default: inbox'),
    archive: z
      .string()
      .min(1)
      .default('archive')
      .describe('Inputs move here (archive/YYYY-MM-DD/) once their result is durable. Default: archive'),
    quarantine: z
      .string()
      .min(1)
      .default('quarantine')
      .describe('Rejected inputs go here with NAME.error.json. Default: quarantine'),
    results: z
      .string()
      .min(1)
      .default('results')
      .describe('One result JSON per set under results/YYYY-MM-DD/. Default: results'),
    outbox: z
      .string()
      .min(1)
      .default('outbox')
      .describe('Corrected spectra (CSV, JCAMP-DX) and fitted decays for downstream tools. Default: outbox'),
    state: z.string().min(1).default('state').describe('Ledger database (SQLite) and log file. Default: state'),
  })
  .prefault({});

export type FoldersConfig = z.output<typeof foldersSection>;
