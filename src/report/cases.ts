import { matchDetections, type ImageDetectionsAndTruth } from '../metrics/match-detections.js';
import type { Box } from '../metrics/intersection-over-union.js';

/** A truth box that no detection matched. */
export interface MissedObject {
  readonly image: number;
  readonly box: Box;
}

/** A detection that matched no truth box (a duplicate of a found object included), with its score. */
export interface FalseAlarm {
  readonly image: number;
  readonly box: Box;
  readonly score: number;
}

/** The cases a practitioner acts on: every missed object and the highest-scoring false alarms. */
export interface CasesToReview {
  /** In image order, then truth order; at most `limit`. */
  readonly missed: readonly MissedObject[];
  readonly missedTotal: number;
  /** Highest score first (ties in image, then detection order); at most `limit`. */
  readonly falseAlarms: readonly FalseAlarm[];
  readonly falseAlarmTotal: number;
}

/**
 * Picks the missed objects and the top false alarms of a detection-level
 * evaluation, with the same matching as evaluateDetections (PASCAL VOC greedy
 * matching at `iouThreshold`), so the counts agree with its figures.
 * @param limit cases kept of each kind, default 24.
 * @example findCasesToReview(entries, 0.5).missed.length
 */
export function findCasesToReview(images: readonly ImageDetectionsAndTruth[], iouThreshold = 0.5, limit = 24): CasesToReview {
  const match = matchDetections(images, iouThreshold);
  const missed: MissedObject[] = [];
  match.missedTruth.forEach((indices, image) => indices.forEach((t) => missed.push({ image, box: images[image]!.truth[t]! })));
  const falseAlarms = match.detections
    .filter((d) => !d.truePositive)
    .map((d) => ({ image: d.image, box: images[d.image]!.detections[d.detection]!.box, score: d.score }));
  return { missed: missed.slice(0, limit), missedTotal: missed.length, falseAlarms: falseAlarms.slice(0, limit), falseAlarmTotal: falseAlarms.length };
}
