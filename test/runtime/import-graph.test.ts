import { existsSync, readFileSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

// rectboost/runtime must load in a browser: every module it reaches (dist/, built by
// npm test) may import only other files of the package by relative path — no Node
// built-in (node:fs, path, worker_threads, …) and no package (sharp, commander, …).
const DIST = fileURLToPath(new URL('../../dist/', import.meta.url));
const ENTRY = join(DIST, 'runtime/index.js');

/** Every specifier of static imports, re-exports and dynamic imports in a module's text. */
function specifiers(source: string): string[] {
  const found: string[] = [];
  for (const pattern of [/\b(?:import|export)\s[^'"`;]*?\bfrom\s*['"]([^'"]+)['"]/g, /\bimport\s*['"]([^'"]+)['"]/g, /\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g]) {
    for (const match of source.matchAll(pattern)) found.push(match[1]!);
  }
  return found;
}

describe('rectboost/runtime import graph', () => {
  it('reaches only relative files of the package, no Node built-in and no dependency', () => {
    expect(existsSync(ENTRY), 'dist/runtime/index.js (run npm run build)').toBe(true);
    const seen = new Set<string>();
    const outside: string[] = [];
    const queue = [ENTRY];
    while (queue.length > 0) {
      const file = queue.pop()!;
      if (seen.has(file)) continue;
      seen.add(file);
      // Comments out first: doc examples mention the package by name.
      const source = readFileSync(file, 'utf8').replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
      for (const specifier of specifiers(source)) {
        if (!specifier.startsWith('./') && !specifier.startsWith('../')) {
          outside.push(`${relative(DIST, file)} imports ${specifier}`);
          continue;
        }
        queue.push(join(dirname(file), specifier));
      }
      // No ambient Node objects either.
      if (/\b(?:process|Buffer|require)\s*[.(]/.test(source)) outside.push(`${relative(DIST, file)} uses a Node global`);
    }
    expect(outside).toEqual([]);
    // The graph is the runtime's own files plus the scan, merge and validation code it reuses.
    const files = [...seen].map((f) => relative(DIST, f)).sort();
    expect(files).toContain('detect/scan-image.js');
    expect(files).toContain('detect/merge-detections.js');
    expect(files).toContain('runtime/plain-scan.js');
    expect(files.some((f) => f.startsWith('io/') || f.startsWith('parallel/') || f.startsWith('cli/'))).toBe(false);
  });

  it('the pattern used to find imports sees Node built-ins where they are', () => {
    // A check of the checker on a known module: the CLI's detect command imports node:path.
    const cli = specifiers(readFileSync(join(DIST, 'cli/commands/detect.js'), 'utf8'));
    expect(cli).toContain('node:path');
    expect(builtinModules).toContain('path');
  });
});
