// TEMPORARY stand-in (detect branch): the trainer's branch owns this file and
// replaces it on merge. Same two signatures; JSON.parse plus basic checks.
import { readFile } from 'node:fs/promises';
import { RectboostError } from '../errors.js';
import { featureFitsWindow } from '../features/haar-feature.js';
import { isFeatureKind } from '../features/feature-kind.js';
import { CASCADE_FORMAT, CASCADE_VERSION, type CascadeModel } from './cascade-model.js';

/** Parses model JSON text; `label` names the source in errors. @throws RectboostError `bad-model`. */
export function parseCascadeModel(text: string, label: string): CascadeModel {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (error) {
    throw new RectboostError('bad-model', `Model ${label} is not valid JSON (${(error as Error).message}).`, { cause: error });
  }
  const bad = (field: string, expected: string): never => {
    throw new RectboostError('bad-model', `Model ${label}: field ${field} must be ${expected}; check the file or retrain.`);
  };
  const model = raw as Record<string, unknown>;
  if (typeof raw !== 'object' || raw === null) bad('the top level', 'an object');
  if (model['format'] !== CASCADE_FORMAT) bad('format', `"${CASCADE_FORMAT}"`);
  if (model['version'] !== CASCADE_VERSION) bad('version', String(CASCADE_VERSION));
  const window = model['window'] as { width?: unknown; height?: unknown } | undefined;
  const width = window?.width;
  const height = window?.height;
  if (typeof width !== 'number' || !Number.isInteger(width) || width < 1 || width > 4096) bad('window.width', 'an integer from 1 to 4096');
  if (typeof height !== 'number' || !Number.isInteger(height) || height < 1 || height > 4096) bad('window.height', 'an integer from 1 to 4096');
  if (!Array.isArray(model['stages'])) bad('stages', 'an array');
  (model['stages'] as unknown[]).forEach((stage, s) => {
    const st = stage as Record<string, unknown>;
    if (typeof st?.['threshold'] !== 'number' || !Number.isFinite(st['threshold'])) bad(`stages[${s}].threshold`, 'a finite number');
    if (!Array.isArray(st['weakClassifiers'])) bad(`stages[${s}].weakClassifiers`, 'an array');
    (st['weakClassifiers'] as unknown[]).forEach((weak, w) => {
      const wk = weak as Record<string, unknown>;
      for (const key of ['splitValue', 'belowOutput', 'aboveOutput']) {
        if (typeof wk?.[key] !== 'number' || !Number.isFinite(wk[key])) bad(`stages[${s}].weakClassifiers[${w}].${key}`, 'a finite number');
      }
      const feature = wk['feature'] as Record<string, unknown> | undefined;
      if (!feature || !isFeatureKind(feature['kind'])) bad(`stages[${s}].weakClassifiers[${w}].feature.kind`, 'a known feature kind');
      if (!featureFitsWindow(feature as never, width as number, height as number)) bad(`stages[${s}].weakClassifiers[${w}].feature`, 'a feature inside the window');
    });
  });
  return raw as CascadeModel;
}

/** Reads and parses a model file. @throws RectboostError `bad-model` when unreadable or invalid. */
export async function loadCascadeModel(path: string): Promise<CascadeModel> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (error) {
    throw new RectboostError('bad-model', `Model ${path} cannot be read (${(error as NodeJS.ErrnoException).code ?? 'error'}); check the path.`, { cause: error });
  }
  return parseCascadeModel(text, path);
}
