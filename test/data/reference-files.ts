import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

/** Where scripts/fetch-reference-data.sh puts the open data sets. */
export const REFERENCE_DATA = fileURLToPath(new URL('../../reference-data/', import.meta.url));

/**
 * True when the tests that read `relativePath` under reference-data/ should run.
 * Outside CI a missing file skips them (a fresh clone without the data still tests
 * everything else); under CI (process.env.CI set) they always run, so a missing
 * file fails loudly instead of passing by skipping.
 */
export function shouldRunWith(relativePath: string): boolean {
  return existsSync(REFERENCE_DATA + relativePath) || Boolean(process.env.CI);
}
