import { checkInteger, checkNumber, checkThat } from '../check.js';
import type { IntegralImage } from '../image/integral-image.js';
import { FLAT_WINDOW_VARIANCE } from '../image/window-statistics.js';
import type { DetectorCascade } from './detector-cascade.js';

/** Options of the multiscale scan. */
export interface ScanOptions {
  /** Ratio between successive scales; default 1.25, range (1, 4]. */
  readonly scaleStep?: number;
  /** Window shift in base-window pixels, multiplied by the scale and rounded (at least 1 pixel); default 1, range (0, 64]. */
  readonly shift?: number;
  /** Smallest scaled window side in pixels (both width and height must reach it); default: the model window. */
  readonly smallestSide?: number;
  /** Largest scaled window side in pixels (neither width nor height may exceed it); default: no bound but the image. */
  readonly largestSide?: number;
}

/** Defaults of ScanOptions, stated once. */
export const DEFAULT_SCAN_OPTIONS = { scaleStep: 1.25, shift: 1 } as const;

/**
 * Raw hits of a scan, structure-of-arrays: hit i is the window
 * {x[i], y[i], width[i], height[i]} with score[i].
 *
 * Score: the margin of the last stage, Σ outputs − threshold (≥ 0 for every
 * accepted window). A cascade without stages accepts every non-flat window with score 0.
 */
export interface RawHits {
  readonly count: number;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly width: Float64Array;
  readonly height: Float64Array;
  readonly score: Float64Array;
}

/** Work counters of a scan (for speed reports and for tune's false-positive rates). */
export interface ScanStatistics {
  /** Windows looked at, flat ones included. */
  windowsScanned: number;
  /** Windows rejected before any stage because their pixel variance is below FLAT_WINDOW_VARIANCE. */
  flatWindows: number;
  /** Weak classifiers evaluated over all windows. */
  featuresEvaluated: number;
  /** rejectedAtStage[k]: windows that passed stages 0..k−1 and failed stage k. */
  rejectedAtStage: number[];
  /** Windows that passed every stage. */
  accepted: number;
  /** Scales visited. */
  scales: number;
}

/** Result of scanImage. */
export interface ScanResult {
  readonly hits: RawHits;
  readonly statistics: ScanStatistics;
}

/**
 * One scale of a cascade compiled to flat typed arrays: every weak classifier's
 * rescaled rectangles merged into corner reads over the image's integral table
 * (offsets relative to the window's top-left table entry).
 */
interface ScaledCascade {
  readonly scale: number;
  readonly windowWidth: number;
  readonly windowHeight: number;
  readonly step: number;
  readonly stageEnds: Int32Array;
  readonly thresholds: Float64Array;
  readonly weakEnds: Int32Array;
  readonly splitValues: Float64Array;
  readonly belowOutputs: Float64Array;
  readonly aboveOutputs: Float64Array;
  readonly offsets: Int32Array;
  readonly coefficients: Float64Array;
}

/** Checks scan options once and fills in defaults. */
export function resolveScanOptions(options: ScanOptions = {}): Required<Pick<ScanOptions, 'scaleStep' | 'shift'>> & ScanOptions {
  const scaleStep = checkNumber('scaleStep', options.scaleStep ?? DEFAULT_SCAN_OPTIONS.scaleStep, 1.0001, 4);
  const shift = checkNumber('shift', options.shift ?? DEFAULT_SCAN_OPTIONS.shift, 0.01, 64);
  if (options.smallestSide !== undefined) checkInteger('smallestSide', options.smallestSide, 1, 1 << 26);
  if (options.largestSide !== undefined) checkInteger('largestSide', options.largestSide, 1, 1 << 26);
  return { ...options, scaleStep, shift };
}

/**
 * Scales visited for an image: s = scaleStep^k, k = 0, 1, …, while the rounded
 * window round(W·s) × round(H·s) fits the image, keeping those whose sides lie in
 * [smallestSide, largestSide].
 */
export function scanScales(cascade: Pick<DetectorCascade, 'windowWidth' | 'windowHeight'>, imageWidth: number, imageHeight: number, options: ScanOptions = {}): number[] {
  const { scaleStep, smallestSide, largestSide } = resolveScanOptions(options);
  const scales: number[] = [];
  for (let k = 0; ; k++) {
    const scale = scaleStep ** k;
    const width = Math.round(cascade.windowWidth * scale);
    const height = Math.round(cascade.windowHeight * scale);
    if (width > imageWidth || height > imageHeight) break;
    if (largestSide !== undefined && Math.max(width, height) > largestSide) break;
    if (smallestSide !== undefined && Math.min(width, height) < smallestSide) continue;
    scales.push(scale);
  }
  return scales;
}

