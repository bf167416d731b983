import { FieldChecks } from '../check.js';
import type { DetectorCascade } from '../detect/detector-cascade.js';
import { detectorCascadeFromModel, isDetectorTree, type DetectorWeakClassifier } from '../detect/detector-cascade.js';
import type { WeightedRectangle } from '../features/haar-feature.js';
import { MAX_TREE_DEPTH } from '../model/cascade-model.js';
import type { CascadeModel } from './cascade-model.js';
import { parseModelText } from './model-json.js';

/** Value of the runtime file's `format` field. */
export const RUNTIME_CASCADE_FORMAT = 'rectboost-runtime-cascade';
/** Current runtime file version; parsing refuses others. */
export const RUNTIME_CASCADE_VERSION = 1;

/**
 * The runtime-only cascade file (schema/runtime-cascade.schema.json): what a
 * detector needs and nothing else. Every feature is spelled out as weighted
 * rectangles `[x, y, width, height, weight]` in window pixels, or
 * `[x, y, width, height, weight, 1]` for a 45° tilted rectangle (top corner x, y;
 * width steps down-right, height steps down-left; summed on the rotated table,
 * see tiltedRectangleSum), so any runtime can evaluate it without knowing
 * rectboost's feature kinds:
 *
 *   value = Σ weight · (pixel sum over the rectangle) / σ(window)
 *   vote  = value < split ? below : above            (a stump)
 *   vote  = the leaf reached by following the splits (a tree, see RuntimeTree)
 *   a window passes a stage when Σ votes ≥ threshold, and is detected when it passes all stages.
 *
 * σ is the population standard deviation of the window's pixels; windows with
 * variance below 1e-4 are rejected. At scale s, each rectangle is scaled by
 * scaleRectangle (upright: each edge scaled and rounded with Math.round; tilted:
 * corners rounded in rotated coordinates, then kept inside the window) and its
 * weight multiplied by (w·h)/(w_s·h_s).
 */
export interface RuntimeCascadeFile {
  readonly format: typeof RUNTIME_CASCADE_FORMAT;
  readonly version: typeof RUNTIME_CASCADE_VERSION;
  readonly window: { readonly width: number; readonly height: number };
  readonly normalization: 'window-standard-deviation';
  readonly stages: ReadonlyArray<{
    readonly threshold: number;
    readonly classifiers: ReadonlyArray<RuntimeStump | RuntimeTree>;
  }>;
}

/** One rectangle of a runtime file: `[x, y, width, height, weight]`, or `[x, y, width, height, weight, 1]` when tilted. */
export type RuntimeRectangle = readonly [number, number, number, number, number] | readonly [number, number, number, number, number, 1];

/** A decision stump of a runtime file. */
export interface RuntimeStump {
  readonly rectangles: readonly RuntimeRectangle[];
  readonly split: number;
  readonly below: number;
  readonly above: number;
}

/**
 * A decision tree of a runtime file, as a full binary tree in heap order (DetectorTree):
 * split k sends value < split to 2k + 1, the rest to 2k + 2; heap indices from
 * splits.length on are the leaves, left to right. A split with no rectangles (value 0)
 * stands where the tree stopped early; both its sides lead to equal leaves.
 */
export interface RuntimeTree {
  readonly splits: ReadonlyArray<{ readonly rectangles: readonly RuntimeRectangle[]; readonly split: number }>;
  readonly leaves: readonly number[];
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
      classifiers: stage.weakClassifiers.map((weak): RuntimeStump | RuntimeTree => (isDetectorTree(weak)
        ? {
          splits: weak.splits.map((split) => ({ rectangles: split.rectangles.map(runtimeRectangle), split: split.splitValue })),
          leaves: weak.leaves,
        }
        : { rectangles: weak.rectangles.map(runtimeRectangle), split: weak.splitValue, below: weak.belowOutput, above: weak.aboveOutput })),
    })),
  };
}

function runtimeRectangle(r: WeightedRectangle): RuntimeRectangle {
  return r.tilted === true ? [r.x, r.y, r.width, r.height, r.weight, 1] : [r.x, r.y, r.width, r.height, r.weight];
}

/**
 * Parses and validates a runtime cascade file (JSON text) into a DetectorCascade.
 * Checks every field before use: known format and version, integer window
 * sides in 1..4096, finite numbers, integer rectangles (upright or tilted) of
 * positive size inside the window, and the RUNTIME_LIMITS counts.
 * @param label names the source (a file path) in error messages.
 * @throws RectboostError `bad-model` naming the label and the field.
 */
export function parseRuntimeCascade(text: string, label: string): DetectorCascade {
  return runtimeCascadeFromValue(parseModelText(text, label), label);
}

