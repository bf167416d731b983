import { RectboostError } from '../errors.js';
import type { DetectorCascade } from '../detect/detector-cascade.js';
import { detectorCascadeFromModel } from '../detect/detector-cascade.js';
import type { CascadeModel } from './cascade-model.js';

/** Value of the runtime file's `format` field. */
export const RUNTIME_CASCADE_FORMAT = 'rectboost-runtime-cascade';
/** Current runtime file version; parsing refuses others. */
export const RUNTIME_CASCADE_VERSION = 1;

/**
 * The runtime-only cascade file (schema/runtime-cascade.schema.json): what a
 * detector needs and nothing else. Every feature is spelled out as weighted
 * rectangles `[x, y, width, height, weight]` in window pixels, so any runtime
 * can evaluate it without knowing rectboost's feature kinds:
 *
 *   value = Σ weight · (pixel sum over the rectangle) / σ(window)
 *   vote  = value < split ? below : above
 *   a window passes a stage when Σ votes ≥ threshold, and is detected when it passes all stages.
 *
 * σ is the population standard deviation of the window's pixels; windows with
 * variance below 1e-4 are rejected. At scale s, each rectangle edge is scaled
 * and rounded (Math.round) and its weight multiplied by (w·h)/(w_s·h_s).
 */
export interface RuntimeCascadeFile {
  readonly format: typeof RUNTIME_CASCADE_FORMAT;
  readonly version: typeof RUNTIME_CASCADE_VERSION;
  readonly window: { readonly width: number; readonly height: number };
  readonly normalization: 'window-standard-deviation';
  readonly stages: ReadonlyArray<{
    readonly threshold: number;
    readonly classifiers: ReadonlyArray<{
      readonly rectangles: ReadonlyArray<readonly [number, number, number, number, number]>;
      readonly split: number;
      readonly below: number;
      readonly above: number;
    }>;
  }>;
}

/** Limits that keep an untrusted file from causing huge allocations (DESIGN §5). */
export const RUNTIME_LIMITS = { windowSide: 4096, stages: 1000, classifiersPerStage: 100_000, rectanglesPerClassifier: 64 } as const;

/**
 * The runtime-only form of a model: no training history, no feature kinds.
 * Scans identically to the model (both reduce to the same DetectorCascade).
 * @example JSON.stringify(exportRuntimeCascade(model))
 */
export function exportRuntimeCascade(model: Pick<CascadeModel, 'window' | 'stages'>): RuntimeCascadeFile {
  return runtimeFileFromDetector(detectorCascadeFromModel(model));
}

/** The runtime file layout of a DetectorCascade. */
export function runtimeFileFromDetector(cascade: DetectorCascade): RuntimeCascadeFile {
  return {
    format: RUNTIME_CASCADE_FORMAT,
    version: RUNTIME_CASCADE_VERSION,
    window: { width: cascade.windowWidth, height: cascade.windowHeight },
    normalization: 'window-standard-deviation',
    stages: cascade.stages.map((stage) => ({
      threshold: stage.threshold,
      classifiers: stage.weakClassifiers.map((weak) => ({
        rectangles: weak.rectangles.map((r) => [r.x, r.y, r.width, r.height, r.weight] as const),
        split: weak.splitValue,
        below: weak.belowOutput,
        above: weak.aboveOutput,
      })),
    })),
  };
}

/**
 * Parses and validates a runtime cascade file (JSON text) into a DetectorCascade.
 * Checks every field before use: known format and version, integer window
 * sides in 1..4096, finite numbers, integer rectangles of positive size inside
 * the window, and the RUNTIME_LIMITS counts.
 * @param label names the source (a file path) in error messages.
 * @throws RectboostError `bad-model` naming the label and the field.
 */
export function parseRuntimeCascade(text: string, label: string): DetectorCascade {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (error) {
    throw new RectboostError('bad-model', `Cascade file ${label} is not valid JSON (${(error as Error).message}); pass a file written by rectboost export.`, { cause: error });
  }
  return runtimeCascadeFromValue(raw, label);
}

