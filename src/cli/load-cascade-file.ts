import { readFile } from 'node:fs/promises';
import type { CascadeModel } from '../cascade/cascade-model.js';
import { parseCascadeModel } from '../cascade/model-json.js';
import { RUNTIME_CASCADE_FORMAT, runtimeCascadeFromValue } from '../cascade/runtime-export.js';
import { detectorCascadeFromModel, type DetectorCascade } from '../detect/detector-cascade.js';
import { RectboostError } from '../errors.js';

/** A cascade file as read by the CLI: always a detector; the full model too when the file is one. */
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
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new RectboostError('bad-model', `Model ${path} ${code === 'ENOENT' ? 'does not exist' : `cannot be read (${code ?? 'error'})`}; check the path.`, { cause: error });
  }
  let format: unknown;
  try {
    format = (JSON.parse(text) as { format?: unknown } | null)?.format;
  } catch (error) {
    throw new RectboostError('bad-model', `Model ${path} is not valid JSON (${(error as Error).message}); pass a file written by rectboost train or export.`, { cause: error });
  }
  if (format === RUNTIME_CASCADE_FORMAT) return { detector: runtimeCascadeFromValue(JSON.parse(text), path) };
  const model = parseCascadeModel(text, path);
  return { detector: detectorCascadeFromModel(model), model };
}

/** Like loadCascadeFile, but requires the full model (for tune and inspect). */
export async function loadFullModel(path: string, command: string): Promise<CascadeModel> {
  const loaded = await loadCascadeFile(path);
  if (!loaded.model) {
    throw new RectboostError('bad-model', `${path} is a runtime-only export; ${command} needs the full model written by rectboost train.`);
  }
  return loaded.model;
}
