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
  /** Stage 0 laid out for the fused row pass, or null when it does not fit that form. */
  readonly firstStage: FirstStageBlock | null;
}

/**
 * The first stage in the form the fused row pass (gatherFirstStage) takes: one
 * or two weak classifiers of at most FIRST_STAGE_CORNERS corners each, every
 * corner list padded to exactly that many with coefficient 0 at offset 0.
 * Padding cannot change a decision: 0 · table value is ±0, and adding ±0 to a
 * partial sum leaves it unchanged (at most the sign of a zero sum flips, and
 * ±0 · 1/σ < split decides the same for both zeros). A single-classifier stage
 * gets a second, empty classifier with split 0 and both outputs −0: its value
 * is ±0, not below 0, so it adds −0, and x + (−0) = x for every x, −0 included.
 */
interface FirstStageBlock {
  /** Weak classifiers of the real stage (1 or 2); the block always holds two. */
  readonly weakCount: number;
  readonly offsets: Int32Array;
  readonly coefficients: Float64Array;
  readonly splitValues: Float64Array;
  readonly belowOutputs: Float64Array;
  readonly aboveOutputs: Float64Array;
  readonly threshold: number;
}

// Corners per weak classifier in the fused first-stage pass: 9 covers the four-cell
// kind, the largest of the five basic kinds (6, 8 and 9 corners); padding a
// 6- or 8-corner classifier up to 9 measured no slower than exact-size loops.
const FIRST_STAGE_CORNERS = 9;

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
  const compiledOffsets = Int32Array.from(offsets);
  const compiledCoefficients = Float64Array.from(coefficients);
  const compiledWeakEnds = Int32Array.from(weakEnds);
  return {
    scale,
    windowWidth: Math.round(cascade.windowWidth * scale),
    windowHeight: Math.round(cascade.windowHeight * scale),
    step: Math.max(1, Math.round(shift * scale)),
    stageEnds,
    thresholds,
    weakEnds: compiledWeakEnds,
    splitValues: Float64Array.from(splitValues),
    belowOutputs: Float64Array.from(belowOutputs),
    aboveOutputs: Float64Array.from(aboveOutputs),
    offsets: compiledOffsets,
    coefficients: compiledCoefficients,
    firstStage: firstStageBlock(cascade, compiledWeakEnds, compiledOffsets, compiledCoefficients),
  };
}

