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

/**
 * Growable hit buffer in typed arrays (doubling), so that a cascade which
 * accepts many windows — an empty or a weak one — costs no boxed numbers.
 */
class HitCollector {
  count = 0;
  x: Float64Array = new Float64Array(256);
  y: Float64Array = new Float64Array(256);
  width: Float64Array = new Float64Array(256);
  height: Float64Array = new Float64Array(256);
  score: Float64Array = new Float64Array(256);
  add(x: number, y: number, width: number, height: number, score: number): void {
    if (this.count === this.x.length) this.grow();
    const at = this.count++;
    this.x[at] = x;
    this.y[at] = y;
    this.width[at] = width;
    this.height[at] = height;
    this.score[at] = score;
  }
  private grow(): void {
    const capacity = this.x.length * 2;
    const widen = (old: Float64Array): Float64Array => {
      const wider = new Float64Array(capacity);
      wider.set(old);
      return wider;
    };
    this.x = widen(this.x);
    this.y = widen(this.y);
    this.width = widen(this.width);
    this.height = widen(this.height);
    this.score = widen(this.score);
  }
  toRawHits(): RawHits {
    const n = this.count;
    return { count: n, x: this.x.slice(0, n), y: this.y.slice(0, n), width: this.width.slice(0, n), height: this.height.slice(0, n), score: this.score.slice(0, n) };
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
  const tally = new Float64Array(TALLY_REJECTED + cascade.stages.length);
  const live = new LiveWindows();
  for (const scale of scanScales(cascade, integral.width, integral.height, resolved)) {
    const compiled = compileAtScale(cascade, scale, integral.stride, resolved.shift);
    scanOneScale(compiled, integral, tally, hits, live);
    statistics.scales++;
  }
  statistics.windowsScanned = tally[TALLY_WINDOWS]!;
  statistics.flatWindows = tally[TALLY_FLAT]!;
  statistics.featuresEvaluated = tally[TALLY_FEATURES]!;
  statistics.accepted = tally[TALLY_ACCEPTED]!;
  for (let k = 0; k < cascade.stages.length; k++) statistics.rejectedAtStage[k] = tally[TALLY_REJECTED + k]!;
  return { hits: hits.toRawHits(), statistics };
}

/**
 * Buffers of the live windows of one row, reused across rows and scales: the
 * table offset of each window's top-left corner, its 1/σ, and its running
 * stage score. Capacity grows to the widest row seen.
 */
class LiveWindows {
  bases = new Int32Array(0);
  inverseDeviations = new Float64Array(0);
  scores = new Float64Array(0);
  reserve(capacity: number): void {
    if (this.bases.length >= capacity) return;
    this.bases = new Int32Array(capacity);
    this.inverseDeviations = new Float64Array(capacity);
    this.scores = new Float64Array(capacity);
  }
}

// Slots of the work tally (a Float64Array) that scanOneScale adds to row by row;
// rejections by stage k go to slot TALLY_REJECTED + k.
const TALLY_WINDOWS = 0;
const TALLY_FLAT = 1;
const TALLY_FEATURES = 2;
const TALLY_ACCEPTED = 3;
const TALLY_REJECTED = 4;

// The hot loop, breadth first within a row. The row's non-flat windows are
// gathered into compact lists (table offset, 1/σ); then each stage runs over
// the whole list one weak classifier at a time, and the list is compacted to
// the windows that pass. Every stage — not only the first — thus runs a tight
// loop with the classifier's corners and coefficients in locals (evaluateWeak),
// with no per-window branching between stages and no allocation. Decisions are
// bit-identical to evaluating window by window: the same corners are summed in
// the same order, the value is multiplied by the same 1/σ, and outputs are
// added to the stage score in classifier order.
//
// Counters go to the typed-array tally once per row, never to object fields
// after the loops: V8 compiles this function while its loops run (on-stack
// replacement), and code after the loops that has not yet run when it is
// compiled has no type feedback, so reaching it throws the compiled code away
// (seen with --trace-deopt, once per scale).
function scanOneScale(c: ScaledCascade, integral: IntegralImage, tally: Float64Array, hits: HitCollector, live: LiveWindows): void {
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
  live.reserve(columns);
  const { bases, inverseDeviations, scores } = live;
  for (let y = 0; y <= lastY; y += step) {
    const row = y * stride;
    // σ of every window of the row from the two tables (var = E[I²] − E[I]²);
    // flat windows are counted and left out of the list.
    let count = 0;
    for (let base = row, lastBase = row + lastX; base <= lastBase; base += step) {
      const total = sum[base + bottomRight]! - sum[base + bottomLeft]! - sum[base + windowWidth]! + sum[base]!;
      const totalSquared = squaredSum[base + bottomRight]! - squaredSum[base + bottomLeft]! - squaredSum[base + windowWidth]! + squaredSum[base]!;
      const mean = total * inverseCount;
      const variance = totalSquared * inverseCount - mean * mean;
      if (variance < flatVariance) continue;
      bases[count] = base;
      inverseDeviations[count] = 1 / Math.sqrt(variance);
      count++;
    }
    tally[TALLY_WINDOWS]! += columns;
    tally[TALLY_FLAT]! += columns - count;
    let weak = 0;
    let corner = 0;
    for (let stage = 0; stage < stageCount && count > 0; stage++) {
      const weakEnd = stageEnds[stage]!;
      scores.fill(0, 0, count);
      tally[TALLY_FEATURES]! += count * (weakEnd - weak);
      for (; weak < weakEnd; weak++) {
        const cornerEnd = weakEnds[weak]!;
        evaluateWeak(sum, bases, inverseDeviations, scores, count, offsets, coefficients, corner, cornerEnd, splitValues[weak]!, belowOutputs[weak]!, aboveOutputs[weak]!);
        corner = cornerEnd;
      }
      // Keep the windows whose margin Σ outputs − threshold is ≥ 0, in order.
      const threshold = thresholds[stage]!;
      let kept = 0;
      for (let i = 0; i < count; i++) {
        const margin = scores[i]! - threshold;
        if (margin < 0) continue;
        bases[kept] = bases[i]!;
        inverseDeviations[kept] = inverseDeviations[i]!;
        scores[kept] = margin;
        kept++;
      }
      tally[TALLY_REJECTED + stage]! += count - kept;
      count = kept;
    }
    // What is left passed every stage; scores hold the last stage's margins (or 0 without stages).
    if (stageCount === 0) scores.fill(0, 0, count);
    tally[TALLY_ACCEPTED]! += count;
    for (let i = 0; i < count; i++) hits.add(bases[i]! - row, y, windowWidth, windowHeight, scores[i]!);
  }
}

/**
 * Adds one weak classifier's output to the score of each of the first `count`
 * live windows: value = Σ coefficient · table[base + offset] over the corners
 * start..end−1, then belowOutput if value · (1/σ) < splitValue, else aboveOutput.
 * The common corner counts of the five basic kinds (6 for two cells, 8 for
 * three, 9 for four) get their offsets and coefficients in locals, which
 * removes two array reads per corner from the innermost loop; the sum is
 * accumulated left to right in corner order, exactly as the generic loop does,
 * so results are bit-identical.
 */
function evaluateWeak(
  sum: Float64Array, bases: Int32Array, inverseDeviations: Float64Array, scores: Float64Array, count: number,
  offsets: Int32Array, coefficients: Float64Array, start: number, end: number, split: number, below: number, above: number,
): void {
  const corners = end - start;
  if (corners === 6 || corners === 8 || corners === 9) {
    const o0 = offsets[start]!, o1 = offsets[start + 1]!, o2 = offsets[start + 2]!, o3 = offsets[start + 3]!, o4 = offsets[start + 4]!, o5 = offsets[start + 5]!;
    const c0 = coefficients[start]!, c1 = coefficients[start + 1]!, c2 = coefficients[start + 2]!, c3 = coefficients[start + 3]!, c4 = coefficients[start + 4]!, c5 = coefficients[start + 5]!;
    if (corners === 6) {
      for (let i = 0; i < count; i++) {
        const base = bases[i]!;
        const value = c0 * sum[base + o0]! + c1 * sum[base + o1]! + c2 * sum[base + o2]! + c3 * sum[base + o3]! + c4 * sum[base + o4]! + c5 * sum[base + o5]!;
        scores[i]! += value * inverseDeviations[i]! < split ? below : above;
      }
      return;
    }
    const o6 = offsets[start + 6]!, o7 = offsets[start + 7]!;
    const c6 = coefficients[start + 6]!, c7 = coefficients[start + 7]!;
    if (corners === 8) {
      for (let i = 0; i < count; i++) {
        const base = bases[i]!;
        const value = c0 * sum[base + o0]! + c1 * sum[base + o1]! + c2 * sum[base + o2]! + c3 * sum[base + o3]! + c4 * sum[base + o4]! + c5 * sum[base + o5]! + c6 * sum[base + o6]! + c7 * sum[base + o7]!;
        scores[i]! += value * inverseDeviations[i]! < split ? below : above;
      }
      return;
    }
    const o8 = offsets[start + 8]!;
    const c8 = coefficients[start + 8]!;
    for (let i = 0; i < count; i++) {
      const base = bases[i]!;
      const value = c0 * sum[base + o0]! + c1 * sum[base + o1]! + c2 * sum[base + o2]! + c3 * sum[base + o3]! + c4 * sum[base + o4]! + c5 * sum[base + o5]! + c6 * sum[base + o6]! + c7 * sum[base + o7]! + c8 * sum[base + o8]!;
      scores[i]! += value * inverseDeviations[i]! < split ? below : above;
    }
    return;
  }
  for (let i = 0; i < count; i++) {
    const base = bases[i]!;
    let value = 0;
    for (let k = start; k < end; k++) value += coefficients[k]! * sum[base + offsets[k]!]!;
    scores[i]! += value * inverseDeviations[i]! < split ? below : above;
  }
}
