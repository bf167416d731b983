// The package root exports exactly the names the README's "Library" section documents.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { expect, it } from 'vitest';
import * as api from '../../src/index.js';

const README = readFileSync(fileURLToPath(new URL('../../README.md', import.meta.url)), 'utf8');
const INDEX = readFileSync(fileURLToPath(new URL('../../src/index.ts', import.meta.url)), 'utf8');

/** The backquoted names on the README line that starts with `- values:` or `- types:` and its continuation lines. */
function documented(kind: 'values' | 'types'): string[] {
  const start = README.indexOf(`- ${kind}: `);
  expect(start).toBeGreaterThan(0);
  const end = README.indexOf('\n-', start + 1) === -1 ? README.length : Math.min(README.indexOf('\n-', start + 1), README.indexOf('\n\n', start));
  return [...README.slice(start, end).matchAll(/`([A-Za-z]+)`/g)].map((m) => m[1]!).sort();
}

it('exports exactly the documented values', () => {
  expect(Object.keys(api).sort()).toEqual(documented('values'));
});

it('exports exactly the documented types', () => {
  const types = [...INDEX.matchAll(/\btype\s+([A-Z][A-Za-z]+)/g)].map((m) => m[1]!);
  const typeOnlyBlocks = [...INDEX.matchAll(/export type \{([^}]*)\}/g)].flatMap((m) => m[1]!.split(',').map((n) => n.trim()).filter(Boolean));
  expect([...new Set([...types, ...typeOnlyBlocks])].sort()).toEqual(documented('types'));
});
