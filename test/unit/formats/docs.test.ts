// docs/formats.md cannot drift from the code: every vocabulary spelling, every canonical key and every
// error code the formats module raises is listed there.
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { VOCABULARY } from '../../../src/formats/index.js';

const ROOT = fileURLToPath(new URL('../../../', import.meta.url));
const docs = readFileSync(`${ROOT}docs/formats.md`, 'utf8');

describe('docs/formats.md', () => {
  it('lists every header-key spelling and canonical key of the vocabulary', () => {
    for (const row of VOCABULARY) {
      expect(docs).toContain(`\`${row.canonical}\``);
      for (const key of row.keys.filter((k) => !/^lambda(ex|em)$/.test(k))) expect(docs).toContain(key);
    }
  });

  it('lists every error code raised in src/formats', () => {
    const sources = readdirSync(`${ROOT}src/formats`)
      .map((name) => readFileSync(`${ROOT}src/formats/${name}`, 'utf8'))
      .join('\n');
    const codes = new Set([...sources.matchAll(/(?:reject|InputRejected)\(\s*'([A-Z_]+)'/g)].map((match) => match[1]));
    expect(codes.size).toBeGreaterThan(15);
    for (const code of codes) expect(docs).toContain(`\`${String(code)}\``);
  });
});
