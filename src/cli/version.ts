// The software version, read once from driftlight's package.json (recorded in every result's provenance).
// Works from the TypeScript sources (tests) and from the compiled dist/ tree alike.
import { existsSync, readFileSync } from 'node:fs';

let cached: string | undefined;

/** driftlight's version string from package.json (searched upwards from this module). */
export function softwareVersion(): string {
  if (cached !== undefined) return cached;
  let folder = new URL('./', import.meta.url);
  for (let depth = 0; depth < 6; depth++) {
    const candidate = new URL('package.json', folder);
    if (existsSync(candidate)) {
      const parsed = JSON.parse(readFileSync(candidate, 'utf8')) as { name?: unknown; version?: unknown };
      if (parsed.name === 'driftlight' && typeof parsed.version === 'string') {
        cached = parsed.version;
        return cached;
      }
    }
    folder = new URL('../', folder);
  }
  cached = '0.0.0-unknown';
  return cached;
}