/** Validates an already-parsed runtime file; see parseRuntimeCascade. */
export function runtimeCascadeFromValue(raw: unknown, label: string): DetectorCascade {
  const v = new FieldChecks({ code: 'bad-model', source: `Cascade file ${label}`, remedy: 'Re-export the model with rectboost export.' });
  const file = v.object(raw, '', ['format', 'version', 'window', 'normalization', 'stages'], []);
  v.constant(file['format'], 'format', RUNTIME_CASCADE_FORMAT);
  v.constant(file['version'], 'version', RUNTIME_CASCADE_VERSION);
  v.constant(file['normalization'], 'normalization', 'window-standard-deviation');
  const window = v.object(file['window'], 'window', ['width', 'height'], []);
  const windowWidth = v.integer(window['width'], 'window.width', 1, RUNTIME_LIMITS.windowSide);
  const windowHeight = v.integer(window['height'], 'window.height', 1, RUNTIME_LIMITS.windowSide);
  const stages = v.array(file['stages'], 'stages', RUNTIME_LIMITS.stages).map((stageValue, s) => {
    const stage = v.object(stageValue, `stages[${s}]`, ['threshold', 'classifiers'], []);
    const threshold = v.finite(stage['threshold'], `stages[${s}].threshold`);
    const weakClassifiers = v.array(stage['classifiers'], `stages[${s}].classifiers`, RUNTIME_LIMITS.classifiersPerStage).map((weakValue, w): DetectorWeakClassifier => {
      const where = `stages[${s}].classifiers[${w}]`;
      const rectanglesAt = (value: unknown, field: string, allowEmpty: boolean): WeightedRectangle[] => {
        const rectangleValues = v.array(value, field, RUNTIME_LIMITS.rectanglesPerClassifier);
        if (rectangleValues.length === 0 && !allowEmpty) v.expected(field, 'a non-empty array', rectangleValues);
        return rectangleValues.map((item, r) => {
          const at = `${field}[${r}]`;
          if (!Array.isArray(item) || (item.length !== 5 && item.length !== 6)) return v.expected(at, '[x, y, width, height, weight] or [x, y, width, height, weight, 1] (tilted)', item);
          if (item.length === 6) {
            v.constant(item[5], `${at}[5] (tilted)`, 1);
            // A tilted rectangle's footprint is x − height .. x + width across, y .. y + width + height down.
            const x = v.integer(item[0], `${at}[0] (x)`, 1, windowWidth - 1);
            const y = v.integer(item[1], `${at}[1] (y)`, 0, windowHeight - 2);
            const width = v.integer(item[2], `${at}[2] (width, inside the window)`, 1, Math.min(windowWidth - x, windowHeight - y - 1));
            const height = v.integer(item[3], `${at}[3] (height, inside the window)`, 1, Math.min(x, windowHeight - y - width));
            const weight = v.finite(item[4], `${at}[4] (weight)`);
            return { x, y, width, height, weight, tilted: true };
          }
          const x = v.integer(item[0], `${at}[0] (x)`, 0, windowWidth - 1);
          const y = v.integer(item[1], `${at}[1] (y)`, 0, windowHeight - 1);
          const width = v.integer(item[2], `${at}[2] (width, inside the window)`, 1, windowWidth - x);
          const height = v.integer(item[3], `${at}[3] (height, inside the window)`, 1, windowHeight - y);
          const weight = v.finite(item[4], `${at}[4] (weight)`);
          return { x, y, width, height, weight };
        });
      };
      if (typeof weakValue === 'object' && weakValue !== null && !Array.isArray(weakValue) && 'leaves' in weakValue) {
        const tree = v.object(weakValue, where, ['splits', 'leaves'], []);
        const splitValues = v.array(tree['splits'], `${where}.splits`, 2 ** MAX_TREE_DEPTH - 1);
        if (splitValues.length !== 3 && splitValues.length !== 7) v.expected(`${where}.splits`, '3 or 7 splits (a full tree of depth 2 or 3)', splitValues);
        const splits = splitValues.map((splitValue, k) => {
          const split = v.object(splitValue, `${where}.splits[${k}]`, ['rectangles', 'split'], []);
          return { rectangles: rectanglesAt(split['rectangles'], `${where}.splits[${k}].rectangles`, true), splitValue: v.finite(split['split'], `${where}.splits[${k}].split`) };
        });
        const leafValues = v.array(tree['leaves'], `${where}.leaves`, 2 ** MAX_TREE_DEPTH);
        if (leafValues.length !== splits.length + 1) v.expected(`${where}.leaves`, `${splits.length + 1} leaf outputs (one more than the splits)`, leafValues);
        return { splits, leaves: leafValues.map((leaf, j) => v.finite(leaf, `${where}.leaves[${j}]`)) };
      }
      const weak = v.object(weakValue, where, ['rectangles', 'split', 'below', 'above'], []);
      return {
        rectangles: rectanglesAt(weak['rectangles'], `${where}.rectangles`, false),
        splitValue: v.finite(weak['split'], `${where}.split`),
        belowOutput: v.finite(weak['below'], `${where}.below`),
        aboveOutput: v.finite(weak['above'], `${where}.above`),
      };
    });
    return { threshold, weakClassifiers };
  });
  return { windowWidth, windowHeight, stages };
}
