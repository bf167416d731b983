import { readFile, stat } from 'node:fs/promises';
import type { CascadeModel } from '../cascade/cascade-model.js';
import { MODEL_LIMITS, serializeCascadeModel, validateCascadeModel } from '../cascade/model-json.js';
import { RUNTIME_CASCADE_FORMAT, runtimeCascadeFromValue } from '../cascade/runtime-export.js';
import { detectorCascadeFromModel, type DetectorCascade } from '../detect/detector-cascade.js';
import { RectboostError } from '../errors.js';
import { writeFileAtomic } from './atomic-write.js';

/**
 * Reads a model or runtime-cascade file as parsed JSON, refusing files above
 * MODEL_LIMITS.maxTextBytes before reading them (an untrusted file cannot make
 * us allocate without bound).
 * @throws RectboostError `bad-model` when the file is missing, unreadable, too large or not JSON.
 */
async function readModelJson(path: string): Promise<unknown> {
  let text: string;
  try {
    const info = await stat(path);
    if (info.size > MODEL_LIMITS.maxTextBytes) {
      throw new RectboostError('bad-model', `Model ${path} is ${info.size} bytes, above the limit of ${MODEL_LIMITS.maxTextBytes}.`);
    }
    text = await readFile(path, 'utf8');
  } catch (error) {
    if (error instanceof RectboostError) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    throw new RectboostError('bad-model', `Model ${path} ${code === 'ENOENT' ? 'does not exist' : `cannot be read (${code ?? 'error'})`}; check the path.`, { cause: error });
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (error) {
    throw new RectboostError(
      'bad-model',
      `Model ${path} is not valid JSON (${(error as Error).message}); it may be truncated — pass a file written by rectboost train or export.`,
      { cause: error },
    );
  }
}

/**
 * Reads and validates a full model file (see validateCascadeModel).
 * @throws RectboostError `bad-model` when the file is missing, unreadable, too large or invalid.
 */
export async function loadCascadeModel(path: string): Promise<CascadeModel> {
  return validateCascadeModel(await readModelJson(path), path);
}

/** Writes a model atomically (temporary file + rename). */
export async function saveCascadeModel(path: string, model: CascadeModel): Promise<void> {
  await writeFileAtomic(path, serializeCascadeModel(model));
}

/** A cascade file ready for detection: always a detector; the full model too when the file is one. */
export interface LoadedCascade {
  readonly detector: DetectorCascade;
  readonly model?: CascadeModel;
}

/**
 * Reads a full model (rectboost train) or a runtime-only export (rectboost export),
 * telling them apart by the `format` field; both are validated before use.
 * @throws RectboostError `bad-model` naming the file.
 */
export async function loadCascadeFile(path: string): Promise<LoadedCascade> {
  const raw = await readModelJson(path);
  if ((raw as { format?: unknown } | null)?.format === RUNTIME_CASCADE_FORMAT) return { detector: runtimeCascadeFromValue(raw, path) };
  const model = validateCascadeModel(raw, path);
  return { detector: detectorCascadeFromModel(model), model };
}

/**
 * Like loadCascadeFile, but requires the full model; `command` names the caller in the error.
 * @throws RectboostError `bad-model` for a runtime-only export.
 */
export async function loadFullModel(path: string, command: string): Promise<CascadeModel> {
  const loaded = await loadCascadeFile(path);
  if (!loaded.model) {
    throw new RectboostError('bad-model', `${path} is a runtime-only export; ${command} needs the full model written by rectboost train.`);
  }
  return loaded.model;
}
