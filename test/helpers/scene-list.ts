import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { cropGrayImage } from '../../src/image/gray-image.js';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { encodeGrayPng } from '../../src/io/encode-image.js';

const SCENES = fileURLToPath(new URL('../../demo-patches/scenes/', import.meta.url));
/** The cascade the demo trains (see test/fixtures/demo-cascade.json). */
export const DEMO_CASCADE = fileURLToPath(new URL('../fixtures/demo-cascade.json', import.meta.url));

/**
 * Writes `count` small images into `folder` — 160×120 crops of the eight demo test
 * panels (480×360) on a 3×3 grid of offsets, cycling through panels and offsets —
 * and an image list naming them that also holds what real lists hold: an empty
 * line every 40 lines, every 25th image listed twice, and one file that is not an
 * image (line 7). Returns the list's path and its line count.
 */
export async function writeSceneList(folder: string, count: number): Promise<{ list: string; lines: string[]; broken: string }> {
  mkdirSync(folder, { recursive: true });
  const panels = await Promise.all(Array.from({ length: 8 }, (_, k) => decodeGrayImageFile(join(SCENES, `p0${k + 1}.png`))));
  const lines: string[] = [];
  const broken = join(folder, 'broken.png');
  writeFileSync(broken, 'not a picture\n');
  for (let k = 0; k < count; k++) {
    const panel = panels[k % 8]!;
    const cell = Math.floor(k / 8) % 9;
    const x = (cell % 3) * 160;
    const y = Math.floor(cell / 3) * 120;
    const path = join(folder, `crop-${String(k).padStart(4, '0')}.png`);
    writeFileSync(path, await encodeGrayPng(cropGrayImage(panel, x, y, 160, 120)));
    lines.push(path);
    if (k % 25 === 24) lines.push(path);
    if (lines.length % 40 === 39) lines.push('');
    if (lines.length === 6) lines.push(broken);
  }
  const list = join(folder, 'images.txt');
  writeFileSync(list, `${lines.join('\n')}\n`);
  return { list, lines, broken };
}
