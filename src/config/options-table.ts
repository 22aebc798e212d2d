// Every config option with its type, default and description, derived from the zod schema (via
// its JSON Schema) so docs/configuration.md and `driftlight config docs` cannot drift from the code.
import { z } from 'zod';
import { configSchema } from './schema.js';

export interface ConfigOptionRow {
  readonly path: string;
  readonly type: string;
  readonly defaultValue: string;
  readonly description: string;
}

interface JsonSchemaNode {
  type?: string | string[];
  properties?: Record<string, JsonSchemaNode>;
  items?: JsonSchemaNode;
  anyOf?: JsonSchemaNode[];
  enum?: unknown[];
  const?: unknown;
  default?: unknown;
  description?: string;
  additionalProperties?: JsonSchemaNode | boolean;
}

function typeName(node: JsonSchemaNode): string {
  if (node.enum !== undefined) return node.enum.map((v) => JSON.stringify(v)).join(' \\| ');
  if (node.const !== undefined) return JSON.stringify(node.const);
  if (node.anyOf !== undefined) return node.anyOf.map(typeName).join(' \\| ');
  if (node.type === 'object' && node.properties !== undefined) return 'object';
  if (node.type === 'array') return `${node.items === undefined ? 'any' : typeName(node.items)}[]`;
  if (Array.isArray(node.type)) return node.type.join(' \\| ');
  if (
    node.type === 'object' &&
    node.additionalProperties !== undefined &&
    typeof node.additionalProperties === 'object'
  ) {
    return `map of ${typeName(node.additionalProperties)}`;
  }
  return node.type ?? 'any';
}

function walk(node: JsonSchemaNode, path: string, rows: ConfigOptionRow[]): void {
  const isSection = node.type === 'object' && node.properties !== undefined;
  if (path !== '' && (!isSection || node.description !== undefined)) {
    rows.push({
      path,
      type: isSection ? 'object' : typeName(node),
      defaultValue: node.default === undefined ? '—' : JSON.stringify(node.default),
      description: node.description ?? '',
    });
  }
  if (isSection && node.properties !== undefined) {
    for (const [key, child] of Object.entries(node.properties)) walk(child, path === '' ? key : `${path}.${key}`, rows);
  }
  if (node.type === 'array' && node.items?.properties !== undefined) {
    for (const [key, child] of Object.entries(node.items.properties)) walk(child, `${path}[].${key}`, rows);
  }
}

/** One row per config option, in schema order. */
export function configOptionRows(): ConfigOptionRow[] {
  const json = z.toJSONSchema(configSchema, { io: 'input', unrepresentable: 'any' }) as JsonSchemaNode;
  const rows: ConfigOptionRow[] = [];
  walk(json, '', rows);
  return rows;
}

/** The option table as Markdown (the generated part of docs/configuration.md). */
export function configOptionsMarkdown(): string {
  const escape = (text: string): string => text.replace(/\|/g, '\\|').replace(/\n/g, ' ');
  const lines = ['| option | type | default | meaning (unit, default) |', '| --- | --- | --- | --- |'];
  for (const row of configOptionRows()) {
    lines.push(`| \`${row.path}\` | ${row.type} | \`${escape(row.defaultValue)}\` | ${escape(row.description)} |`);
  }
  return `${lines.join('\n')}\n`;
}
