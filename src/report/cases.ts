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

/**
 * The cases a practitioner acts on: what the detector missed and what it
 * raised falsely, each list cut to a limit but counted in full.
 */
export interface CaseLists<Missed, Raised> {
  readonly missed: readonly Missed[];
  readonly missedTotal: number;
  readonly falseAlarms: readonly Raised[];
  readonly falseAlarmTotal: number;
}

/** Detection-level cases: missed objects in image then truth order, false alarms highest score first. */
export type CasesToReview = CaseLists<MissedObject, FalseAlarm>;

/** The first `limit` cases of each kind, with the full counts. */
function firstOf<Missed, Raised>(missed: readonly Missed[], falseAlarms: readonly Raised[], limit: number): CaseLists<Missed, Raised> {
  return { missed: missed.slice(0, limit), missedTotal: missed.length, falseAlarms: falseAlarms.slice(0, limit), falseAlarmTotal: falseAlarms.length };
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
    .map((d) => ({ image: d.image, box: images[d.image]!.detections[d.index]!.box, score: d.score }));
  return firstOf(missed, falseAlarms, limit);
}

/** A labelled patch to look at: its index among its set, how far it got and its cascade depth score. */
export interface PatchCase {
  readonly sample: number;
  readonly stagesPassed: number;
  readonly score: number;
}

/** Patch-level cases: rejected positives in sample order, accepted negatives highest depth score first (ties in sample order). */
export type PatchCasesToReview = CaseLists<PatchCase, PatchCase>;

/**
 * Picks the patch-level cases from cascadeDepthScores of the positives and the
 * negatives: a positive is missed when it passes fewer than `stageCount`
 * stages, a negative is a false alarm when it passes them all — the cascade's
 * own decision, as in evaluatePatches.
 * @param limit cases kept of each kind, default 24.
 */
export function findPatchCases(
  positives: { readonly scores: Float64Array; readonly stagesPassed: Int32Array },
  negatives: { readonly scores: Float64Array; readonly stagesPassed: Int32Array },
  stageCount: number,
  limit = 24,
): PatchCasesToReview {
  const cases = (depth: typeof positives, keep: (passed: number) => boolean): PatchCase[] =>
    Array.from(depth.stagesPassed, (stagesPassed, sample) => ({ sample, stagesPassed, score: depth.scores[sample]! })).filter((c) => keep(c.stagesPassed));
  const missed = cases(positives, (passed) => passed < stageCount);
  const falseAlarms = cases(negatives, (passed) => passed >= stageCount).sort((a, b) => b.score - a.score || a.sample - b.sample);
  return firstOf(missed, falseAlarms, limit);
}
