import { checkInteger, checkNumber } from '../check.js';
import { intersectionOverUnion, type Box } from './intersection-over-union.js';
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
    detections = suppressNonMaxima(hits, boxes, order, overlap);
  } else {
    detections = meanOfGroups(hits, boxes, order, overlap);
  }
  return detections.filter((detection) => detection.support >= minSupport);
}

/**
 * Greedy non-maximum suppression in score order. Only kept hits look for hits
 * to suppress, and they look only among hits whose x-range meets theirs (a
 * window of the x-sorted list, found by binary search), so dense raw hits —
 * thousands of overlapping windows — cost about kept × local hits rather than
 * every overlapping pair. Pairs whose y-ranges do not meet are skipped with
 * the same sums intersectionOverUnion uses (it returns 0 for them).
 */
function suppressNonMaxima(hits: RawHits, boxes: readonly Box[], order: readonly number[], overlap: number): Detection[] {
  const count = boxes.length;
  const left = new Float64Array(count);
  const top = new Float64Array(count);
  const right = new Float64Array(count);
  const bottom = new Float64Array(count);
  let widest = 0;
  boxes.forEach((box, i) => {
    left[i] = box[0];
    top[i] = box[1];
    right[i] = box[0] + box[2];
    bottom[i] = box[1] + box[3];
    widest = Math.max(widest, box[2]);
  });
  const byX = Int32Array.from(boxes.keys()).sort((a, b) => left[a]! - left[b]!);
  const sortedLeft = Float64Array.from(byX, (i) => left[i]!);
  const rank = new Int32Array(count);
  order.forEach((i, position) => (rank[i] = position));
  const suppressed = new Uint8Array(count);
  const detections: Detection[] = [];
  for (const i of order) {
    if (suppressed[i]) continue;
    let support = 1;
    // Boxes that can meet box i in x start at left[i] − widest (a box that starts further left ends before left[i]).
    const from = lowerBound(sortedLeft, left[i]! - widest);
    for (let b = from; b < count && sortedLeft[b]! < right[i]!; b++) {
      const j = byX[b]!;
      if (suppressed[j] || rank[j]! <= rank[i]! || right[j]! <= left[i]!) continue;
      if (Math.min(bottom[i]!, bottom[j]!) - Math.max(top[i]!, top[j]!) <= 0) continue;
      if (intersectionOverUnion(boxes[i]!, boxes[j]!) > overlap) {
        suppressed[j] = 1;
        support++;
      }
    }
    detections.push({ box: boxes[i]!, score: hits.score[i]!, support });
  }
  return detections;
}

/** First index whose value is ≥ `value` in an ascending array. */
function lowerBound(sorted: Float64Array, value: number): number {
  let low = 0;
  let high = sorted.length;
  while (low < high) {
    const middle = (low + high) >>> 1;
    if (sorted[middle]! < value) low = middle + 1;
    else high = middle;
  }
  return low;
}

function compareHits(hits: RawHits, a: number, b: number): number {
  return hits.score[b]! - hits.score[a]! || hits.x[a]! - hits.x[b]! || hits.y[a]! - hits.y[b]! || hits.width[a]! - hits.width[b]!;
}

/**
 * Groups hits transitively linked by IoU > overlap with union–find, in one sweep
 * over boxes sorted by x: only boxes whose x-ranges meet are compared, pairs whose
 * y-ranges do not meet are skipped (intersectionOverUnion gives them 0), and pairs
 * already in one group skip the IoU altogether, so the thousands of overlapping
 * raw hits around a real object cost two root look-ups each. Connected groups do
 * not depend on the order of unions, so the result equals testing every pair.
 */
function meanOfGroups(hits: RawHits, boxes: Box[], order: number[], overlap: number): Detection[] {
  const count = boxes.length;
  // Work in x order: position p holds hit byX[p], its sides copied to flat arrays
  // so that the sweep reads memory in sequence; parent links positions.
  const byX = Int32Array.from(boxes.keys()).sort((a, b) => boxes[a]![0] - boxes[b]![0] || a - b);
  const left = new Float64Array(count);
  const top = new Float64Array(count);
  const right = new Float64Array(count);
  const bottom = new Float64Array(count);
  for (let p = 0; p < count; p++) {
    const box = boxes[byX[p]!]!;
    left[p] = box[0];
    top[p] = box[1];
    right[p] = box[0] + box[2];
    bottom[p] = box[1] + box[3];
  }
  const parent = Int32Array.from(byX.keys());
  const root = (p: number): number => {
    while (parent[p] !== p) {
      parent[p] = parent[parent[p]!]!;
      p = parent[p]!;
    }
    return p;
  };
  // IoU > t needs the intersection to exceed t times box a's area (the union is
  // at least that area), so both overlaps must exceed t times a's sides:
  // iw · ih > t · wₐ · hₐ with iw ≤ wₐ, ih ≤ hₐ. Partners of a therefore start
  // left of rightₐ − t · wₐ and overlap it by more than t · hₐ in y. The bounds
  // are loosened by one part in 10⁹ so that rounding cannot drop a pair that
  // intersectionOverUnion would link.
  const slack = 1 - 1e-9;
  for (let a = 0; a < count; a++) {
    const xLimit = right[a]! - overlap * (right[a]! - left[a]!) * slack;
    const yNeeded = overlap * (bottom[a]! - top[a]!) * slack;
    const topOfA = top[a]!;
    const bottomOfA = bottom[a]!;
    // a's root stays its root through this loop: unions below hang other roots under it.
    const rootOfA = root(a);
    for (let b = a + 1; b < count && left[b]! < xLimit; b++) {
      if (Math.min(bottomOfA, bottom[b]!) - Math.max(topOfA, top[b]!) <= yNeeded) continue;
      const rootOfB = root(b);
      if (rootOfA === rootOfB) continue;
      if (intersectionOverUnion(boxes[byX[a]!]!, boxes[byX[b]!]!) > overlap) parent[rootOfB] = rootOfA;
    }
  }
  // Groups in the order of their best hit, so the output is sorted by score.
  const groups = new Map<number, number[]>();
  const positionOf = new Int32Array(count);
  byX.forEach((i, p) => (positionOf[i] = p));
  for (const i of order) {
    const key = root(positionOf[i]!);
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
