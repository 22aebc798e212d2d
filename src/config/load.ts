// Reads driftlight.yaml (YAML or JSON) from disk and resolves it; the one place config files are read.
import { existsSync, readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { parseDocument } from 'yaml';
import { ConfigInvalid } from '../model/errors.js';
import { resolveConfig, type DriftlightConfig } from './resolve.js';

export const DEFAULT_CONFIG_FILE = 'driftlight.yaml';

/** Loads and resolves the config at `file` (default ./driftlight.yaml; built-in defaults when that default file is absent); throws ConfigInvalid. */
export function loadConfig(file?: string, cwd: string = process.cwd()): DriftlightConfig {
  const path = resolve(cwd, file ?? DEFAULT_CONFIG_FILE);
  if (!existsSync(path)) {
    if (file === undefined) return resolveConfig({}, { baseDir: cwd });
    throw new ConfigInvalid(`config file not found: ${path}`, {
      file: path,
      hint: 'Pass an existing file with --config, or omit it to use ./driftlight.yaml.',
    });
  }
  return configFromText(readFileSync(path, 'utf8'), path);
}

/** Parses config text (YAML or JSON) as read from `path` and resolves it against the file's folder; throws ConfigInvalid. */
export function configFromText(text: string, path: string): DriftlightConfig {
  const document = parseDocument(text, { prettyErrors: true });
  const firstError = document.errors[0];
  if (firstError !== undefined) {
    const line = firstError.linePos?.[0].line;
    throw new ConfigInvalid(`the config is not valid YAML: ${firstError.message.split('\n')[0] ?? ''}`, {
      file: path,
      line,
      hint: 'Fix the YAML syntax at the named line (indentation, a missing colon or quote).',
    });
  }
  return resolveConfig(document.toJS() as unknown, { baseDir: dirname(path), configFile: path });
}
