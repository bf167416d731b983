// The one object of the demo: a dome-headed rivet seen from above under a single
// directional light. The only file that draws rivets; it logs 'rivet' on the canvas.
import { meanOver, shadeRegion } from './canvas.js';

/**
 * Draws a dome rivet head of `radius` pixels centred at (centerX, centerY).
 * - light: { azimuth (radians, image x to the right, y down), elevation (radians above the panel) }.
 * - contrast: gray levels of the shading swing (positive).
 * - highlight: gray levels added at the peak of the specular spot.
 *
 * Shading, per sub-pixel sample at offset (dx, dy):
 * - on the dome (d = |(dx, dy)| / radius < 1) the surface normal of a hemisphere is
 *   n = (dx/r, dy/r, sqrt(1 − d²)); the value is base + contrast·(max(0, n·L) − 0.3)
 *   + highlight·max(0, n·H)^shininess (Lambert plus a Blinn–Phong spot, H halfway between
 *   L and the view straight down). At the centre n·L = sin(elevation) ≥ 0.5 for elevations
 *   of 30° or more, so the centre is always brighter than `base`, the local panel level.
 * - a dark crevice ring one pixel wide just outside the dome;
 * - a cast shadow on the side away from the light, where a point moved towards the
 *   light by the shadow length would land on the dome.
 */
export function drawRivet(canvas, centerX, centerY, radius, { light, contrast, highlight, shininess, shadowDepth }) {
  canvas.drawn.push('rivet');
  const base = meanOver(canvas, centerX - radius * 1.5, centerY - radius * 1.5, centerX + radius * 1.5, centerY + radius * 1.5);
  const lx = Math.cos(light.azimuth) * Math.cos(light.elevation);
  const ly = Math.sin(light.azimuth) * Math.cos(light.elevation);
  const lz = Math.sin(light.elevation);
  const halfLength = Math.hypot(lx, ly, lz + 1);
  const hx = lx / halfLength;
  const hy = ly / halfLength;
  const hz = (lz + 1) / halfLength;
  // A low dome casts a short shadow: its length grows as the light drops (cotangent of elevation).
  const shadowLength = radius * 0.3 / Math.tan(light.elevation);
  const towardLightX = Math.cos(light.azimuth);
  const towardLightY = Math.sin(light.azimuth);
  const crevice = 1 / radius;
  shadeRegion(canvas, centerX, centerY, radius + shadowLength + 2, (dx, dy) => {
    const d = Math.hypot(dx, dy) / radius;
    if (d < 1) {
      const nx = dx / radius;
      const ny = dy / radius;
      const nz = Math.sqrt(1 - d * d);
      const lambert = Math.max(0, nx * lx + ny * ly + nz * lz);
      const specular = Math.max(0, nx * hx + ny * hy + nz * hz) ** shininess;
      return base + contrast * (lambert - 0.3) + highlight * specular;
    }
    if (d < 1 + crevice) return base - contrast * 0.7;
    const sx = dx + towardLightX * shadowLength;
    const sy = dy + towardLightY * shadowLength;
    if (Math.hypot(sx, sy) < radius) return base - contrast * shadowDepth;
    return null;
  });
}

/** Random rivet appearance: light from any side, 30–65° up, varied contrast and shine. */
export function randomRivetLook(random) {
  return {
    light: { azimuth: random.uniform(0, 2 * Math.PI), elevation: random.uniform(Math.PI / 6, (65 * Math.PI) / 180) },
    contrast: random.uniform(35, 90),
    highlight: random.uniform(15, 70),
    shininess: random.uniform(12, 50),
    shadowDepth: random.uniform(0.35, 0.75),
  };
}

/** A rivet look near `look`: same light within ±15°, contrast and shine within ±15 %. */
export function jitterRivetLook(look, random) {
  return {
    light: {
      azimuth: look.light.azimuth + random.uniform(-0.26, 0.26),
      elevation: Math.min((65 * Math.PI) / 180, Math.max(Math.PI / 6, look.light.elevation + random.uniform(-0.1, 0.1))),
    },
    contrast: look.contrast * random.uniform(0.85, 1.15),
    highlight: look.highlight * random.uniform(0.85, 1.15),
    shininess: look.shininess * random.uniform(0.85, 1.15),
    shadowDepth: look.shadowDepth,
  };
}
