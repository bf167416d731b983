import type { DetectorCascade } from '../detect/detector-cascade.js';
import { compileCascadeAtScale } from '../detect/compiled-cascade.js';
import { resolveScanOptions, scanScales, type RawHits, type ScanOptions, type ScanResult, type ScanStatistics } from '../detect/scan-image.js';
import type { IntegralImage } from '../image/integral-image.js';
import { FLAT_WINDOW_VARIANCE } from '../image/window-statistics.js';

/**
 * THE score of a window, step by step: its evidence after one more stage, from the
 * evidence of the stages before (undefined at the first) and this stage's margin
 * (Σ votes − threshold): ((m₀ + m₁) + m₂) + …, as RawHits states; 0 for a cascade
 * without stages. The scan kernel (scan-kernel.wat) and the C export
 * (rbd_detection_score) compute the same value; change them together.
 */
export function detectionScore(evidenceBefore: number | undefined, margin: number): number {
  return evidenceBefore === undefined ? margin : evidenceBefore + margin;
}

/**
 * scanImage without WebAssembly: the same scales (scanScales), the same cascade
 * compiled per scale (compileCascadeAtScale), the same windows in the same order, and
 * per window the order of arithmetic stated on scanImage, operation for
 * operation, so that hits, scores and statistics are the kernel's bits
 * (test/runtime/plain-scan.test.ts compares them). For environments without
 * WebAssembly SIMD; several times slower than the kernel.
 * @throws RectboostError `invalid-option` for options out of range.
 */
export function scanImagePlain(cascade: DetectorCascade, integral: IntegralImage, options: ScanOptions = {}): ScanResult {
  const resolved = resolveScanOptions(options);
  const stageCount = cascade.stages.length;
  const statistics: ScanStatistics = {
    windowsScanned: 0,
    flatWindows: 0,
    featuresEvaluated: 0,
    rejectedAtStage: new Array<number>(stageCount).fill(0),
    accepted: 0,
    scales: 0,
  };
  const found = { x: [] as number[], y: [] as number[], width: [] as number[], height: [] as number[], score: [] as number[] };
  const { sum, squaredSum: squared, stride } = integral;
  for (const scale of scanScales(cascade, integral.width, integral.height, resolved)) {
    const c = compileCascadeAtScale(cascade, scale, stride, resolved.shift, integral.rotatedAt);
    const { windowWidth, windowHeight, step, stageEnds, thresholds, weakEnds, splitValues, belowOutputs, aboveOutputs, offsets, coefficients, nodePlaces } = c;
    const bottomRight = windowHeight * stride + windowWidth;
    const bottomLeft = windowHeight * stride;
    const topRight = windowWidth;
    const inverseCount = 1 / (windowWidth * windowHeight);
    for (let y = 0; y + windowHeight <= integral.height; y += step) {
      for (let x = 0; x + windowWidth <= integral.width; x += step) {
        statistics.windowsScanned++;
        const at = y * stride + x;
        const total = sum[at + bottomRight]! - sum[at + bottomLeft]! - sum[at + topRight]! + sum[at]!;
        const totalSquared = squared[at + bottomRight]! - squared[at + bottomLeft]! - squared[at + topRight]! + squared[at]!;
        const mean = total * inverseCount;
        const variance = totalSquared * inverseCount - mean * mean;
        if (variance < FLAT_WINDOW_VARIANCE) {
          statistics.flatWindows++;
          continue;
        }
        const inverseDeviation = 1 / Math.sqrt(variance);
        let evidence = 0;
        let weak = 0;
        let corner = 0;
        let passed = true;
        for (let stage = 0; stage < stageCount; stage++) {
          let score = 0;
          const weakEnd = stageEnds[stage]!;
          statistics.featuresEvaluated += weakEnd - weak;
          // A tree's records come in heap order; `reached` is the split the window's path is at
          // (splits off the path are skipped: their values could not change the leaf).
          let reached = 0;
          for (; weak < weakEnd; weak++) {
            const place = nodePlaces[weak]!;
            const node = place & 0xffff;
            const splitCount = place >>> 16;
            if (node !== reached) {
              corner = weakEnds[weak]!;
              if (node === splitCount - 1) reached = 0;
              continue;
            }
            let value = 0;
            for (const cornerEnd = weakEnds[weak]!; corner < cornerEnd; corner++) value += coefficients[corner]! * sum[at + offsets[corner]!]!;
            const below = value * inverseDeviation < splitValues[weak]!;
            if (node >= splitCount >>> 1) {
              // bottom level (a stump's one split is its bottom level): add the leaf, start the next tree at its root
              score += below ? belowOutputs[weak]! : aboveOutputs[weak]!;
              if (node === splitCount - 1) reached = 0;
              else reached = -1;
            } else {
              reached = 2 * node + (below ? 1 : 2);
            }
          }
          const margin = score - thresholds[stage]!;
          if (margin < 0) {
            statistics.rejectedAtStage[stage]!++;
            passed = false;
            break;
          }
          evidence = detectionScore(stage === 0 ? undefined : evidence, margin);
        }
        if (!passed) continue;
        statistics.accepted++;
        found.x.push(x);
        found.y.push(y);
        found.width.push(windowWidth);
        found.height.push(windowHeight);
        found.score.push(evidence);
      }
    }
    statistics.scales++;
  }
  const hits: RawHits = {
    count: found.x.length,
    x: Float64Array.from(found.x),
    y: Float64Array.from(found.y),
    width: Float64Array.from(found.width),
    height: Float64Array.from(found.height),
    score: Float64Array.from(found.score),
  };
  return { hits, statistics };
}
