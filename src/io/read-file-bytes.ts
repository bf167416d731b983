import { readFile } from 'node:fs/promises';
import { RectboostError, type RectboostErrorCode } from '../errors.js';

/**
 * Reads a whole file, or fails with one sentence naming it: "`what` PATH cannot be
 * read (ERRNO); check the path." under the given error code.
 * @example const bytes = await readFileBytes('labels.gz', 'bad-data', 'IDX file');
 */
export async function readFileBytes(path: string, code: RectboostErrorCode, what: string): Promise<Buffer> {
  try {
    return await readFile(path);
  } catch (error) {
    throw new RectboostError(code, `${what} ${path} cannot be read (${(error as NodeJS.ErrnoException).code ?? 'unknown error'}); check the path.`, { cause: error });
  }
}
