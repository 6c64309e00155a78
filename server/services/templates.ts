// Tiny template filler for templates/email: {{name}} placeholders, HTML-escaped in .html files.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const TEMPLATES_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../templates');

const cache = new Map<string, string>();

function load(relative: string): string {
  let text = cache.get(relative);
  if (text === undefined) {
    text = fs.readFileSync(path.join(TEMPLATES_DIR, relative), 'utf8');
    cache.set(relative, text);
  }
  return text;
}

export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** Fill a template; every placeholder must have a value (a missing one is a programming error). */
export function render(relative: string, values: Record<string, string>): string {
  const html = relative.endsWith('.html');
  return load(relative).replace(/\{\{\s*(\w+)\s*\}\}/g, (_, key: string) => {
    const value = values[key];
    if (value === undefined) throw new Error(`Template ${relative}: no value for {{${key}}}`);
    return html ? escapeHtml(value) : value;
  });
}
