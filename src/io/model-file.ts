import { readFile, stat } from 'node:fs/promises';
import type { CascadeModel } from '../cascade/cascade-model.js';
import { MODEL_LIMITS, parseModelText, serializeCascadeModel, validateCascadeModel } from '../cascade/model-json.js';
import { RUNTIME_CASCADE_FORMAT, runtimeCascadeFromValue } from '../cascade/runtime-export.js';
import { detectorCascadeFromModel, type DetectorCascade } from '../detect/detector-cascade.js';
import { RectboostError } from '../errors.js';
import { writeFileAtomic } from './atomic-write.js';

/**
 * What a caller needs from a model file:
 * - `full-model`: the model rectboost train or tune writes, with its feature kinds and
 *   training history (tune, inspect, retraining). A runtime-only export is refused.
 * - `any-cascade`: anything a detector can run, the full model or a runtime-only export
 *   (rectboost export); told apart by the file's `format` field.
 */
export type ModelRequirement = 'full-model' | 'any-cascade';

/** A full model file: the model, and the detector compiled from it. */
export interface LoadedFullModel {
  readonly kind: 'full-model';
  readonly model: CascadeModel;
  readonly detector: DetectorCascade;
}

/** A runtime-only export: a detector, and nothing about how it was trained. */
export interface LoadedRuntimeCascade {
  readonly kind: 'runtime-cascade';
  readonly detector: DetectorCascade;
}

/** Options of loadModelFile. */
export interface LoadModelOptions<R extends ModelRequirement> {
  /** Which files will do; see ModelRequirement. */
  readonly require: R;
  /** Who needs the file, named when a runtime-only export is refused, e.g. `rectboost tune`. */
  readonly neededBy?: string;
}

/**
 * The one loader of model files. Refuses files above MODEL_LIMITS.maxTextBytes before
 * reading them, parses the JSON, and validates every field before use (validateCascadeModel,
 * runtimeCascadeFromValue). The result's `kind` says what the file was; with
 * `require: 'full-model'` it is always `full-model`.
 * @throws RectboostError `bad-model` naming the file (and the field, for invalid content)
 *   when the file is missing, unreadable, too large, not JSON, invalid, or a runtime-only
 *   export where the full model is required.
 * @example const { model } = await loadModelFile('rivets.json', { require: 'full-model', neededBy: 'rectboost tune' });
 * @example const { detector } = await loadModelFile('rivets.json', { require: 'any-cascade' });
 */
export async function loadModelFile(path: string, options: LoadModelOptions<'full-model'>): Promise<LoadedFullModel>;
export async function loadModelFile(path: string, options: LoadModelOptions<ModelRequirement>): Promise<LoadedFullModel | LoadedRuntimeCascade>;
export async function loadModelFile(path: string, options: LoadModelOptions<ModelRequirement>): Promise<LoadedFullModel | LoadedRuntimeCascade> {
  const raw = parseModelText(await readModelText(path), path);
  if ((raw as { format?: unknown } | null)?.format === RUNTIME_CASCADE_FORMAT) {
    if (options.require === 'full-model') {
      throw new RectboostError(
        'bad-model',
        `${path} is a runtime-only export (format "${RUNTIME_CASCADE_FORMAT}"); ${options.neededBy ?? 'this step'} needs the full model written by rectboost train or tune — pass that file instead.`,
      );
    }
    return { kind: 'runtime-cascade', detector: runtimeCascadeFromValue(raw, path) };
  }
  const model = validateCascadeModel(raw, path);
  return { kind: 'full-model', model, detector: detectorCascadeFromModel(model) };
}

/** Writes a model atomically (temporary file + rename). */
export async function saveCascadeModel(path: string, model: CascadeModel): Promise<void> {
  await writeFileAtomic(path, serializeCascadeModel(model));
}

/**
 * A model file's text, checked against MODEL_LIMITS.maxTextBytes before it is read (an
 * untrusted file cannot make us allocate without bound).
 */
async function readModelText(path: string): Promise<string> {
  try {
    const info = await stat(path);
    if (info.size > MODEL_LIMITS.maxTextBytes) {
      throw new RectboostError('bad-model', `Model ${path} is ${info.size} bytes, above the limit of ${MODEL_LIMITS.maxTextBytes}; pass a file written by rectboost train or export.`);
    }
    return await readFile(path, 'utf8');
  } catch (error) {
    if (error instanceof RectboostError) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    throw new RectboostError('bad-model', `Model ${path} ${code === 'ENOENT' ? 'does not exist' : `cannot be read (${code ?? 'error'})`}; check the path.`, { cause: error });
  }
}
