import { readFile, stat } from 'node:fs/promises';
import { RectboostError } from '../errors.js';
import type { CascadeModel } from '../cascade/cascade-model.js';
import { MODEL_LIMITS, parseCascadeModel, serializeCascadeModel } from '../cascade/model-json.js';
import { writeFileAtomic } from './atomic-write.js';

/**
 * Reads and validates a model file (see parseCascadeModel).
 * @throws RectboostError `bad-model` when the file is missing, unreadable, too large or invalid.
 */
export async function loadCascadeModel(path: string): Promise<CascadeModel> {
  let text: string;
  try {
    const info = await stat(path);
    if (info.size > MODEL_LIMITS.maxTextBytes) {
      throw new RectboostError('bad-model', `Model ${path} is ${info.size} bytes, above the limit of ${MODEL_LIMITS.maxTextBytes}.`);
    }
    text = await readFile(path, 'utf8');
  } catch (error) {
    if (error instanceof RectboostError) throw error;
    const reason = (error as NodeJS.ErrnoException).code === 'ENOENT' ? 'does not exist' : 'cannot be read';
    throw new RectboostError('bad-model', `Model ${path} ${reason}.`, { cause: error });
  }
  return parseCascadeModel(text, path);
}

/** Writes a model atomically (temporary file + rename). */
export async function saveCascadeModel(path: string, model: CascadeModel): Promise<void> {
  await writeFileAtomic(path, serializeCascadeModel(model));
}
