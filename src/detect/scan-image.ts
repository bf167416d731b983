import { checkInteger, checkNumber, checkThat } from '../check.js';
import type { IntegralImage } from '../image/integral-image.js';
import { FLAT_WINDOW_VARIANCE } from '../image/window-statistics.js';
import { compileCascadeAtScale } from './compiled-cascade.js';
import type { DetectorCascade } from './detector-cascade.js';
import {
  loadImageIntoKernel, TALLY_ACCEPTED, TALLY_FEATURES, TALLY_FLAT, TALLY_REJECTED, TALLY_WINDOWS, type KernelImage, type ScaledCascade,
} from './scan-kernel.js';

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
 * Score: the window's evidence, the sum over every stage of its margin
 * (Σ outputs − threshold, ≥ 0 for each stage an accepted window passed), added in
 * stage order: ((m₀ + m₁) + m₂) + …. Each stage's boosted sum estimates half the
 * log-odds of an object on the windows that reach it (Friedman, Hastie & Tibshirani
 * 2000, result 1), so the sum carries the whole cascade's evidence: on the demo
 * panels it raised average precision with non-maximum suppression from 0.823
 * (last stage's margin alone, which takes few distinct values) to 0.954.
 * A cascade without stages accepts every non-flat window with score 0.
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
 * corner offsets into the image's integral table (compileCascadeAtScale, the one compile step); windows of round(W·s) ×
 * round(H·s) pixels slide by max(1, round(shift·s)) pixels. Each window's σ
 * comes from the squared table by the σ rule of inverseStandardDeviation;
 * windows with variance below FLAT_WINDOW_VARIANCE are rejected without
 * evaluating any feature (no division by zero). Feature values are multiplied
 * by 1/σ, as training, mining and patch evaluation do through the same kernel
 * (window-list.ts), and the window leaves at the
 * first stage it fails (early rejection, the attentional cascade of Viola & Jones 2004).
 *
 * The per-window work runs in the WebAssembly scan kernel (scan-kernel.wat),
 * in this order of arithmetic, which every path must keep so that decisions
 * and scores are the same bits as a window-by-window evaluation:
 *   total = S[br] − S[bl] − S[tr] + S[tl] (and likewise from the squared table);
 *   mean = total · (1/n); variance = squaredTotal · (1/n) − mean · mean;
 *   value = ((0 + c₀·S[o₀]) + c₁·S[o₁]) + … over a classifier's merged corners;
 *   output = value · (1/σ) < splitValue ? belowOutput : aboveOutput (a stump; a tree's
 *     output is the leaf its splits lead to, each split tested the same way, added once);
 *   margin = ((0 + output₀) + output₁ + …) − threshold, passing when ≥ 0;
 *   score = ((margin₀ + margin₁) + margin₂) + … over the stages (margin₀ alone for one).
 *
 * @throws RectboostError `invalid-option` for options out of range; `bad-image`
 *   when the image's tables do not fit WebAssembly's 4 GiB memory.
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
  const scaled = scanScales(cascade, integral.width, integral.height, resolved).map((scale) => compileCascadeAtScale(cascade, scale, integral.stride, resolved.shift, integral.rotatedAt));
  if (scaled.length === 0) return { hits: hits.toRawHits(), statistics };
  const capacity = {
    stages: cascade.stages.length,
    weakClassifiers: Math.max(...scaled.map((c) => c.weakEnds.length)),
    corners: Math.max(...scaled.map((c) => c.offsets.length)),
  };
  const columns = Math.max(...scaled.map((c) => Math.floor((integral.width - c.windowWidth) / c.step) + 1));
  const kernel = loadImageIntoKernel(integral, capacity, columns);
  try {
    for (const c of scaled) {
      scanOneScale(c, kernel, integral, hits);
      statistics.scales++;
    }
    const tally = kernel.tally();
    statistics.windowsScanned = tally[TALLY_WINDOWS]!;
    statistics.flatWindows = tally[TALLY_FLAT]!;
    statistics.featuresEvaluated = tally[TALLY_FEATURES]!;
    statistics.accepted = tally[TALLY_ACCEPTED]!;
    for (let k = 0; k < cascade.stages.length; k++) statistics.rejectedAtStage[k] = tally[TALLY_REJECTED + k]!;
  } finally {
    kernel.release();
  }
  return { hits: hits.toRawHits(), statistics };
}

/** Scans every row of one scale in the kernel and collects the accepted windows as hits. */
function scanOneScale(c: ScaledCascade, kernel: KernelImage, integral: IntegralImage, hits: HitCollector): void {
  kernel.setScale(c, FLAT_WINDOW_VARIANCE);
  const lastX = integral.width - c.windowWidth;
  const lastY = integral.height - c.windowHeight;
  for (let y = 0; y <= lastY; y += c.step) {
    const row = y * integral.stride;
    const count = kernel.scanRow(row, row + lastX, c.step);
    if (count === 0) continue;
    const { addresses, tableAddress, scores } = kernel.acceptedWindows(count);
    for (let i = 0; i < count; i++) hits.add((addresses[i]! - tableAddress) / 8 - row, y, c.windowWidth, c.windowHeight, scores[i]!);
  }
}
