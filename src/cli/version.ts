// The software version, read once from package.json (recorded in every result's provenance).
import { readFileSync } from 'node:fs';

let cached: string | undefined;

/** driftlight's version string from package.json. */
export function softwareVersion(): string {
  if (cached === undefined) {
    const packageJsonUrl = new URL('../../../package.json', import.meta.url);
    const parsed = JSON.parse(readFileSync(packageJsonUrl, 'utf8')) as { version?: unknown };
    cached = typeof parsed.version === 'string' ? parsed.version : '0.0.0';
  }
  return cached;
}
