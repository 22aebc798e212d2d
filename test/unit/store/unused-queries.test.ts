// Every typed query of src/store/ is called by the code (issue 20, item 9): a query nothing calls is
// dead SQL that still has to be kept in step with every migration. Reads the sources as text.
import { readFileSync, readdirSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = join(import.meta.dirname, '..', '..', '..');

/** Queries only a test calls, each with the reason it stays. */
const CALLED_BY_TESTS_ONLY: Readonly<Record<string, string>> = {
  recentDeliveries: 'test/integration/rules-stage.test.ts reads the delivery records through it',
};

function sourcesUnder(dir: string): string[] {
  return readdirSync(join(root, dir), { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && e.name.endsWith('.ts'))
    .map((e) => join(e.parentPath, e.name));
}

describe('store queries', () => {
  it('are each called outside their definition in src/, workers/ or bench/', () => {
    const code = ['src', 'workers', 'bench'].flatMap(sourcesUnder);
    const texts = new Map(code.map((path) => [path, readFileSync(path, 'utf8')]));
    const uncalled: string[] = [];
    for (const storeFile of sourcesUnder('src/store')) {
      const own = texts.get(storeFile) ?? '';
      for (const match of own.matchAll(/^export (?:async )?(?:function|const) ([A-Za-z0-9_]+)/gm)) {
        const name = match[1] ?? '';
        const word = new RegExp(`\\b${name}\\b`);
        const usesInOwnFile = own.split(word).length - 2;
        const usedElsewhere = [...texts].some(([path, text]) => path !== storeFile && word.test(text));
        if (usesInOwnFile === 0 && !usedElsewhere && CALLED_BY_TESTS_ONLY[name] === undefined)
          uncalled.push(`${relative(root, storeFile)}: ${name}`);
      }
    }
    expect(uncalled).toEqual([]);
  });
});