function firstStageBlock(cascade: DetectorCascade, weakEnds: Int32Array, offsets: Int32Array, coefficients: Float64Array): FirstStageBlock | null {
  const stage = cascade.stages[0];
  if (stage === undefined) return null;
  const weakCount = stage.weakClassifiers.length;
  if (weakCount !== 1 && weakCount !== 2) return null;
  const blockOffsets = new Int32Array(2 * FIRST_STAGE_CORNERS);
  const blockCoefficients = new Float64Array(2 * FIRST_STAGE_CORNERS);
  for (let weak = 0; weak < weakCount; weak++) {
    const start = weak === 0 ? 0 : weakEnds[weak - 1]!;
    const end = weakEnds[weak]!;
    if (end - start > FIRST_STAGE_CORNERS) return null;
    blockOffsets.set(offsets.subarray(start, end), weak * FIRST_STAGE_CORNERS);
    blockCoefficients.set(coefficients.subarray(start, end), weak * FIRST_STAGE_CORNERS);
  }
  return {
    weakCount,
    offsets: blockOffsets,
    coefficients: blockCoefficients,
    splitValues: Float64Array.from([0, 1], (weak) => stage.weakClassifiers[weak]?.splitValue ?? 0),
    belowOutputs: Float64Array.from([0, 1], (weak) => stage.weakClassifiers[weak]?.belowOutput ?? -0),
    aboveOutputs: Float64Array.from([0, 1], (weak) => stage.weakClassifiers[weak]?.aboveOutput ?? -0),
    threshold: stage.threshold,
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

// The hot loop, breadth first within a row. The row's windows that are not
// flat — and, when the first stage fits FirstStageBlock, that pass the first
// stage, evaluated in the same loop — are gathered into compact lists (table
// offset, 1/σ, score); then each further stage runs over the whole list one
// weak classifier at a time, and the list is compacted to the windows that
// pass. Every stage thus runs a tight loop with the classifier's corners and
// coefficients in locals (evaluateWeak), with no per-window branching between
// stages and no allocation. Decisions are
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
  // The first stage's corners, coefficients and outputs in locals for the fused pass (zeros when unused).
  const block = c.firstStage;
  const fused = block !== null;
  const blockOffsets = block?.offsets ?? new Int32Array(2 * FIRST_STAGE_CORNERS);
  const blockCoefficients = block?.coefficients ?? new Float64Array(2 * FIRST_STAGE_CORNERS);
  const p0 = blockOffsets[0]!, p1 = blockOffsets[1]!, p2 = blockOffsets[2]!, p3 = blockOffsets[3]!, p4 = blockOffsets[4]!, p5 = blockOffsets[5]!, p6 = blockOffsets[6]!, p7 = blockOffsets[7]!, p8 = blockOffsets[8]!;
  const q0 = blockOffsets[9]!, q1 = blockOffsets[10]!, q2 = blockOffsets[11]!, q3 = blockOffsets[12]!, q4 = blockOffsets[13]!, q5 = blockOffsets[14]!, q6 = blockOffsets[15]!, q7 = blockOffsets[16]!, q8 = blockOffsets[17]!;
  const a0 = blockCoefficients[0]!, a1 = blockCoefficients[1]!, a2 = blockCoefficients[2]!, a3 = blockCoefficients[3]!, a4 = blockCoefficients[4]!, a5 = blockCoefficients[5]!, a6 = blockCoefficients[6]!, a7 = blockCoefficients[7]!, a8 = blockCoefficients[8]!;
  const b0 = blockCoefficients[9]!, b1 = blockCoefficients[10]!, b2 = blockCoefficients[11]!, b3 = blockCoefficients[12]!, b4 = blockCoefficients[13]!, b5 = blockCoefficients[14]!, b6 = blockCoefficients[15]!, b7 = blockCoefficients[16]!, b8 = blockCoefficients[17]!;
  const split0 = block?.splitValues[0] ?? 0, below0 = block?.belowOutputs[0] ?? 0, above0 = block?.aboveOutputs[0] ?? 0;
  const split1 = block?.splitValues[1] ?? 0, below1 = block?.belowOutputs[1] ?? 0, above1 = block?.aboveOutputs[1] ?? 0;
  const threshold0 = block?.threshold ?? 0;
  const firstStageWeakCount = block?.weakCount ?? 0;
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
    let stage = 0;
    if (fused) {
      // The fused pass: σ and the whole first stage for each window in one
      // loop, listing only the windows that pass (with their margin). Most
      // windows die in the first stage, so listing every window, reading the
      // list back once per classifier and compacting it cost more than the
      // stage itself. Arithmetic is the breadth-first path's, operation for
      // operation (see FirstStageBlock on the padding), score (0 + out₀) + out₁.
      let nonFlat = 0;
      for (let base = row, lastBase = row + lastX; base <= lastBase; base += step) {
        const total = sum[base + bottomRight]! - sum[base + bottomLeft]! - sum[base + windowWidth]! + sum[base]!;
        const totalSquared = squaredSum[base + bottomRight]! - squaredSum[base + bottomLeft]! - squaredSum[base + windowWidth]! + squaredSum[base]!;
        const mean = total * inverseCount;
        const variance = totalSquared * inverseCount - mean * mean;
        if (variance < flatVariance) continue;
        nonFlat++;
        const inverseDeviation = 1 / Math.sqrt(variance);
        const value0 = a0 * sum[base + p0]! + a1 * sum[base + p1]! + a2 * sum[base + p2]! + a3 * sum[base + p3]! + a4 * sum[base + p4]! + a5 * sum[base + p5]! + a6 * sum[base + p6]! + a7 * sum[base + p7]! + a8 * sum[base + p8]!;
        const value1 = b0 * sum[base + q0]! + b1 * sum[base + q1]! + b2 * sum[base + q2]! + b3 * sum[base + q3]! + b4 * sum[base + q4]! + b5 * sum[base + q5]! + b6 * sum[base + q6]! + b7 * sum[base + q7]! + b8 * sum[base + q8]!;
        const margin = ((0 + (value0 * inverseDeviation < split0 ? below0 : above0)) + (value1 * inverseDeviation < split1 ? below1 : above1)) - threshold0;
        if (margin < 0) continue;
        bases[count] = base;
        inverseDeviations[count] = inverseDeviation;
        scores[count] = margin;
        count++;
      }
      tally[TALLY_WINDOWS]! += columns;
      tally[TALLY_FLAT]! += columns - nonFlat;
      tally[TALLY_FEATURES]! += nonFlat * firstStageWeakCount;
      tally[TALLY_REJECTED]! += nonFlat - count;
      stage = 1;
    } else {
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
    }
    let weak = stage === 0 ? 0 : stageEnds[0]!;
    let corner = weak === 0 ? 0 : weakEnds[weak - 1]!;
    for (; stage < stageCount && count > 0; stage++) {
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
