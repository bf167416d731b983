import { compileFeatures, type CompiledFeatures } from '../features/compiled-features.js';
import type { IntegralImage } from '../image/integral-image.js';
import { FLAT_WINDOW_VARIANCE } from '../image/window-statistics.js';
import type { CascadeModel } from './cascade-model.js';

/**
 * A cascade compiled for scale-1 windows on images of one row stride: each weak
 * classifier's feature as corner offsets into the integral table, plus flat
 * arrays of split values and outputs. Used by negative mining, which scans
 * background pyramids window by window at the detector's own size.
 */
export interface CompiledCascade {
  readonly windowWidth: number;
  readonly windowHeight: number;
  readonly stride: number;
  readonly stageCount: number;
  /** Weak classifiers of stage k are stageStarts[k] .. stageStarts[k+1]-1. */
  readonly stageStarts: Int32Array;
  readonly thresholds: Float64Array;
  readonly features: CompiledFeatures;
  readonly splitValues: Float64Array;
  readonly belowOutputs: Float64Array;
  readonly aboveOutputs: Float64Array;
}

/** Compiles a cascade for integral tables with the given stride (image width + 1). */
export function compileCascade(cascade: Pick<CascadeModel, 'window' | 'stages'>, stride: number): CompiledCascade {
  const weak = cascade.stages.flatMap((stage) => stage.weakClassifiers);
  const stageStarts = new Int32Array(cascade.stages.length + 1);
  let count = 0;
  cascade.stages.forEach((stage, k) => {
    stageStarts[k] = count;
    count += stage.weakClassifiers.length;
  });
  stageStarts[cascade.stages.length] = count;
  return {
    windowWidth: cascade.window.width,
    windowHeight: cascade.window.height,
    stride,
    stageCount: cascade.stages.length,
    stageStarts,
    thresholds: Float64Array.from(cascade.stages.map((stage) => stage.threshold)),
    features: compileFeatures(weak.map((w) => w.feature), stride),
    splitValues: Float64Array.from(weak.map((w) => w.splitValue)),
    belowOutputs: Float64Array.from(weak.map((w) => w.belowOutput)),
    aboveOutputs: Float64Array.from(weak.map((w) => w.aboveOutput)),
  };
}

/**
 * Number of stages the window at (x, y) passes, stopping at the first failure
 * (stageCount means accepted). Flat windows pass no stage of a non-empty cascade:
 * they carry no pattern to detect. The caller guarantees the window lies inside
 * the image and that `integral.stride === compiled.stride`.
 */
export function countStagesPassed(compiled: CompiledCascade, integral: IntegralImage, x: number, y: number): number {
  if (compiled.stageCount === 0) return 0;
  const { windowWidth, windowHeight, stride } = compiled;
  const top = y * stride + x;
  const bottom = top + windowHeight * stride;
  const sum = integral.sum;
  const squared = integral.squaredSum;
  const area = windowWidth * windowHeight;
  const mean = (sum[bottom + windowWidth]! - sum[bottom]! - sum[top + windowWidth]! + sum[top]!) / area;
  const variance = (squared[bottom + windowWidth]! - squared[bottom]! - squared[top + windowWidth]! + squared[top]!) / area - mean * mean;
  if (variance < FLAT_WINDOW_VARIANCE) return 0;
  const inverseDeviation = 1 / Math.sqrt(variance);
  const { starts, offsets, coefficients } = compiled.features;
  for (let stage = 0; stage < compiled.stageCount; stage++) {
    let score = 0;
    for (let w = compiled.stageStarts[stage]!, end = compiled.stageStarts[stage + 1]!; w < end; w++) {
      let value = 0;
      for (let k = starts[w]!, kEnd = starts[w + 1]!; k < kEnd; k++) value += coefficients[k]! * sum[top + offsets[k]!]!;
      score += value * inverseDeviation < compiled.splitValues[w]! ? compiled.belowOutputs[w]! : compiled.aboveOutputs[w]!;
    }
    if (score < compiled.thresholds[stage]!) return stage;
  }
  return compiled.stageCount;
}
