import { readFile, rm, rmdir } from 'node:fs/promises';
import { join } from 'node:path';
import type { CascadeModel } from '../cascade/cascade-model.js';
import { serializeCascadeModel, validateCascadeModel } from '../cascade/model-json.js';
import { RectboostError } from '../errors.js';
import { writeFileAtomic } from './atomic-write.js';

const CHECKPOINT_FILE = 'progress.json';
const CHECKPOINT_FORMAT = 'rectboost-checkpoint';

/**
 * What must match for a run to continue another: every option that changes the
 * model, and the content hashes of the data. Options such as --workers or
 * --quiet are left out on purpose: they do not change the result.
 */
export type TrainingFingerprint = Readonly<Record<string, string | number | boolean | null>>;

/** A checkpoint: the finished stages as a model, the run's fingerprint, and stage times. */
export interface Checkpoint {
  readonly model: CascadeModel;
  readonly fingerprint: TrainingFingerprint;
  readonly stageSeconds: readonly number[];
}

/** Writes DIR/progress.json atomically: a reader sees the previous or the new checkpoint, never a mix. */
export async function writeCheckpoint(directory: string, checkpoint: Checkpoint): Promise<void> {
  const text = JSON.stringify({
    format: CHECKPOINT_FORMAT,
    version: 1,
    fingerprint: checkpoint.fingerprint,
    stageSeconds: checkpoint.stageSeconds,
    model: JSON.parse(serializeCascadeModel(checkpoint.model)) as unknown,
  });
  await writeFileAtomic(join(directory, CHECKPOINT_FILE), `${text}\n`);
}

/**
 * Reads DIR/progress.json and checks it belongs to this run.
 * @throws RectboostError `bad-data` when there is no checkpoint, it is damaged,
 *   or it was made with other options or data (naming the first difference).
 */
export async function readCheckpoint(directory: string, expected: TrainingFingerprint): Promise<Checkpoint> {
  const path = join(directory, CHECKPOINT_FILE);
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (error) {
    throw new RectboostError('bad-data', `There is no checkpoint to resume at ${path}; run without --resume to start a new training.`, { cause: error });
  }
  let raw: { format?: unknown; version?: unknown; fingerprint?: unknown; stageSeconds?: unknown; model?: unknown };
  try {
    raw = JSON.parse(text) as typeof raw;
  } catch (error) {
    throw new RectboostError('bad-data', `Checkpoint ${path} is damaged (not valid JSON); delete it to start over.`, { cause: error });
  }
  if (raw.format !== CHECKPOINT_FORMAT || raw.version !== 1 || typeof raw.fingerprint !== 'object' || raw.fingerprint === null || !Array.isArray(raw.stageSeconds)) {
    throw new RectboostError('bad-data', `Checkpoint ${path} is not a rectboost version 1 checkpoint; delete it to start over.`);
  }
  const found = raw.fingerprint as Record<string, unknown>;
  for (const key of new Set([...Object.keys(expected), ...Object.keys(found)])) {
    if (found[key] !== expected[key]) {
      throw new RectboostError(
        'bad-data',
        `Checkpoint ${path} was made with ${key} = ${JSON.stringify(found[key])}, but this run has ${JSON.stringify(expected[key])}; ` +
          'resume with the same options and data, or choose another --checkpoint folder.',
      );
    }
  }
  const model = validateCascadeModel(raw.model, path);
  const stageSeconds = raw.stageSeconds.map((value) => (typeof value === 'number' && Number.isFinite(value) ? value : 0));
  return { model, fingerprint: expected, stageSeconds };
}

/** Removes a checkpoint folder's progress file after a finished run. */
export async function removeCheckpoint(directory: string): Promise<void> {
  await rm(join(directory, CHECKPOINT_FILE), { force: true });
  await rmdir(directory).catch(() => undefined);
}
