import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import seedrandom from 'seedrandom';
import sharp from 'sharp';
import type { GrayImage } from '../../src/image/gray-image.js';

/**
 * Invented test data (not reference data): a bright blob with a dark ring on a
 * mid-gray patch as the object, and textured images of stripes and noise as
 * backgrounds. Seeded, so every run makes the same files.
 */
export function syntheticObject(size: number, random: () => number): GrayImage {
  const data = new Uint8Array(size * size);
  const cx = size / 2 + (random() - 0.5) * 1.5;
  const cy = size / 2 + (random() - 0.5) * 1.5;
  const radius = size * (0.24 + random() * 0.12);
  const contrast = 25 + random() * 70;
  const base = 70 + random() * 80;
  for (let y = 0; y < size; y++) {
    for (let x = 0; x < size; x++) {
      const d = Math.hypot(x + 0.5 - cx, y + 0.5 - cy) / radius;
      const shape = d < 1 ? 1 - d * d : d < 1.5 ? -0.6 : 0;
      const value = base + contrast * shape + (random() - 0.5) * 50;
      data[y * size + x] = Math.max(0, Math.min(255, Math.round(value)));
    }
  }
  return { width: size, height: size, data };
}

export function syntheticBackground(width: number, height: number, random: () => number): GrayImage {
  const data = new Uint8Array(width * height);
  const stripes = 4 + random() * 12;
  const angle = random() * Math.PI;
  const gradient = random() * 80;
  // Plain bright spots (no dark ring) as hard look-alikes.
  const spots = Array.from({ length: 6 }, () => ({ x: random() * width, y: random() * height, r: 2 + random() * 8, level: 40 + random() * 60 }));
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const along = x * Math.cos(angle) + y * Math.sin(angle);
      let value = 90 + gradient * (x / width) + 35 * Math.sin(along / stripes) + (random() - 0.5) * 60;
      for (const spot of spots) if (Math.hypot(x - spot.x, y - spot.y) < spot.r) value += spot.level;
      data[y * width + x] = Math.max(0, Math.min(255, Math.round(value)));
    }
  }
  return { width, height, data };
}

async function writePng(path: string, image: GrayImage): Promise<void> {
  writeFileSync(path, await sharp(Buffer.from(image.data), { raw: { width: image.width, height: image.height, channels: 1 } }).png().toBuffer());
}

/** Writes `positives/` and `backgrounds/` folders under `root`; returns their paths. */
export async function writeSyntheticTrainingData(
  root: string,
  options: { positives: number; backgrounds: number; size: number; backgroundWidth: number; backgroundHeight: number; seed: string },
): Promise<{ positives: string; backgrounds: string }> {
  const random = seedrandom(options.seed);
  const positives = join(root, 'positives');
  const backgrounds = join(root, 'backgrounds');
  mkdirSync(positives, { recursive: true });
  mkdirSync(backgrounds, { recursive: true });
  for (let i = 0; i < options.positives; i++) {
    await writePng(join(positives, `p${String(i).padStart(4, '0')}.png`), syntheticObject(options.size, random));
  }
  for (let i = 0; i < options.backgrounds; i++) {
    await writePng(join(backgrounds, `b${String(i).padStart(3, '0')}.png`), syntheticBackground(options.backgroundWidth, options.backgroundHeight, random));
  }
  return { positives, backgrounds };
}
