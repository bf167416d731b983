import { checkInteger, checkNumber } from '../check.js';
import { intersectionOverUnion, type Box } from '../metrics/intersection-over-union.js';
import type { RawHits } from './scan-image.js';

/** One detection after merging: its box, score (see RawHits) and the number of raw hits behind it. */
export interface Detection {
  readonly box: Box;
  readonly score: number;
  readonly support: number;
}

/** How raw hits become detections. */
export type MergeMethod = 'nms' | 'mean' | 'none';
/** Every merge method, in the order the CLI lists them. */
export const MERGE_METHODS: readonly MergeMethod[] = ['nms', 'mean', 'none'];

/** Options of mergeDetections; defaults in DEFAULT_MERGE_OPTIONS. */
export interface MergeOptions {
  /** Default 'nms'. */
  readonly method?: MergeMethod;
  /** IoU above which two hits overlap; default 0.3, range [0, 1]. */
  readonly overlap?: number;
  /** For 'mean' (and 'nms'): keep detections backed by at least this many hits; default 1. */
  readonly minSupport?: number;
}

/** Defaults of MergeOptions, stated once: nms at IoU 0.3 (common practice), support ≥ 1. */
export const DEFAULT_MERGE_OPTIONS = { method: 'nms', overlap: 0.3, minSupport: 1 } as const;

/**
 * Turns raw hits into detections, sorted by score (highest first; ties by x, y, width).
 *
 * - `none`: every hit, support 1.
 * - `nms`: greedy non-maximum suppression — take the best remaining hit, drop all
 *   hits whose IoU with it exceeds `overlap`; support counts the hit and those dropped.
 * - `mean`: group hits transitively linked by IoU > `overlap` (union–find), average
 *   each group's boxes, score = the group's best score, support = group size
 *   (Viola & Jones 2004 merge overlapping detections into their average).
 *
 * Detections with support < minSupport are dropped.
 * @throws RectboostError `invalid-option` for options out of range.
 */
export function mergeDetections(hits: RawHits, options: MergeOptions = {}): Detection[] {
  const method = options.method ?? DEFAULT_MERGE_OPTIONS.method;
  const overlap = checkNumber('overlap', options.overlap ?? DEFAULT_MERGE_OPTIONS.overlap, 0, 1);
  const minSupport = checkInteger('minSupport', options.minSupport ?? DEFAULT_MERGE_OPTIONS.minSupport, 1, 1_000_000);
  const boxes: Box[] = [];
  for (let i = 0; i < hits.count; i++) boxes.push([hits.x[i]!, hits.y[i]!, hits.width[i]!, hits.height[i]!]);
  const order = boxes.map((_, i) => i).sort((a, b) => compareHits(hits, a, b));
  let detections: Detection[];
  if (method === 'none') {
    detections = order.map((i) => ({ box: boxes[i]!, score: hits.score[i]!, support: 1 }));
  } else if (method === 'nms') {
    const neighbours = overlappingPairs(boxes, overlap);
    const rank = new Int32Array(hits.count);
    order.forEach((i, position) => (rank[i] = position));
    detections = [];
    const suppressed = new Uint8Array(hits.count);
    for (const i of order) {
      if (suppressed[i]) continue;
      let support = 1;
      for (const j of neighbours[i]!) {
        if (rank[j]! > rank[i]! && !suppressed[j]) {
          suppressed[j] = 1;
          support++;
        }
      }
      detections.push({ box: boxes[i]!, score: hits.score[i]!, support });
    }
  } else {
    detections = meanOfGroups(hits, boxes, order, overlap);
  }
  return detections.filter((detection) => detection.support >= minSupport);
}

function compareHits(hits: RawHits, a: number, b: number): number {
  return hits.score[b]! - hits.score[a]! || hits.x[a]! - hits.x[b]! || hits.y[a]! - hits.y[b]! || hits.width[a]! - hits.width[b]!;
}

/**
 * For each box, the other boxes whose IoU with it exceeds `overlap`. A sweep
 * over boxes sorted by x only compares boxes whose x-ranges intersect, so sparse
 * hits cost about n log n instead of n².
 */
function overlappingPairs(boxes: readonly Box[], overlap: number): number[][] {
  const byX = boxes.map((_, i) => i).sort((a, b) => boxes[a]![0] - boxes[b]![0] || a - b);
  const neighbours: number[][] = boxes.map(() => []);
  for (let a = 0; a < byX.length; a++) {
    const i = byX[a]!;
    const right = boxes[i]![0] + boxes[i]![2];
    for (let b = a + 1; b < byX.length; b++) {
      const j = byX[b]!;
      if (boxes[j]![0] >= right) break;
      if (intersectionOverUnion(boxes[i]!, boxes[j]!) > overlap) {
        neighbours[i]!.push(j);
        neighbours[j]!.push(i);
      }
    }
  }
  return neighbours;
}

function meanOfGroups(hits: RawHits, boxes: Box[], order: number[], overlap: number): Detection[] {
  const parent = boxes.map((_, i) => i);
  const root = (i: number): number => {
    while (parent[i] !== i) {
      parent[i] = parent[parent[i]!]!;
      i = parent[i]!;
    }
    return i;
  };
  overlappingPairs(boxes, overlap).forEach((list, i) => {
    for (const j of list) parent[root(j)] = root(i);
  });
  // Groups in the order of their best hit, so the output is sorted by score.
  const groups = new Map<number, number[]>();
  for (const i of order) {
    const key = root(i);
    const members = groups.get(key);
    if (members) members.push(i);
    else groups.set(key, [i]);
  }
  return [...groups.values()].map((members) => {
    const mean = [0, 0, 0, 0];
    for (const i of members) for (let k = 0; k < 4; k++) mean[k]! += boxes[i]![k]!;
    const box: Box = [mean[0]! / members.length, mean[1]! / members.length, mean[2]! / members.length, mean[3]! / members.length];
    return { box, score: hits.score[members[0]!]!, support: members.length };
  });
}
