import { checkNumber } from '../check.js';
import { intersectionOverUnion, type Box } from './intersection-over-union.js';

/** Detections and ground truth of one image. */
export interface ImageDetectionsAndTruth {
  readonly detections: ReadonlyArray<{ readonly box: Box; readonly score: number }>;
  readonly truth: readonly Box[];
}

/** One detection after matching: its score and whether it matched a truth box. */
export interface MatchedDetection {
  readonly image: number;
  /** Position of the detection in its image's list. */
  readonly index: number;
  readonly score: number;
  readonly truePositive: boolean;
  /** Index of the truth box it matched (true positives), or −1. */
  readonly truthIndex: number;
}

/** All detections of a data set, sorted by score (highest first), with the truth count. */
export interface MatchResult {
  readonly detections: readonly MatchedDetection[];
  /** missedTruth[i]: indices of image i's truth boxes that no detection matched. */
  readonly missedTruth: ReadonlyArray<readonly number[]>;
  readonly truthCount: number;
  readonly imageCount: number;
}

/**
 * Matches detections to truth as PASCAL VOC does (Everingham et al. 2010, detection task):
 * detections are taken in order of decreasing score over the whole data set;
 * each goes to the truth box of its image with the highest IoU; it is a true
 * positive when that IoU ≥ `iouThreshold` and the box is not yet taken,
 * otherwise a false positive (a duplicate of a found object counts as false).
 * Each truth box is matched at most once. Ties in score keep input order.
 * @param iouThreshold default 0.5 (VOC), range [0, 1].
 * @throws RectboostError `invalid-option` when iouThreshold is out of range.
 */
export function matchDetections(images: readonly ImageDetectionsAndTruth[], iouThreshold = 0.5): MatchResult {
  checkNumber('iouThreshold', iouThreshold, 0, 1);
  const all: Array<{ image: number; index: number; score: number }> = [];
  images.forEach((entry, image) => entry.detections.forEach((detection, index) => all.push({ image, index, score: detection.score })));
  all.sort((a, b) => b.score - a.score || a.image - b.image || a.index - b.index);
  const taken = images.map((entry) => new Uint8Array(entry.truth.length));
  const detections: MatchedDetection[] = all.map(({ image, index, score }) => {
    const entry = images[image]!;
    const box = entry.detections[index]!.box;
    let best = -1;
    let bestOverlap = -Infinity;
    entry.truth.forEach((truth, t) => {
      const overlap = intersectionOverUnion(box, truth);
      if (overlap > bestOverlap) {
        bestOverlap = overlap;
        best = t;
      }
    });
    const truePositive = best >= 0 && bestOverlap >= iouThreshold && taken[image]![best] === 0;
    if (truePositive) taken[image]![best] = 1;
    return { image, index, score, truePositive, truthIndex: truePositive ? best : -1 };
  });
  const missedTruth = taken.map((flags) => Array.from(flags.keys()).filter((t) => flags[t] === 0));
  return { detections, missedTruth, truthCount: images.reduce((n, entry) => n + entry.truth.length, 0), imageCount: images.length };
}

/** A detection that matched no truth box, or a truth box that no detection matched. */
export interface DetectionError {
  readonly image: number;
  /** Index in the image's detections (false alarms) or truth boxes (misses). */
  readonly index: number;
  readonly box: Box;
  /** The detection's score; undefined for a missed object. */
  readonly score?: number;
}

/** The errors of a data set under VOC matching (matchDetections). */
export interface DetectionErrors {
  /** False alarms, highest score first (duplicates of a found object included, as VOC counts them). */
  readonly falseAlarms: readonly DetectionError[];
  /** Missed objects, by image and then truth order. */
  readonly misses: readonly DetectionError[];
}

/**
 * The false alarms and missed objects of a data set, as matchDetections decides them: what
 * `rectboost evaluate --errors` writes as crops, to be fed back as negative patches.
 * @param iouThreshold default 0.5, range [0, 1].
 * @example detectionErrors([{ detections: [{ box: [0, 0, 24, 24], score: 1 }], truth: [] }]).falseAlarms.length // 1
 */
export function detectionErrors(images: readonly ImageDetectionsAndTruth[], iouThreshold = 0.5): DetectionErrors {
  const match = matchDetections(images, iouThreshold);
  const found = images.map((entry) => new Uint8Array(entry.truth.length));
  const falseAlarms: DetectionError[] = [];
  for (const detection of match.detections) {
    if (detection.truePositive) found[detection.image]![detection.truthIndex] = 1;
    else falseAlarms.push({ image: detection.image, index: detection.index, box: images[detection.image]!.detections[detection.index]!.box, score: detection.score });
  }
  const misses: DetectionError[] = [];
  images.forEach((entry, image) => entry.truth.forEach((box, index) => {
    if (found[image]![index] === 0) misses.push({ image, index, box });
  }));
  return { falseAlarms, misses };
}
