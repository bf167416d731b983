import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';

/**
 * Writes real broken inputs into `folder` and returns their paths:
 * a PNG cut in half, a text file named .png, a zero-byte file, and a valid
 * PNG that is larger than a small pixel limit (100×100 = 10,000 pixels).
 */
export async function writeBadImages(folder: string): Promise<{ truncated: string; text: string; empty: string; large: string; good: string }> {
  mkdirSync(folder, { recursive: true });
  const noise = Buffer.alloc(64 * 64);
  for (let i = 0; i < noise.length; i++) noise[i] = (i * 7919) % 251;
  const png = await sharp(noise, { raw: { width: 64, height: 64, channels: 1 } }).png({ compressionLevel: 0 }).toBuffer();
  const paths = {
    truncated: join(folder, 'truncated.png'),
    text: join(folder, 'notes.png'),
    empty: join(folder, 'empty.png'),
    large: join(folder, 'large.png'),
    good: join(folder, 'good.png'),
  };
  writeFileSync(paths.truncated, png.subarray(0, Math.floor(png.length / 2)));
  writeFileSync(paths.text, 'this is a text file, not a picture\n');
  writeFileSync(paths.empty, Buffer.alloc(0));
  writeFileSync(paths.large, await sharp(Buffer.alloc(100 * 100, 128), { raw: { width: 100, height: 100, channels: 1 } }).png().toBuffer());
  writeFileSync(paths.good, png);
  return paths;
}
