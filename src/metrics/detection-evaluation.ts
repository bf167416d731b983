import type { ScanStatistics } from '../detect/scan-image.js';
import { matchDetections, type ImageDetectionsAndTruth } from './match-detections.js';
import { logAverageMissRate, missRateCurve } from './miss-rate.js';
import { averagePrecision, detectionRateAtFalsePositives, precisionRecallCurve } from './precision-recall.js';

/** Everything detection-level evaluation reports (all rates in [0, 1]). */
export interface DetectionEvaluation {
  readonly imageCount: number;
  readonly truthCount: number;
  readonly detectionCount: number;
  readonly truePositives: number;
  readonly iouThreshold: number;
  readonly averagePrecision: number;
  /** Recall reached with at most 1, 10 and 100 false positives over the whole set. */
  readonly detectionRateAtFalsePositives: { readonly '1': number; readonly '10': number; readonly '100': number };
  readonly logAverageMissRate: number;
  readonly precisionRecall: ReadonlyArray<{ readonly score: number; readonly precision: number; readonly recall: number }>;
  readonly missRateByFalsePositivesPerImage: ReadonlyArray<{ readonly falsePositivesPerImage: number; readonly missRate: number }>;
}

/**
 * Detection-level evaluation of a data set: PASCAL VOC matching and AP
 * (Everingham et al. 2010), detection rate at fixed false-positive counts, and
 * log-average miss rate over FPPI 10^−2..10^0 (Dollár et al. 2012).
 * @param iouThreshold default 0.5.
 */
export function evaluateDetections(images: readonly ImageDetectionsAndTruth[], iouThreshold = 0.5): DetectionEvaluation {
  const match = matchDetections(images, iouThreshold);
  const curve = precisionRecallCurve(match);
  const misses = missRateCurve(curve, images.length);
  const n = curve.recall.length;
  return {
    imageCount: images.length,
    truthCount: match.truthCount,
    detectionCount: n,
    truePositives: n > 0 ? curve.truePositives[n - 1]! : 0,
    iouThreshold,
    averagePrecision: averagePrecision(curve),
    detectionRateAtFalsePositives: {
      '1': detectionRateAtFalsePositives(curve, 1),
      '10': detectionRateAtFalsePositives(curve, 10),
      '100': detectionRateAtFalsePositives(curve, 100),
    },
    logAverageMissRate: logAverageMissRate(misses),
    precisionRecall: Array.from(curve.scores, (score, i) => ({ score, precision: curve.precision[i]!, recall: curve.recall[i]! })),
    missRateByFalsePositivesPerImage: Array.from(misses.missRate, (missRate, i) => ({ falsePositivesPerImage: misses.falsePositivesPerImage[i]!, missRate })),
  };
}

/** Speed and work figures summed over scans. */
export interface ScanSummary {
  readonly windowsScanned: number;
  readonly milliseconds: number;
  readonly windowsPerSecond: number;
  readonly meanFeaturesPerWindow: number;
  /** Share of all scanned windows rejected as flat, at each stage, and accepted. */
  readonly flatShare: number;
  readonly rejectedAtStageShare: readonly number[];
  readonly acceptedShare: number;
}

/** Adds up scan statistics; `milliseconds` is the total scan time (summed over threads). */
export function summarizeScans(statistics: readonly ScanStatistics[], milliseconds: number): ScanSummary {
  const stages = Math.max(0, ...statistics.map((s) => s.rejectedAtStage.length));
  const rejected = new Array<number>(stages).fill(0);
  let windows = 0;
  let features = 0;
  let flat = 0;
  let accepted = 0;
  for (const s of statistics) {
    windows += s.windowsScanned;
    features += s.featuresEvaluated;
    flat += s.flatWindows;
    accepted += s.accepted;
    s.rejectedAtStage.forEach((count, k) => (rejected[k]! += count));
  }
  const share = (count: number): number => (windows > 0 ? count / windows : 0);
  return {
    windowsScanned: windows,
    milliseconds,
    windowsPerSecond: milliseconds > 0 ? windows / (milliseconds / 1000) : 0,
    meanFeaturesPerWindow: share(features),
    flatShare: share(flat),
    rejectedAtStageShare: rejected.map(share),
    acceptedShare: share(accepted),
  };
}
