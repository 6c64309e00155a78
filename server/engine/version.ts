// The engine's version string stored with every result (provenance): the package version and the engine part.
import { readFileSync } from 'node:fs';

/** "tocsin-engine 1.2.3 (part)", or without the number when package.json cannot be read. */
export function engineVersion(part: string): string {
  try {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: string };
    return `tocsin-engine ${pkg.version ?? 'unknown'} (${part})`;
  } catch {
    return `tocsin-engine (${part})`;
  }
}
