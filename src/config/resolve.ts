// Turns a parsed driftlight.yaml object into the resolved, frozen config: validates with zod,
// fills defaults, resolves relative folders against the config directory, checks regexes.
import { isAbsolute, join, resolve } from 'node:path';
import { problemLines, problemsFromIssues } from '../model/config-problems.js';
import { ConfigInvalid } from '../model/errors.js';
import { configSchema, type DriftlightConfigParsed } from './schema.js';

/** The config as the program uses it: defaults filled, folders absolute, deeply frozen. */
export type DriftlightConfig = DriftlightConfigParsed & {
  /** Absolute path of the config file, or undefined for the built-in defaults. */
  readonly configFile: string | undefined;
  /** Absolute directory relative paths were resolved against. */
  readonly baseDir: string;
  /** Absolute path of the log file. */
  readonly logFile: string;
  /** The folders the config file names itself (`folders.*` keys present), as opposed to defaults beside it. */
  readonly configuredFolders: readonly string[];
};

/** Formats a zod issue path as `controls[0].targetYield`. */
export function formatConfigPath(path: readonly PropertyKey[]): string {
  let text = '';
  for (const key of path) {
    if (typeof key === 'number') text += `[${key}]`;
    else text += text === '' ? String(key) : `.${String(key)}`;
  }
  return text === '' ? '(top level)' : text;
}

function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object' && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const child of Object.values(value)) deepFreeze(child);
  }
  return value;
}

function checkRegex(pattern: string, configPath: string, where: string): void {
  try {
    new RegExp(pattern);
  } catch (error) {
    throw new ConfigInvalid(`invalid regular expression /${pattern}/: ${(error as Error).message}`, {
      configPath,
      file: where,
    });
  }
}

/** Validates `raw` (parsed YAML/JSON), fills defaults, resolves folders against `baseDir`, freezes; throws ConfigInvalid naming the first bad path. */
export function resolveConfig(raw: unknown, options: { baseDir: string; configFile?: string }): DriftlightConfig {
  const where = options.configFile ?? '(defaults)';
  const parsed = configSchema.safeParse(raw ?? {});
  if (!parsed.success) {
    // One line per problem, each with its full path; an unknown key names the nearest valid one.
    const problems = problemsFromIssues(parsed.error.issues, configSchema, raw ?? {});
    const first = problems[0];
    throw new ConfigInvalid(problemLines(problems).join('\n'), {
      file: where,
      configPath: first === undefined ? undefined : formatConfigPath(first.path),
    });
  }
  const config = parsed.data;
  const baseDir = resolve(options.baseDir);
  const abs = (p: string): string => (isAbsolute(p) ? p : resolve(baseDir, p));
  config.assembly.fileNamePatterns.forEach((p, i) => checkRegex(p, `assembly.fileNamePatterns[${i}]`, where));
  config.references.forEach((r, i) => checkRegex(r.sampleIdPattern, `references[${i}].sampleIdPattern`, where));
  config.controls.forEach((c, i) => checkRegex(c.sampleIdPattern, `controls[${i}].sampleIdPattern`, where));
  const folders = {
    inbox: abs(config.folders.inbox),
    archive: abs(config.folders.archive),
    quarantine: abs(config.folders.quarantine),
    results: abs(config.folders.results),
    outbox: abs(config.folders.outbox),
    state: abs(config.folders.state),
  };
  const instrument = {
    ...config.instrument,
    ...(config.instrument.detectorCorrectionFile === undefined
      ? {}
      : { detectorCorrectionFile: abs(config.instrument.detectorCorrectionFile) }),
  };
  const rules = { ...config.rules, ...(config.rules.file === undefined ? {} : { file: abs(config.rules.file) }) };
  const logFile = isAbsolute(config.logging.file) ? config.logging.file : join(folders.state, config.logging.file);
  const rawFolders = (raw as { folders?: unknown } | null | undefined)?.folders;
  const configuredFolders = typeof rawFolders === 'object' && rawFolders !== null ? Object.keys(rawFolders) : [];
  return deepFreeze({
    ...config,
    folders,
    instrument,
    rules,
    configFile: options.configFile,
    baseDir,
    logFile,
    configuredFolders,
  });
}