function compileAtScale(cascade: DetectorCascade, scale: number, stride: number, shift: number): ScaledCascade {
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
    scale,
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

/** Growable hit buffer; hits are rare, so plain arrays are fine. */
class HitCollector {
  x: number[] = [];
  y: number[] = [];
  width: number[] = [];
  height: number[] = [];
  score: number[] = [];
  toRawHits(): RawHits {
    return {
      count: this.x.length,
      x: Float64Array.from(this.x),
      y: Float64Array.from(this.y),
      width: Float64Array.from(this.width),
      height: Float64Array.from(this.height),
      score: Float64Array.from(this.score),
    };
  }
}

/**
 * Multiscale sliding-window scan of one image (Viola & Jones 2004, scanning the detector:
 * the detector, not the image, is scaled; one integral image serves every scale).
 *
 * For each scale s (scanScales) every weak classifier is recompiled once to
 * corner offsets into the image's integral table; windows of round(W·s) ×
 * round(H·s) pixels slide by max(1, round(shift·s)) pixels. Each window's σ
 * comes from the squared table (var = E[I²] − E[I]², as windowStatistics);
 * windows with variance below FLAT_WINDOW_VARIANCE are rejected without
 * evaluating any feature (no division by zero). Feature values are multiplied
 * by 1/σ, exactly as training's stageScores does, and the window leaves at the
 * first stage it fails (early rejection, the attentional cascade of Viola & Jones 2004).
 *
 * @throws RectboostError `invalid-option` for options out of range.
 * @example const { hits } = scanImage(detectorCascadeFromModel(model), computeIntegralImage(image));
 */
export function scanImage(cascade: DetectorCascade, integral: IntegralImage, options: ScanOptions = {}): ScanResult {
  const resolved = resolveScanOptions(options);
  checkThat(cascade.windowWidth >= 1 && cascade.windowHeight >= 1, 'The cascade window must be at least 1×1 pixels.');
  const statistics: ScanStatistics = {
    windowsScanned: 0,
    flatWindows: 0,
    featuresEvaluated: 0,
    rejectedAtStage: new Array<number>(cascade.stages.length).fill(0),
    accepted: 0,
    scales: 0,
  };
  const hits = new HitCollector();
  const rejected = new Float64Array(cascade.stages.length);
  for (const scale of scanScales(cascade, integral.width, integral.height, resolved)) {
    const compiled = compileAtScale(cascade, scale, integral.stride, resolved.shift);
    scanOneScale(compiled, integral, statistics, rejected, hits);
    statistics.scales++;
  }
  for (let k = 0; k < rejected.length; k++) statistics.rejectedAtStage[k] = rejected[k]!;
  return { hits: hits.toRawHits(), statistics };
}

// The hot loop. Everything it touches is a local typed array or number; no
// allocation per window. Most windows die in stage 0, so stage 0 runs row by
// row, one corner at a time over every window of the row: the inner loop then
// reads the integral table at a fixed stride with independent accumulators,
// which pipelines far better than finishing one window before the next.
// Survivors of stage 0 continue window by window through the later stages.
function scanOneScale(c: ScaledCascade, integral: IntegralImage, statistics: ScanStatistics, rejected: Float64Array, hits: HitCollector): void {
  const { sum, squaredSum, stride } = integral;
  const { stageEnds, thresholds, weakEnds, splitValues, belowOutputs, aboveOutputs, offsets, coefficients, step } = c;
  const windowWidth = c.windowWidth;
  const windowHeight = c.windowHeight;
  const stageCount = stageEnds.length;
  const bottomRight = windowHeight * stride + windowWidth;
  const bottomLeft = windowHeight * stride;
  const inverseCount = 1 / (windowWidth * windowHeight);
  const flatVariance = FLAT_WINDOW_VARIANCE;
  const lastX = integral.width - windowWidth;
  const lastY = integral.height - windowHeight;
  const columns = Math.floor(lastX / step) + 1;
  const inverseDeviations = new Float64Array(columns);
  const values = new Float64Array(columns);
  const scores = new Float64Array(columns);
  const firstStageEnd = stageCount > 0 ? stageEnds[0]! : 0;
  const firstThreshold = stageCount > 0 ? thresholds[0]! : 0;
  let windows = 0;
  let flat = 0;
  let features = 0;
  let accepted = 0;
  let rejectedFirst = 0;
  for (let y = 0; y <= lastY; y += step) {
    const row = y * stride;
    // Window σ for the whole row; 0 marks a flat window.
    for (let column = 0, base = row; column < columns; column++, base += step) {
      const total = sum[base + bottomRight]! - sum[base + bottomLeft]! - sum[base + windowWidth]! + sum[base]!;
      const totalSquared = squaredSum[base + bottomRight]! - squaredSum[base + bottomLeft]! - squaredSum[base + windowWidth]! + squaredSum[base]!;
      const mean = total * inverseCount;
      const variance = totalSquared * inverseCount - mean * mean;
      inverseDeviations[column] = variance < flatVariance ? 0 : 1 / Math.sqrt(variance);
      scores[column] = 0;
    }
    // Stage 0 for every window of the row (flat windows are computed too, then discarded).
    let corner = 0;
    for (let weak = 0; weak < firstStageEnd; weak++) {
      const cornerStart = corner;
      const cornerEnd = weakEnds[weak]!;
      corner = cornerEnd;
      evaluateRow(sum, row, step, columns, offsets, coefficients, cornerStart, cornerEnd, values);
      const split = splitValues[weak]!;
      const below = belowOutputs[weak]!;
      const above = aboveOutputs[weak]!;
      for (let column = 0; column < columns; column++) scores[column]! += values[column]! * inverseDeviations[column]! < split ? below : above;
    }
    const firstCornerEnd = corner;
    windows += columns;
    for (let column = 0; column < columns; column++) {
      const inverseDeviation = inverseDeviations[column]!;
      if (inverseDeviation === 0) {
        flat++;
        continue;
      }
      features += firstStageEnd;
      let margin = scores[column]! - firstThreshold;
      if (stageCount > 0 && margin < 0) {
        rejectedFirst++;
        continue;
      }
      const x = column * step;
      const base = row + x;
      let weak = firstStageEnd;
      corner = firstCornerEnd;
      let stage = 1;
      for (; stage < stageCount; stage++) {
        const weakEnd = stageEnds[stage]!;
        let score = 0;
        for (; weak < weakEnd; weak++) {
          const cornerEnd = weakEnds[weak]!;
          let value = 0;
          for (; corner < cornerEnd; corner++) value += coefficients[corner]! * sum[base + offsets[corner]!]!;
          score += value * inverseDeviation < splitValues[weak]! ? belowOutputs[weak]! : aboveOutputs[weak]!;
        }
        features += weakEnd - stageEnds[stage - 1]!;
        margin = score - thresholds[stage]!;
        if (margin < 0) break;
      }
      if (stage < stageCount) {
        rejected[stage]!++;
        continue;
      }
      accepted++;
      hits.x.push(x);
      hits.y.push(y);
      hits.width.push(windowWidth);
      hits.height.push(windowHeight);
      hits.score.push(stageCount > 0 ? margin : 0);
    }
  }
  if (stageCount > 0) rejected[0]! += rejectedFirst;
  statistics.windowsScanned += windows;
  statistics.flatWindows += flat;
  statistics.featuresEvaluated += features;
  statistics.accepted += accepted;
}

/**
 * Raw values of one weak classifier for a row of windows, into `values`.
 * The common corner counts of the five basic kinds (6 for two cells, 8 for
 * three, 9 for four) get their offsets and coefficients in locals, which
 * removes two array reads per corner from the innermost loop. The sum is
 * accumulated left to right in corner order, exactly as the generic loop
 * does, so results are bit-identical.
 */
function evaluateRow(sum: Float64Array, row: number, step: number, columns: number, offsets: Int32Array, coefficients: Float64Array, start: number, end: number, values: Float64Array): void {
  const count = end - start;
  if (count === 6 || count === 8 || count === 9) {
    const o0 = offsets[start]!, o1 = offsets[start + 1]!, o2 = offsets[start + 2]!, o3 = offsets[start + 3]!, o4 = offsets[start + 4]!, o5 = offsets[start + 5]!;
    const c0 = coefficients[start]!, c1 = coefficients[start + 1]!, c2 = coefficients[start + 2]!, c3 = coefficients[start + 3]!, c4 = coefficients[start + 4]!, c5 = coefficients[start + 5]!;
    if (count === 6) {
      for (let column = 0, base = row; column < columns; column++, base += step) {
        values[column] = c0 * sum[base + o0]! + c1 * sum[base + o1]! + c2 * sum[base + o2]! + c3 * sum[base + o3]! + c4 * sum[base + o4]! + c5 * sum[base + o5]!;
      }
      return;
    }
    const o6 = offsets[start + 6]!, o7 = offsets[start + 7]!;
    const c6 = coefficients[start + 6]!, c7 = coefficients[start + 7]!;
    if (count === 8) {
      for (let column = 0, base = row; column < columns; column++, base += step) {
        values[column] = c0 * sum[base + o0]! + c1 * sum[base + o1]! + c2 * sum[base + o2]! + c3 * sum[base + o3]! + c4 * sum[base + o4]! + c5 * sum[base + o5]! + c6 * sum[base + o6]! + c7 * sum[base + o7]!;
      }
      return;
    }
    const o8 = offsets[start + 8]!;
    const c8 = coefficients[start + 8]!;
    for (let column = 0, base = row; column < columns; column++, base += step) {
      values[column] = c0 * sum[base + o0]! + c1 * sum[base + o1]! + c2 * sum[base + o2]! + c3 * sum[base + o3]! + c4 * sum[base + o4]! + c5 * sum[base + o5]! + c6 * sum[base + o6]! + c7 * sum[base + o7]! + c8 * sum[base + o8]!;
    }
    return;
  }
  values.fill(0, 0, columns);
  for (let k = start; k < end; k++) {
    const coefficient = coefficients[k]!;
    for (let column = 0, at = row + offsets[k]!; column < columns; column++, at += step) values[column]! += coefficient * sum[at]!;
  }
}

