import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, it } from 'vitest';

/** Where scripts/fetch-reference-data.sh puts the open data sets. */
export const REFERENCE_DATA = fileURLToPath(new URL('../../reference-data/', import.meta.url));

/** The files under reference-data/ that `relativePaths` name and that are not there. */
export function missingReferenceFiles(relativePaths: readonly string[]): string[] {
  return relativePaths.filter((path) => !existsSync(REFERENCE_DATA + path));
}

/**
 * True when the tests that read `relativePath` under reference-data/ should run.
 * Outside CI a missing file skips them (a machine where the data cannot be fetched
 * still tests everything else); under CI (process.env.CI set) they always run, so a
 * missing file fails loudly instead of passing by skipping.
 */
export function shouldRunWith(relativePath: string): boolean {
  return missingReferenceFiles([relativePath]).length === 0 || Boolean(process.env.CI);
}

/**
 * A `describe` block over open reference data. When a file is missing (outside CI) the
 * block's body is never called — so it cannot fail on a missing file while vitest
 * collects it — and one skipped test stands in its place, named for what is missing and
 * how to get it. Under CI the body always runs (see shouldRunWith).
 */
export function describeWithReferenceData(title: string, relativePaths: readonly string[], body: () => void): void {
  if (relativePaths.every(shouldRunWith)) {
    describe(title, body);
    return;
  }
  const missing = missingReferenceFiles(relativePaths);
  const files = `reference-data/${missing[0]}${missing.length > 1 ? ` and ${missing.length - 1} more files` : ''}`;
  describe.skip(title, () => {
    // A placeholder whose name is the reason: vitest lists it as skipped.
    it.skip(`needs ${files}: run \`npm test\` as root with apt (it fetches them) or \`bash scripts/fetch-reference-data.sh\``, () => undefined);
  });
}
