import { describe, expect, it } from 'vitest';
import { loadPositiveWindows } from '../../src/data/positives.js';
import { cropGrayImage, resizeGrayImage } from '../../src/image/gray-image.js';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';

const TRUTH = new URL('../../demo-patches/scenes/truth.jsonl', import.meta.url).pathname;

describe('positives from an annotation file', () => {
  it('crops every box of the shipped demo truth file and resizes it to the window', async () => {
    const loaded = await loadPositiveWindows(TRUTH, { windowWidth: 24, windowHeight: 24, mirror: false, skipBad: false });
    // demo-patches/README.md: the 8 scenes hold 141 rivets, one box each.
    expect(loaded.sourceCount).toBe(141);
    expect(loaded.windows.every((w) => w.width === 24 && w.height === 24)).toBe(true);
    // Twin: the first box of the first line, cropped and resized by hand.
    const first = JSON.parse((await import('node:fs')).readFileSync(TRUTH, 'utf8').split('\n')[0]!) as { image: string; boxes: number[][] };
    const image = await decodeGrayImageFile(new URL(`../../demo-patches/scenes/${first.image}`, import.meta.url).pathname);
    const [x, y, w, h] = first.boxes[0]!;
    const expected = resizeGrayImage(cropGrayImage(image, Math.round(x!), Math.round(y!), Math.round(x! + w!) - Math.round(x!), Math.round(y! + h!) - Math.round(y!)), 24, 24);
    expect(Array.from(loaded.windows[0]!.data)).toEqual(Array.from(expected.data));
  });

  it('adds mirrored copies after the originals with --mirror', async () => {
    const loaded = await loadPositiveWindows(TRUTH, { windowWidth: 24, windowHeight: 24, mirror: true, skipBad: false });
    expect(loaded.windows).toHaveLength(282);
    expect(loaded.windows[141]!.data[0]).toBe(loaded.windows[0]!.data[23]);
  });

  it('refuses a file that is neither a folder nor an annotation file', async () => {
    await expect(loadPositiveWindows(new URL('../../package.json', import.meta.url).pathname, { windowWidth: 24, windowHeight: 24, mirror: false, skipBad: false })).rejects.toThrow(
      /annotation file|has no boxes|cannot|line|entry/,
    );
  });
});