/** Validates an already-parsed runtime file; see parseRuntimeCascade. */
export function runtimeCascadeFromValue(raw: unknown, label: string): DetectorCascade {
  const fail = (field: string, expected: string, received: unknown): never => {
    throw new RectboostError('bad-model', `Cascade file ${label}: field ${field} must be ${expected}; received ${describe(received)}. Re-export the model with rectboost export.`);
  };
  const file = asObject(raw, 'the top level', fail);
  if (file['format'] !== RUNTIME_CASCADE_FORMAT) fail('format', `"${RUNTIME_CASCADE_FORMAT}"`, file['format']);
  if (file['version'] !== RUNTIME_CASCADE_VERSION) fail('version', String(RUNTIME_CASCADE_VERSION), file['version']);
  if (file['normalization'] !== 'window-standard-deviation') fail('normalization', '"window-standard-deviation"', file['normalization']);
  const window = asObject(file['window'], 'window', fail);
  const windowWidth = integerIn(window['width'], 1, RUNTIME_LIMITS.windowSide, 'window.width', fail);
  const windowHeight = integerIn(window['height'], 1, RUNTIME_LIMITS.windowSide, 'window.height', fail);
  const stages = arrayUpTo(file['stages'], RUNTIME_LIMITS.stages, 'stages', fail).map((stageValue, s) => {
    const stage = asObject(stageValue, `stages[${s}]`, fail);
    const threshold = finite(stage['threshold'], `stages[${s}].threshold`, fail);
    const weakClassifiers = arrayUpTo(stage['classifiers'], RUNTIME_LIMITS.classifiersPerStage, `stages[${s}].classifiers`, fail).map((weakValue, w) => {
      const where = `stages[${s}].classifiers[${w}]`;
      const weak = asObject(weakValue, where, fail);
      const rectangleValues = arrayUpTo(weak['rectangles'], RUNTIME_LIMITS.rectanglesPerClassifier, `${where}.rectangles`, fail);
      if (rectangleValues.length === 0) fail(`${where}.rectangles`, 'a non-empty array', rectangleValues);
      const rectangles = rectangleValues.map((value, r) => {
        const field = `${where}.rectangles[${r}]`;
        if (!Array.isArray(value) || value.length !== 5) return fail(field, '[x, y, width, height, weight]', value);
        const x = integerIn(value[0], 0, windowWidth - 1, `${field}[0] (x)`, fail);
        const y = integerIn(value[1], 0, windowHeight - 1, `${field}[1] (y)`, fail);
        const width = integerIn(value[2], 1, windowWidth - x, `${field}[2] (width, inside the window)`, fail);
        const height = integerIn(value[3], 1, windowHeight - y, `${field}[3] (height, inside the window)`, fail);
        const weight = finite(value[4], `${field}[4] (weight)`, fail);
        return { x, y, width, height, weight };
      });
      return {
        rectangles,
        splitValue: finite(weak['split'], `${where}.split`, fail),
        belowOutput: finite(weak['below'], `${where}.below`, fail),
        aboveOutput: finite(weak['above'], `${where}.above`, fail),
      };
    });
    return { threshold, weakClassifiers };
  });
  return { windowWidth, windowHeight, stages };
}

type Fail = (field: string, expected: string, received: unknown) => never;

function asObject(value: unknown, field: string, fail: Fail): Record<string, unknown> {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return fail(field, 'an object', value);
  return value as Record<string, unknown>;
}

function arrayUpTo(value: unknown, limit: number, field: string, fail: Fail): unknown[] {
  if (!Array.isArray(value)) return fail(field, 'an array', value);
  if (value.length > limit) return fail(field, `an array of at most ${limit} entries`, `${value.length} entries`);
  return value;
}

function finite(value: unknown, field: string, fail: Fail): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) return fail(field, 'a finite number', value);
  return value;
}

function integerIn(value: unknown, min: number, max: number, field: string, fail: Fail): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) return fail(field, `an integer from ${min} to ${max}`, value);
  return value;
}

function describe(value: unknown): string {
  if (value === undefined) return 'nothing';
  const text = JSON.stringify(value);
  return text === undefined ? String(value) : text.length > 60 ? `${text.slice(0, 57)}...` : text;
}
