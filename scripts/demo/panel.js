// Bare sheet-metal panel: a lit gradient, brushed grain, and the everyday marks of a
// workshop (stains, seams, scratches). None of these draw anything round and domed.
import { gaussianBlur, strokePaths } from './canvas.js';

/**
 * Paints brushed metal over the whole canvas: a base level, a linear light gradient
 * and grain (white noise averaged along the brushing direction, so it streaks).
 * Returns the brushing axis ('x' or 'y') and base level for callers that align marks.
 */
export function paintPanel(canvas, random, { baseLow = 95, baseHigh = 165 } = {}) {
  canvas.drawn.push('panel');
  const { width, height, data } = canvas;
  const base = random.uniform(baseLow, baseHigh);
  const angle = random.uniform(0, 2 * Math.PI);
  // Gradient amplitude as gray levels across the canvas diagonal, so small patches get a small share.
  const gradient = random.uniform(10, 40) / Math.hypot(Math.max(width, 320), Math.max(height, 240));
  const gx = Math.cos(angle) * gradient;
  const gy = Math.sin(angle) * gradient;
  const axis = random.chance(0.7) ? 'x' : 'y';
  const grainLength = random.integer(12, 40);
  const grainAmplitude = random.uniform(2.5, 7);
  const noise = new Float32Array(width * height);
  for (let i = 0; i < noise.length; i++) noise[i] = random.normal();
  const grain = averageAlong(noise, width, height, axis, grainLength);
  // A moving average of n unit normals has standard deviation 1/sqrt(n): rescale to the chosen amplitude.
  const scale = grainAmplitude * Math.sqrt(grainLength);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      data[i] = base + gx * (x - width / 2) + gy * (y - height / 2) + scale * grain[i];
    }
  }
  return { axis, base };
}

/** Moving average of `length` samples along x or y, clamped at the edges. */
function averageAlong(values, width, height, axis, length) {
  const out = new Float32Array(values.length);
  const half = Math.floor(length / 2);
  const along = axis === 'x' ? width : height;
  const across = axis === 'x' ? height : width;
  const index = axis === 'x' ? (a, b) => b * width + a : (a, b) => a * width + b;
  for (let b = 0; b < across; b++) {
    for (let a = 0; a < along; a++) {
      let sum = 0;
      for (let k = -half; k < length - half; k++) sum += values[index(Math.min(along - 1, Math.max(0, a + k)), b)];
      out[index(a, b)] = sum / length;
    }
  }
  return out;
}

/** A soft irregular stain (oil, water mark): a few overlapping Gaussian blobs, darker or lighter. */
export function paintStain(canvas, random, centerX, centerY, size) {
  canvas.drawn.push('stain');
  const depth = random.chance(0.75) ? -random.uniform(8, 30) : random.uniform(5, 15);
  const blobs = Array.from({ length: random.integer(2, 5) }, () => ({
    x: centerX + random.uniform(-0.6, 0.6) * size,
    y: centerY + random.uniform(-0.6, 0.6) * size,
    radius: size * random.uniform(0.3, 0.7),
  }));
  const reach = size * 2.5;
  for (let y = Math.max(0, Math.floor(centerY - reach)); y < Math.min(canvas.height, Math.ceil(centerY + reach)); y++) {
    for (let x = Math.max(0, Math.floor(centerX - reach)); x < Math.min(canvas.width, Math.ceil(centerX + reach)); x++) {
      let cover = 0;
      for (const blob of blobs) {
        const d2 = ((x + 0.5 - blob.x) ** 2 + (y + 0.5 - blob.y) ** 2) / (blob.radius * blob.radius);
        cover = Math.max(cover, Math.exp(-d2));
      }
      canvas.data[y * canvas.width + x] += depth * cover;
    }
  }
}

/**
 * A straight seam where two sheets meet, across the whole canvas along `axis`
 * at `position`: a dark gap with a bright lip on one side (light catching the edge).
 */
export function paintSeam(canvas, random, axis, position) {
  canvas.drawn.push('seam');
  const gap = random.uniform(1, 2.2);
  const lipSide = random.chance(0.5) ? 1 : -1;
  const long = axis === 'x' ? canvas.width : canvas.height;
  const line = (offset) => (axis === 'x' ? [[-2, position + offset], [long + 2, position + offset]] : [[position + offset, -2], [position + offset, long + 2]]);
  strokePaths(canvas, [line(lipSide * (gap / 2 + 1))], random.uniform(0.8, 1.5), 235, random.uniform(0.25, 0.5));
  strokePaths(canvas, [line(0)], gap, random.uniform(15, 45), random.uniform(0.6, 0.85));
}

/** A thin scratch: a gently bent polyline of three segments, bright or dark, faint. */
export function paintScratch(canvas, random, startX, startY, length) {
  canvas.drawn.push('scratch');
  let angle = random.uniform(0, 2 * Math.PI);
  const points = [[startX, startY]];
  for (let i = 0; i < 3; i++) {
    angle += random.uniform(-0.25, 0.25);
    const [x, y] = points[points.length - 1];
    points.push([x + (Math.cos(angle) * length) / 3, y + (Math.sin(angle) * length) / 3]);
  }
  const ink = random.chance(0.6) ? 230 : 30;
  strokePaths(canvas, [points], random.uniform(0.5, 1.3), ink, random.uniform(0.2, 0.5));
}

/** Slight optical blur of a whole panel; kept here so backgrounds and scenes share it. */
export function softenPanel(canvas, sigma) {
  gaussianBlur(canvas, sigma);
}
