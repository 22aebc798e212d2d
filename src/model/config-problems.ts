// Config and rule-file problems as one clear line each: an unknown key is named with the nearest valid
// key at its place (edit distance), repeated problems are said once, and every line carries its full
// path. Used by the config loader, rule files and manifests (issue 20.8).
import type { z } from 'zod';
import { itemAt } from './item-at.js';

/** A problem at a config path. */
export interface ConfigProblem {
  readonly path: readonly PropertyKey[];
  readonly message: string;
}

/** `controls[0].targetYield` from ['controls', 0, 'targetYield']; '(top level)' for []. */
export function formatProblemPath(path: readonly PropertyKey[]): string {
  let text = '';
  for (const key of path) {
    if (typeof key === 'number') text += `[${key}]`;
    else text += text === '' ? String(key) : `.${String(key)}`;
  }
  return text === '' ? '(top level)' : text;
}

/**
 * Optimal-string-alignment distance (Levenshtein plus adjacent transpositions; Damerau, CACM 7, 171 (1964)),
 * case-insensitive. O(|a|·|b|).
 */
export function editDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  const rows = s.length + 1;
  const cols = t.length + 1;
  const d = new Array<number>(rows * cols).fill(0);
  for (let i = 0; i < rows; i++) d[i * cols] = i;
  for (let j = 0; j < cols; j++) d[j] = j;
  for (let i = 1; i < rows; i++) {
    for (let j = 1; j < cols; j++) {
      const cost = s[i - 1] === t[j - 1] ? 0 : 1;
      let best = Math.min(
        itemAt(d, (i - 1) * cols + j) + 1,
        itemAt(d, i * cols + j - 1) + 1,
        itemAt(d, (i - 1) * cols + j - 1) + cost,
      );
      if (i > 1 && j > 1 && s[i - 1] === t[j - 2] && s[i - 2] === t[j - 1])
        best = Math.min(best, itemAt(d, (i - 2) * cols + j - 2) + 1);
      d[i * cols + j] = best;
    }
  }
  return itemAt(d, rows * cols - 1);
}

/**
 * The candidate nearest to `word` when it is close enough to be a misspelling (distance ≤ max(2, ⌊length/3⌋)),
 * else the one candidate `word` (3+ characters) begins, else undefined.
 */
export function nearestName(word: string, candidates: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const candidate of candidates) {
    const distance = editDistance(word, candidate);
    if (distance < bestDistance) {
      best = candidate;
      bestDistance = distance;
    }
  }
  if (best !== undefined && bestDistance <= Math.max(2, Math.floor(word.length / 3))) return best;
  const lower = word.toLowerCase();
  const extending = word.length >= 3 ? candidates.filter((candidate) => candidate.toLowerCase().startsWith(lower)) : [];
  return extending.length === 1 ? extending[0] : undefined;
}

type AnySchema = z.core.$ZodType;

/** The schema below wrappers (default, optional, pipe, …) that do not change which keys an object takes. */
function unwrap(schema: AnySchema): AnySchema {
  let current = schema;
  for (let depth = 0; depth < 20; depth++) {
    const def = current._zod.def as unknown as {
      type: string;
      innerType?: AnySchema;
      in?: AnySchema;
      getter?: () => AnySchema;
    };
    if (def.innerType !== undefined) current = def.innerType;
    else if (def.type === 'pipe' && def.in !== undefined) current = def.in;
    else if (def.type === 'lazy' && def.getter !== undefined) current = def.getter();
    else return current;
  }
  return current;
}

/** The option of a union that the value's discriminator selects (or the only object option), if any. */
function unionOption(
  def: { options?: readonly AnySchema[]; discriminator?: string },
  value: unknown,
): AnySchema | undefined {
  const options = (def.options ?? []).map(unwrap);
  const objects = options.filter((option) => option._zod.def.type === 'object');
  if (def.discriminator !== undefined && typeof value === 'object' && value !== null) {
    const tag = (value as Record<string, unknown>)[def.discriminator];
    return objects.find((option) => {
      const field = (option._zod.def as unknown as { shape: Record<string, AnySchema> }).shape[
        def.discriminator as string
      ];
      const values =
        field === undefined ? undefined : (unwrap(field)._zod as unknown as { values?: Set<unknown> }).values;
      return values?.has(tag) === true;
    });
  }
  return objects.length === 1 ? objects[0] : undefined;
}

