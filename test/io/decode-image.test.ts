import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { writeBadImages } from '../helpers/bad-images.js';

describe('image decoding', () => {
  const folder = mkdtempSync(join(tmpdir(), 'rectboost-decode-'));
  let bad: Awaited<ReturnType<typeof writeBadImages>>;
  beforeAll(async () => {
    bad = await writeBadImages(folder);
  });

  for (const format of ['png', 'jpeg', 'tiff', 'webp'] as const) {
    it(`reads ${format} as 8-bit gray with the right size`, async () => {
      const rgb = Buffer.alloc(30 * 20 * 3, 0);
      for (let i = 0; i < rgb.length; i += 3) rgb[i + 1] = 200; // pure green
      const path = join(folder, `green.${format}`);
      writeFileSync(path, await sharp(rgb, { raw: { width: 30, height: 20, channels: 3 } }).toFormat(format, { quality: 100 }).toBuffer());
      const image = await decodeGrayImageFile(path);
      expect([image.width, image.height, image.data.length]).toEqual([30, 20, 600]);
      // Luminance of pure green is well above half its level and below its level (Rec. 601/709 weights ~0.59/0.72).
      expect(image.data[300]).toBeGreaterThan(100);
      expect(image.data[300]).toBeLessThan(200);
    });
  }

  it('keeps gray pixel values exactly for a gray PNG', async () => {
    const image = await decodeGrayImageFile(bad.good);
    expect(image.data[5]).toBe((5 * 7919) % 251);
  });

  it('names the file when a PNG is truncated', async () => {
    await expect(decodeGrayImageFile(bad.truncated)).rejects.toThrow(/truncated\.png is (corrupt|not a readable)/);
  });

  it('names the file when a text file pretends to be a PNG', async () => {
    await expect(decodeGrayImageFile(bad.text)).rejects.toThrow(/notes\.png is not a readable PNG, JPEG, TIFF or WebP file/);
  });

  it('names the file when it is empty', async () => {
    await expect(decodeGrayImageFile(bad.empty)).rejects.toThrow(/empty\.png is an empty file/);
  });

  it('refuses an image above the pixel limit before decoding it', async () => {
    await expect(decodeGrayImageFile(bad.large, { maxPixels: 10_000 - 1 })).rejects.toThrow(/large\.png is 100×100 = 10000 pixels, above the limit of 9999/);
  });

  it('says when a file does not exist', async () => {
    await expect(decodeGrayImageFile(join(folder, 'missing.png'))).rejects.toThrow(/missing\.png does not exist/);
  });
});
