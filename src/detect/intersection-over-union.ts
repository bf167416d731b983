/**
 * A box [x, y, width, height] in pixels, half-open and continuous: it covers
 * x ≤ u < x + width, y ≤ v < y + height. Width and height are ≥ 0.
 */
export type Box = readonly [x: number, y: number, width: number, height: number];

/**
 * Intersection over union of two boxes: area(A ∩ B) / area(A ∪ B), in [0, 1]
 * (Everingham et al. 2010, PASCAL VOC detection task, overlap criterion).
 * Areas are continuous (width · height); the VOC devkit's "+1 pixel" convention
 * is not used. Two empty boxes give 0 (no division by zero).
 * @example intersectionOverUnion([0, 0, 10, 10], [5, 0, 10, 10]) // 50 / 150 = 1/3
 */
export function intersectionOverUnion(a: Box, b: Box): number {
  const overlapWidth = Math.min(a[0] + a[2], b[0] + b[2]) - Math.max(a[0], b[0]);
  const overlapHeight = Math.min(a[1] + a[3], b[1] + b[3]) - Math.max(a[1], b[1]);
  if (overlapWidth <= 0 || overlapHeight <= 0) return 0;
  const intersection = overlapWidth * overlapHeight;
  const union = a[2] * a[3] + b[2] * b[3] - intersection;
  return union > 0 ? intersection / union : 0;
}
