import { featureCells, type WeightedRectangle } from '../features/haar-feature.js';
import type { CascadeModel, WeakClassifier } from '../model/cascade-model.js';

/**
 * The part of a cascade that detection needs, with every feature spelled out as
 * weighted rectangles in base-window coordinates (half-open {x, y, width, height},
 * per-pixel weight). Both the full model (CascadeModel) and the runtime-only
 * export reduce to this form, so they scan identically by construction.
 *
 * Semantics (same as CascadeModel): a weak classifier's normalized value is
 * Σ weight · (pixel sum of rectangle) / σ(window); it adds `belowOutput` when that
 * value < splitValue, else `aboveOutput`; a window passes a stage when the sum of
 * its weak outputs ≥ threshold.
 */
export interface DetectorWeakClassifier {
  readonly rectangles: readonly WeightedRectangle[];
  readonly splitValue: number;
  readonly belowOutput: number;
  readonly aboveOutput: number;
}

/** One stage of a DetectorCascade. */
export interface DetectorStage {
  readonly threshold: number;
  readonly weakClassifiers: readonly DetectorWeakClassifier[];
}

/** A cascade ready to scan: window size in pixels and stages in evaluation order. */
export interface DetectorCascade {
  readonly windowWidth: number;
  readonly windowHeight: number;
  readonly stages: readonly DetectorStage[];
}

/**
 * Spells out a model's features as weighted rectangles (featureCells).
 * Drops training provenance; the model is not modified.
 * @example detectorCascadeFromModel(model).stages[0]!.weakClassifiers[0]!.rectangles
 */
export function detectorCascadeFromModel(model: Pick<CascadeModel, 'window' | 'stages'>): DetectorCascade {
  return {
    windowWidth: model.window.width,
    windowHeight: model.window.height,
    stages: model.stages.map((stage) => ({
      threshold: stage.threshold,
      weakClassifiers: stage.weakClassifiers.map(detectorWeakClassifier),
    })),
  };
}

/** One weak classifier of a model with its feature spelled out as weighted rectangles (featureCells). */
export function detectorWeakClassifier(weak: WeakClassifier): DetectorWeakClassifier {
  return { rectangles: featureCells(weak.feature), splitValue: weak.splitValue, belowOutput: weak.belowOutput, aboveOutput: weak.aboveOutput };
}

/**
 * True when some weak classifier has a tilted rectangle: the cascade then needs the
 * rotated table (computeIntegralImage(image, { rotated: true })), and basic cascades
 * keep the upright tables alone.
 */
export function cascadeUsesTiltedFeatures(cascade: Pick<DetectorCascade, 'stages'>): boolean {
  return cascade.stages.some((stage) => stage.weakClassifiers.some((weak) => weak.rectangles.some((rectangle) => rectangle.tilted === true)));
}
