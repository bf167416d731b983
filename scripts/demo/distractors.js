// Hard negatives for a rivet detector: round slotted screw heads (round like a rivet
// but flat, with a slot) and stencilled marks drawn with simple strokes (0, 8, O-like
// loops). None of these draw a dome.
import { meanOver, shadeRegion, strokePaths } from './canvas.js';

/**
 * A flat slotted (or cross-slotted) screw head of `radius` pixels: a flat disc a little
 * off the panel level, a bevelled rim lit from `lightAzimuth`, a dark edge, and a dark slot.
 */
export function drawScrewHead(canvas, random, centerX, centerY, radius, lightAzimuth) {
  canvas.drawn.push('screw-head');
  const base = meanOver(canvas, centerX - radius * 1.5, centerY - radius * 1.5, centerX + radius * 1.5, centerY + radius * 1.5);
  const face = base + random.uniform(-25, 25);
  const rim = random.uniform(15, 40);
  const slotAngle = random.uniform(0, Math.PI);
  const slotHalfWidth = radius * random.uniform(0.08, 0.14);
  const cross = random.chance(0.3);
  const slotValue = base - random.uniform(45, 80);
  const ca = Math.cos(slotAngle);
  const sa = Math.sin(slotAngle);
  shadeRegion(canvas, centerX, centerY, radius + 2, (dx, dy) => {
    const d = Math.hypot(dx, dy) / radius;
    if (d >= 1 + 1 / radius) return null;
    if (d >= 1) return base - rim;
    const along = dx * ca + dy * sa;
    const across = -dx * sa + dy * ca;
    const inSlot = Math.abs(across) < slotHalfWidth && Math.abs(along) < radius * 0.8;
    const inCross = cross && Math.abs(along) < slotHalfWidth && Math.abs(across) < radius * 0.8;
    if (inSlot || inCross) return slotValue;
    if (d > 0.82) return face + rim * Math.cos(Math.atan2(dy, dx) - lightAzimuth);
    return face;
  });
}

// Stroke glyphs on a 4 × 6 grid (x right, y down), our own simple stencil lettering.
const GLYPHS = {
  0: [[[1, 0], [3, 0], [4, 1], [4, 5], [3, 6], [1, 6], [0, 5], [0, 1], [1, 0]]],
  1: [[[1, 1], [2, 0], [2, 6]], [[1, 6], [3, 6]]],
  2: [[[0, 1], [1, 0], [3, 0], [4, 1], [4, 2], [0, 6], [4, 6]]],
  3: [[[0, 0], [4, 0], [2, 2.5], [3, 2.5], [4, 3.5], [4, 5], [3, 6], [0, 6]]],
  4: [[[3, 6], [3, 0], [0, 4], [4, 4]]],
  5: [[[4, 0], [0, 0], [0, 2.5], [3, 2.5], [4, 3.5], [4, 5], [3, 6], [0, 6]]],
  6: [[[4, 0], [1, 0], [0, 1], [0, 5], [1, 6], [3, 6], [4, 5], [4, 3.5], [3, 2.5], [0, 2.5]]],
  7: [[[0, 0], [4, 0], [1.5, 6]]],
  8: [[[1, 0], [3, 0], [4, 1], [4, 2], [3, 3], [1, 3], [0, 4], [0, 5], [1, 6], [3, 6], [4, 5], [4, 4], [3, 3], [1, 3], [0, 2], [0, 1], [1, 0]]],
  9: [[[4, 3.5], [1, 3.5], [0, 2.5], [0, 1], [1, 0], [3, 0], [4, 1], [4, 5], [3, 6], [0, 6]]],
  A: [[[0, 6], [2, 0], [4, 6]], [[1, 3.5], [3, 3.5]]],
  B: [[[0, 3], [3, 3], [4, 4], [4, 5], [3, 6], [0, 6], [0, 0], [3, 0], [4, 1], [4, 2], [3, 3]]],
  C: [[[4, 1], [3, 0], [1, 0], [0, 1], [0, 5], [1, 6], [3, 6], [4, 5]]],
  E: [[[4, 0], [0, 0], [0, 6], [4, 6]], [[0, 3], [3, 3]]],
  H: [[[0, 0], [0, 6]], [[4, 0], [4, 6]], [[0, 3], [4, 3]]],
  K: [[[0, 0], [0, 6]], [[4, 0], [0, 3.5]], [[1.3, 2.6], [4, 6]]],
  L: [[[0, 0], [0, 6], [4, 6]]],
  N: [[[0, 6], [0, 0], [4, 6], [4, 0]]],
  O: [[[1, 0], [3, 0], [4, 1], [4, 5], [3, 6], [1, 6], [0, 5], [0, 1], [1, 0]]],
  P: [[[0, 6], [0, 0], [3, 0], [4, 1], [4, 2], [3, 3], [0, 3]]],
  R: [[[0, 6], [0, 0], [3, 0], [4, 1], [4, 2], [3, 3], [0, 3]], [[2, 3], [4, 6]]],
  T: [[[0, 0], [4, 0]], [[2, 0], [2, 6]]],
  X: [[[0, 0], [4, 6]], [[4, 0], [0, 6]]],
  Z: [[[0, 0], [4, 0], [0, 6], [4, 6]]],
};
const GLYPH_NAMES = Object.keys(GLYPHS);

/** A random stencil text of `length` characters: a letter or two and digits, like a part code. */
export function randomStencilText(random, length) {
  let text = '';
  for (let i = 0; i < length; i++) text += i < 2 && random.chance(0.5) ? random.pick(GLYPH_NAMES.slice(10)) : String(random.integer(0, 9));
  return text;
}

/**
 * Stencils `text` with its top-left corner at (left, top), glyphs `charHeight` pixels
 * tall, in dark or white paint, optionally tilted by a few degrees.
 * Returns the box it covers as [x, y, width, height].
 */
export function drawStencil(canvas, random, text, left, top, charHeight) {
  canvas.drawn.push('stencil');
  const unit = charHeight / 6;
  const tilt = random.uniform(-0.08, 0.08);
  const cos = Math.cos(tilt);
  const sin = Math.sin(tilt);
  const paths = [];
  [...text].forEach((character, index) => {
    const originX = index * 6 * unit;
    for (const path of GLYPHS[character]) {
      paths.push(path.map(([gx, gy]) => {
        const x = originX + gx * unit;
        const y = gy * unit;
        return [left + x * cos - y * sin, top + x * sin + y * cos];
      }));
    }
  });
  const dark = random.chance(0.7);
  const ink = dark ? random.uniform(20, 60) : random.uniform(210, 245);
  strokePaths(canvas, paths, Math.max(1, unit * random.uniform(0.6, 0.9)), ink, random.uniform(0.6, 0.9));
  return [left, top, text.length * 6 * unit, charHeight];
}
