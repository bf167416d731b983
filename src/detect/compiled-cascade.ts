import { scaleRectangle } from '../features/haar-feature.js';
import { addRectangleCorners, sortedCorners } from '../features/rectangle-corners.js';
import { isDetectorTree, type DetectorCascade, type DetectorStump } from './detector-cascade.js';
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
 * The result is the record layout the scan kernel reads (KernelImage.setScale): one node
 * record per stump, and 2^d − 1 per tree of depth d (its DetectorTree splits in heap order;
 * the bottom level's records carry the leaf outputs as their below/above outputs).
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
  const nodePlaces: number[] = [];
  // One node record: the split's corners, its split value, the outputs it adds (leaves at
  // the bottom level, 0 above it) and its place in its tree.
  const addRecord = (rectangles: DetectorStump['rectangles'], splitValue: number, below: number, above: number, place: number): void => {
    // Merge the four corners of every rectangle: shared corners are read once.
    const corners = new Map<number, number>();
    for (const rectangle of rectangles) {
      addRectangleCorners(corners, scaleRectangle(rectangle, scale, scaledWidth, scaledHeight), stride, rotatedAt);
    }
    for (const [offset, coefficient] of sortedCorners(corners)) {
      offsets.push(offset);
      coefficients.push(coefficient);
    }
    weakEnds.push(offsets.length);
    splitValues.push(splitValue);
    belowOutputs.push(below);
    aboveOutputs.push(above);
    nodePlaces.push(place);
  };
  cascade.stages.forEach((stage, stageIndex) => {
    for (const weak of stage.weakClassifiers) {
      if (!isDetectorTree(weak)) {
        addRecord(weak.rectangles, weak.splitValue, weak.belowOutput, weak.aboveOutput, nodePlace(0, 1));
        continue;
      }
      const splitCount = weak.splits.length;
      const bottom = splitCount >>> 1;
      weak.splits.forEach((split, k) => {
        const below = k >= bottom ? weak.leaves[2 * (k - bottom)]! : 0;
        const above = k >= bottom ? weak.leaves[2 * (k - bottom) + 1]! : 0;
        addRecord(split.rectangles, split.splitValue, below, above, nodePlace(k, splitCount));
      });
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
    nodePlaces: Int32Array.from(nodePlaces),
  };
}

/**
 * A node record's place in its tree, as the kernel reads it: heap index `node` in the low
 * 16 bits and the tree's split count (1 for a stump, 3 or 7) in the high 16 bits.
 */
export function nodePlace(node: number, splitCount: number): number {
  return (splitCount << 16) | node;
}
