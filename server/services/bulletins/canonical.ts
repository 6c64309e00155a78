// Canonical JSON of a locked bulletin version and its SHA-256.
// Canonical form (Tocsin's rule; close to RFC 8785 JCS for the values we store): object keys sorted by UTF-16 code
// units (JavaScript's default sort, as JCS), no whitespace, arrays in order, strings and numbers as JSON.stringify
// writes them (ECMAScript Number-to-String, which JCS also uses), `undefined` members left out, UTF-8 bytes hashed.
// The hash is hex SHA-256 (FIPS 180-4) of those bytes.
import { createHash } from 'node:crypto';

export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    if (typeof value === 'number' && !Number.isFinite(value)) throw new Error('canonical JSON: non-finite number');
    const s = JSON.stringify(value);
    if (s === undefined) throw new Error(`canonical JSON: cannot encode ${typeof value}`);
    return s;
  }
  if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? 'null' : canonicalJson(v))).join(',')}]`;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined)
    .sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`).join(',')}}`;
}

export function sha256Hex(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}
