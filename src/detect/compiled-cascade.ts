import { scaleRectangle } from '../features/haar-feature.js';
import { addRectangleCorners, sortedCorners } from '../features/rectangle-corners.js';
import type { DetectorCascade } from './detector-cascade.js';
import type { ScaledCascade } from './scan-kernel.js';

/**
 * The one compile step of a cascade: its weak classifiers' rectangles scaled by
 * `scale` (scaleRectangle: each upright edge rounded once, tilted corners rounded in
 * rotated coordinates, weights rebalanced by base area / scaled area so features stay
 * zero-mean and in base units), and the four corners of every rectangle merged into
 * corner reads over an integral table of row stride `stride`, in ascending offset
 * order (addRectangleCorners); tilted rectangles read the rotated table at the constant
 * distance `rotatedAt` (IntegralImage.rotatedAt, WindowSamples.rotatedAt), so the scan
 * kernel evaluates them with no change. `shift` (base pixels) gives the window step
 * max(1, round(shift · scale)).
 * The result is the record layout the scan kernel reads (KernelImage.setScale).
 *
 * Every evaluator uses it: detection per scale and image stride; training, mining,
 * retuning and patch evaluation at scale 1 over sample tables (stride window + 1) or
 * background tables. At scale 1 a basic feature compiles to the same corners and
 * integer coefficients as compileFeatures, so training's responses and the
 * kernel's values are the same integers.
 * @throws RectboostError `invalid-option` when the cascade has tilted rectangles and `rotatedAt` is undefined.
 * @example compileCascadeAtScale(detectorCascadeFromModel(model), 1.25, integral.stride, 1, integral.rotatedAt)
 */
export function compileCascadeAtScale(cascade: DetectorCascade, scale: number, stride: number, shift: number, rotatedAt?: number): ScaledCascade {
  const scaledWidth = Math.round(cascade.windowWidth * scale);
  const scaledHeight = Math.round(cascade.windowHeight * scale);
  const stageEnds = new Int32Array(cascade.stages.length);
  const thresholds = new Float64Array(cascade.stages.length);
  const weakEnds: number[] = [];
  const splitValues: number[] = [];
  const belowOutputs: number[] = [];
  const aboveOutputs: number[] = [];
  const offsets: number[] = [];
  const coefficients: number[] = [];
  cascade.stages.forEach((stage, stageIndex) => {
    for (const weak of stage.weakClassifiers) {
      // Merge the four corners of every rectangle: shared corners are read once.
      const corners = new Map<number, number>();
      for (const rectangle of weak.rectangles) {
        addRectangleCorners(corners, scaleRectangle(rectangle, scale, scaledWidth, scaledHeight), stride, rotatedAt);
      }
      for (const [offset, coefficient] of sortedCorners(corners)) {
        offsets.push(offset);
        coefficients.push(coefficient);
      }
      weakEnds.push(offsets.length);
      splitValues.push(weak.splitValue);
      belowOutputs.push(weak.belowOutput);
      aboveOutputs.push(weak.aboveOutput);
    }
    stageEnds[stageIndex] = weakEnds.length;
    thresholds[stageIndex] = stage.threshold;
  });
  return {
    windowWidth: scaledWidth,
    windowHeight: scaledHeight,
    step: Math.max(1, Math.round(shift * scale)),
    stageEnds,
    thresholds,
    weakEnds: Int32Array.from(weakEnds),
    splitValues: Float64Array.from(splitValues),
    belowOutputs: Float64Array.from(belowOutputs),
    aboveOutputs: Float64Array.from(aboveOutputs),
    offsets: Int32Array.from(offsets),
    coefficients: Float64Array.from(coefficients),
  };
}
