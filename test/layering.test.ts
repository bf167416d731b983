import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

/**
 * The folders of src/, lowest first. A module may import from its own folder, from
 * src/'s top-level files (errors, checks) and from folders before its own; never from
 * one after it. The compute core comes first (DEVELOPERS.md), the I/O folders after it,
 * the command line last. Type-only imports count: a circle of types is still a circle.
 */
const LAYERS = ['image', 'features', 'model', 'detect', 'boost', 'cascade', 'metrics', 'report', 'runtime', 'io', 'data', 'parallel', 'jobs', 'cli'] as const;
const SOURCE = fileURLToPath(new URL('../src/', import.meta.url));

/** Every import between folders: [importing folder, imported folder, file]. */
function folderImports(): Array<[string, string, string]> {
  const edges: Array<[string, string, string]> = [];
  for (const folder of readdirSync(SOURCE, { withFileTypes: true }).filter((entry) => entry.isDirectory()).map((entry) => entry.name)) {
    const walk = (directory: string): void => {
      for (const entry of readdirSync(directory, { withFileTypes: true })) {
        const path = join(directory, entry.name);
        if (entry.isDirectory()) walk(path);
        else if (entry.name.endsWith('.ts')) {
          const text = readFileSync(path, 'utf8');
          for (const match of text.matchAll(/(?:from|import)\s*\(?\s*'\.\.\/([a-z-]+)\//g)) {
            if (match[1] !== folder) edges.push([folder, match[1]!, path.slice(SOURCE.length)]);
          }
        }
      }
    };
    walk(join(SOURCE, folder));
  }
  return edges;
}

describe('layers of src/', () => {
  const edges = folderImports();

  it('name every folder of src/', () => {
    const folders = readdirSync(SOURCE, { withFileTypes: true }).filter((entry) => entry.isDirectory()).map((entry) => entry.name).sort();
    expect(folders).toEqual([...LAYERS].sort());
  });

  it('never import a folder above their own', () => {
    const upward = edges.filter(([from, to]) => LAYERS.indexOf(to as never) > LAYERS.indexOf(from as never)).map(([from, to, file]) => `${file}: ${from} → ${to}`);
    expect(upward).toEqual([]);
  });

  it('have no two folders importing each other', () => {
    const pairs = new Set(edges.map(([from, to]) => `${from}>${to}`));
    const mutual = [...pairs].filter((pair) => pairs.has(pair.split('>').reverse().join('>'))).sort();
    expect(mutual).toEqual([]);
  });

  it('would catch an upward import (the check reads real import lines)', () => {
    // The scan sees this very kind of line: a detect module importing cascade would be listed.
    const sample = "import { x } from '../cascade/negative-mining.js';";
    expect([...sample.matchAll(/(?:from|import)\s*\(?\s*'\.\.\/([a-z-]+)\//g)].map((m) => m[1])).toEqual(['cascade']);
    expect(edges.length).toBeGreaterThan(20);
  });
});
