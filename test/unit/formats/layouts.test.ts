// The layout table: every invented fixture under test/fixtures/formats/layouts/ is read and judged
// against the outcome make_layouts.py computed for it (numbers from Python, not from driftlight).
// No layout may be misread, and each outcome must be the one recorded as "after" in layouts.json.
// LAYOUTS_RECORD=FILE writes the outcomes as JSON (used to fill the "before"/"after" columns).
import { readFileSync, writeFileSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { layoutOutcome, loadLayouts, type LayoutOutcome } from './layouts-outcome.js';

const layouts = loadLayouts();
const recorded: Record<string, LayoutOutcome> = {};

describe('layout table (test/fixtures/formats/layouts)', () => {
  it('holds about sixty layouts', () => {
    expect(layouts.length).toBeGreaterThanOrEqual(60);
  });

  it.each(layouts.map((entry) => [entry.file, entry] as const))('%s', (_file, entry) => {
    const outcome = layoutOutcome(entry);
    recorded[entry.file] = outcome;
    if (process.env['LAYOUTS_RECORD'] !== undefined) return;
    expect(outcome.status).not.toBe('misread');
    if (entry.expect.type === 'rejected') expect(outcome.summary).toBe(`refused ${String(entry.expect.code)}`);
    else expect(outcome.summary).toBe('read');
    expect(outcome.summary).toBe(entry.after);
  });

  it('is listed row by row in docs/formats.md with its before and after', () => {
    const docs = readFileSync(new URL('../../../docs/formats.md', import.meta.url), 'utf8');
    for (const entry of layouts) {
      expect(docs).toContain(
        `| \`${entry.file}\` | ${entry.group} | ${entry.layout} | ${entry.before ?? ''} | ${entry.after ?? ''} |`,
      );
    }
    expect(layouts.filter((entry) => (entry.after ?? '').startsWith('misread'))).toEqual([]);
  });

  afterAll(() => {
    const target = process.env['LAYOUTS_RECORD'];
    if (target !== undefined) writeFileSync(target, `${JSON.stringify(recorded, null, 1)}\n`);
  });
});