/** The keys the object schema at `path` accepts (following the raw value through arrays, records and unions), or undefined. */
export function keysAt(schema: AnySchema, path: readonly PropertyKey[], raw: unknown): string[] | undefined {
  let current: AnySchema | undefined = unwrap(schema);
  let value = raw;
  const step = (): void => {
    const def = current?._zod.def as unknown as
      { type: string; options?: readonly AnySchema[]; discriminator?: string } | undefined;
    if (def?.type === 'union') current = unionOption(def, value);
  };
  step();
  for (const key of path) {
    if (current === undefined) return undefined;
    const def = current._zod.def as unknown as {
      type: string;
      shape?: Record<string, AnySchema>;
      element?: AnySchema;
      valueType?: AnySchema;
    };
    if (def.type === 'object' && typeof key === 'string') current = def.shape?.[key];
    else if (def.type === 'array') current = def.element;
    else if (def.type === 'record') current = def.valueType;
    else return undefined;
    value = typeof value === 'object' && value !== null ? (value as Record<PropertyKey, unknown>)[key] : undefined;
    if (current === undefined) return undefined;
    current = unwrap(current);
    step();
  }
  const def = current?._zod.def as unknown as { type: string; shape?: Record<string, AnySchema> } | undefined;
  return def?.type === 'object' && def.shape !== undefined ? Object.keys(def.shape) : undefined;
}

/** The line for one unknown key: its full path, and the nearest valid key or the valid keys. */
export function unknownKeyLine(
  path: readonly PropertyKey[],
  key: string,
  validKeys: readonly string[] | undefined,
): ConfigProblem {
  const near = validKeys === undefined ? undefined : nearestName(key, validKeys);
  const message =
    near !== undefined
      ? `unknown option "${key}"; did you mean "${near}"?`
      : validKeys === undefined || validKeys.length === 0
        ? `unknown option "${key}"`
        : `unknown option "${key}" (valid here: ${validKeys.join(', ')})`;
  return { path: [...path, key], message };
}

/**
 * zod issues as problems, one per unknown key (with the nearest valid key, from `schema` and the raw input)
 * and one per other issue; union issues are replaced by the issues of the option the value selects.
 */
export function problemsFromIssues(
  issues: readonly z.core.$ZodIssue[],
  schema: AnySchema,
  raw: unknown,
  prefix: readonly PropertyKey[] = [],
): ConfigProblem[] {
  const out: ConfigProblem[] = [];
  for (const issue of issues) {
    const path = [...prefix, ...issue.path];
    if (issue.code === 'unrecognized_keys') {
      const valid = keysAt(schema, issue.path, raw);
      for (const key of issue.keys) out.push(unknownKeyLine(path, key, valid));
    } else if (
      issue.code === 'invalid_union' &&
      issue.errors.length > 0 &&
      issue.errors.every((list) => list.length > 0)
    ) {
      // No option fitted: report the option with the fewest problems, not every option's (the user wrote one of them).
      const fewest = [...issue.errors].sort((a, b) => a.length - b.length)[0] ?? [];
      out.push(
        ...problemsFromIssues(
          fewest.map((sub) => ({ ...sub, path: [...issue.path, ...sub.path] })),
          schema,
          raw,
          prefix,
        ),
      );
    } else if (issue.code === 'invalid_type' && / received undefined$/.test(issue.message)) {
      out.push({ path, message: `required, and missing (expected ${issue.expected})` });
    } else {
      out.push({ path, message: issue.message });
    }
  }
  return out;
}

/** The problems as lines `path: message`, each said once, in order. */
export function problemLines(problems: readonly ConfigProblem[]): string[] {
  return [...new Set(problems.map((problem) => `${formatProblemPath(problem.path)}: ${problem.message}`))];
}
