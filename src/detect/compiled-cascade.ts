import type { DetectorCascade } from './detector-cascade.js';
import type { ScaledCascade } from './scan-kernel.js';

/**
 * The one compile step of a cascade: its weak classifiers' rectangles scaled by
 * `scale`, each edge rounded once (as scaledFeatureCells does, so neighbouring cells
 * stay contiguous), weights rebalanced by base area / scaled area (features stay
 * zero-mean and in base units), and the four corners of every rectangle merged into
 * corner reads over an integral table of row stride `stride`, in ascending offset
 * order; `shift` (base pixels) gives the window step max(1, round(shift · scale)).
 * The result is the record layout the scan kernel reads (KernelImage.setScale).
 *
 * Every evaluator uses it: detection per scale and image stride; training, mining,
 * retuning and patch evaluation at scale 1 over sample tables (stride window + 1) or
 * background tables. At scale 1 a basic feature compiles to the same corners and
 * integer coefficients as compileFeatures, so training's responses and the
 * kernel's values are the same integers.
 * @example compileCascadeAtScale(detectorCascadeFromModel(model), 1.25, integral.stride, 1)
 */
export function compileCascadeAtScale(cascade: DetectorCascade, scale: number, stride: number, shift: number): ScaledCascade {
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
        // Each edge is scaled and rounded once, as scaledFeatureCells does, so
        // neighbouring cells stay contiguous; the weight is rebalanced by
        // baseArea / scaledArea to keep the feature zero-mean and in base units.
        const left = Math.round(rectangle.x * scale);
        const top = Math.round(rectangle.y * scale);
        const right = Math.round((rectangle.x + rectangle.width) * scale);
        const bottom = Math.round((rectangle.y + rectangle.height) * scale);
        const weight = (rectangle.weight * rectangle.width * rectangle.height) / ((right - left) * (bottom - top));
        addCorner(corners, bottom * stride + right, weight);
        addCorner(corners, bottom * stride + left, -weight);
        addCorner(corners, top * stride + right, -weight);
        addCorner(corners, top * stride + left, weight);
      }
      for (const [offset, coefficient] of [...corners.entries()].sort((a, b) => a[0] - b[0])) {
        if (coefficient === 0) continue;
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
    windowWidth: Math.round(cascade.windowWidth * scale),
    windowHeight: Math.round(cascade.windowHeight * scale),
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

function addCorner(corners: Map<number, number>, offset: number, weight: number): void {
  corners.set(offset, (corners.get(offset) ?? 0) + weight);
}
