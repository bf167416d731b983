// A floating-point gray canvas (0 = black, 255 = white) that remembers what was
// drawn on it: every drawing function appends its kind to `canvas.drawn`, so a test
// can check by construction that, say, no rivet was ever drawn on a background.

/** A new canvas filled with `level`. */
export function createCanvas(width, height, level = 0) {
  return { width, height, data: new Float32Array(width * height).fill(level), drawn: [] };
}

/** Mean value of the canvas over a rectangle clipped to the canvas. */
export function meanOver(canvas, x0, y0, x1, y1) {
  const left = Math.max(0, Math.floor(x0));
  const top = Math.max(0, Math.floor(y0));
  const right = Math.min(canvas.width, Math.ceil(x1));
  const bottom = Math.min(canvas.height, Math.ceil(y1));
  let sum = 0;
  let count = 0;
  for (let y = top; y < bottom; y++) {
    for (let x = left; x < right; x++) {
      sum += canvas.data[y * canvas.width + x];
      count++;
    }
  }
  return count === 0 ? 0 : sum / count;
}

/** Separable Gaussian blur in place; sigma in pixels, edges clamped. Sigma below 0.05 does nothing. */
export function gaussianBlur(canvas, sigma) {
  if (sigma < 0.05) return;
  const radius = Math.max(1, Math.ceil(3 * sigma));
  const kernel = new Float64Array(2 * radius + 1);
  let total = 0;
  for (let i = -radius; i <= radius; i++) {
    kernel[i + radius] = Math.exp(-(i * i) / (2 * sigma * sigma));
    total += kernel[i + radius];
  }
  for (let i = 0; i < kernel.length; i++) kernel[i] /= total;
  blurAlong(canvas, kernel, radius, 1, 0);
  blurAlong(canvas, kernel, radius, 0, 1);
}

/** One pass of a 1-D kernel along x (stepX = 1) or y (stepY = 1), clamping at the edges. */
function blurAlong(canvas, kernel, radius, stepX, stepY) {
  const { width, height, data } = canvas;
  const out = new Float32Array(data.length);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      let sum = 0;
      for (let k = -radius; k <= radius; k++) {
        const sx = Math.min(width - 1, Math.max(0, x + k * stepX));
        const sy = Math.min(height - 1, Math.max(0, y + k * stepY));
        sum += kernel[k + radius] * data[sy * width + sx];
      }
      out[y * width + x] = sum;
    }
  }
  data.set(out);
}

/** Adds Gaussian sensor noise of standard deviation `sigma` gray levels. */
export function addSensorNoise(canvas, random, sigma) {
  for (let i = 0; i < canvas.data.length; i++) canvas.data[i] += sigma * random.normal();
}

/** The canvas rounded and clamped to 8-bit gray, row-major. */
export function toBytes(canvas) {
  const out = new Uint8Array(canvas.data.length);
  for (let i = 0; i < out.length; i++) out[i] = Math.min(255, Math.max(0, Math.round(canvas.data[i])));
  return out;
}

/**
 * Strokes polylines (arrays of [x, y] points, pixel units, pixel (x, y) covering
 * [x, x+1) × [y, y+1)) with round ends, blending `ink` at `opacity`. Coverage comes
 * from the distance to the nearest segment, so crossings and joints are not inked twice.
 */
export function strokePaths(canvas, paths, lineWidth, ink, opacity) {
  const segments = [];
  let minX = Infinity;
  let minY = Infinity;
  let maxX = -Infinity;
  let maxY = -Infinity;
  for (const path of paths) {
    for (let i = 0; i + 1 < path.length; i++) segments.push([path[i], path[i + 1]]);
    for (const [x, y] of path) {
      minX = Math.min(minX, x);
      minY = Math.min(minY, y);
      maxX = Math.max(maxX, x);
      maxY = Math.max(maxY, y);
    }
  }
  const half = lineWidth / 2;
  const left = Math.max(0, Math.floor(minX - half - 1));
  const top = Math.max(0, Math.floor(minY - half - 1));
  const right = Math.min(canvas.width, Math.ceil(maxX + half + 1));
  const bottom = Math.min(canvas.height, Math.ceil(maxY + half + 1));
  for (let y = top; y < bottom; y++) {
    for (let x = left; x < right; x++) {
      const px = x + 0.5;
      const py = y + 0.5;
      let nearest = Infinity;
      for (const [[ax, ay], [bx, by]] of segments) nearest = Math.min(nearest, distanceToSegment(px, py, ax, ay, bx, by));
      const coverage = Math.min(1, Math.max(0, half + 0.5 - nearest));
      if (coverage > 0) {
        const i = y * canvas.width + x;
        canvas.data[i] += (ink - canvas.data[i]) * coverage * opacity;
      }
    }
  }
}

function distanceToSegment(px, py, ax, ay, bx, by) {
  const dx = bx - ax;
  const dy = by - ay;
  const lengthSquared = dx * dx + dy * dy;
  const t = lengthSquared === 0 ? 0 : Math.min(1, Math.max(0, ((px - ax) * dx + (py - ay) * dy) / lengthSquared));
  return Math.hypot(px - ax - t * dx, py - ay - t * dy);
}

/**
 * Replaces pixels in a box with the average of `shade(dx, dy, panelValue)` over a
 * 4 × 4 grid of sub-pixel samples, where (dx, dy) is the sample's offset from
 * (centerX, centerY). `shade` returns the new value, or null to keep the panel there.
 * Sub-sampling gives smooth (anti-aliased) edges at any size.
 */
export function shadeRegion(canvas, centerX, centerY, reach, shade) {
  const left = Math.max(0, Math.floor(centerX - reach));
  const top = Math.max(0, Math.floor(centerY - reach));
  const right = Math.min(canvas.width, Math.ceil(centerX + reach));
  const bottom = Math.min(canvas.height, Math.ceil(centerY + reach));
  const steps = 4;
  for (let y = top; y < bottom; y++) {
    for (let x = left; x < right; x++) {
      const i = y * canvas.width + x;
      const panel = canvas.data[i];
      let sum = 0;
      for (let sy = 0; sy < steps; sy++) {
        for (let sx = 0; sx < steps; sx++) {
          const value = shade(x + (sx + 0.5) / steps - centerX, y + (sy + 0.5) / steps - centerY, panel);
          sum += value === null ? panel : value;
        }
      }
      canvas.data[i] = sum / (steps * steps);
    }
  }
}
