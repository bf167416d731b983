import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { cropGrayImage, resizeGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { DEFAULTS, generateBackground, generateDemo, generatePositive, generateScene } from '../../scripts/demo/generate.js';

const COMMITTED = new URL('../../demo-patches/', import.meta.url).pathname;
const SMALL = { positives: 6, backgrounds: 2, scenes: 2 };
const folders: string[] = [];
function temporaryFolder(): string {
  const folder = mkdtempSync(join(tmpdir(), 'rectboost-demo-'));
  folders.push(folder);
  return folder;
}
afterAll(() => {
  for (const folder of folders) rmSync(folder, { recursive: true, force: true });
});

async function hashesOf(options: Parameters<typeof generateDemo>[0] & { out: string }): Promise<Map<string, string>> {
  const { files } = await generateDemo(options);
  return new Map(files.map((file) => [file, createHash('sha256').update(readFileSync(join(options.out, file))).digest('hex')]));
}

describe('demo generator', () => {
  it('writes byte-identical files when run twice with the same seed and counts', async () => {
    const first = await hashesOf({ ...SMALL, seed: 5, out: temporaryFolder() });
    const second = await hashesOf({ ...SMALL, seed: 5, out: temporaryFolder() });
    // 6 + 2 + 2 PNGs, truth.jsonl and README.md.
    expect(first.size).toBe(12);
    expect([...second]).toEqual([...first]);
    // The hashes do depend on the seed, so the equality above is not vacuous.
    const otherSeed = await hashesOf({ ...SMALL, seed: 6, out: temporaryFolder() });
    expect(otherSeed.get('positives/rivet-0001.png')).not.toBe(first.get('positives/rivet-0001.png'));
  });

  it('writes 24×24 positives and truth boxes that lie inside their scenes', async () => {
    const out = temporaryFolder();
    await generateDemo({ ...SMALL, seed: 5, out });
    for (let i = 1; i <= SMALL.positives; i++) {
      const patch = await decodeGrayImageFile(join(out, 'positives', `rivet-000${i}.png`));
      expect([patch.width, patch.height]).toEqual([24, 24]);
    }
    const lines = readFileSync(join(out, 'scenes', 'truth.jsonl'), 'utf8').trim().split('\n');
    expect(lines).toHaveLength(SMALL.scenes);
    for (const line of lines) {
      const { image, boxes } = JSON.parse(line) as { image: string; boxes: number[][] };
      const scene = await decodeGrayImageFile(join(out, 'scenes', image));
      expect(boxes.length).toBeGreaterThan(0);
      for (const [x, y, width, height] of boxes as Array<[number, number, number, number]>) {
        expect(x).toBeGreaterThanOrEqual(0);
        expect(y).toBeGreaterThanOrEqual(0);
        expect(x + width).toBeLessThanOrEqual(scene.width);
        expect(y + height).toBeLessThanOrEqual(scene.height);
        // Square window-equivalent boxes with sides in the promised 24–72 px range.
        expect(width).toBe(height);
        expect(width).toBeGreaterThanOrEqual(24);
        expect(width).toBeLessThanOrEqual(72);
      }
    }
  });

  it('draws exactly one rivet per positive, none on a background, and one per truth box in a scene', () => {
    for (let i = 1; i <= 20; i++) {
      expect(generatePositive(1, i).drawn.filter((kind) => kind === 'rivet')).toHaveLength(1);
    }
    const distractors = new Set<string>();
    for (let i = 1; i <= 6; i++) {
      const background = generateBackground(1, i);
      // By construction: every drawing function logs its kind, and only drawRivet logs 'rivet'.
      expect(background.drawn).not.toContain('rivet');
      for (const kind of background.drawn) distractors.add(kind);
    }
    // The hard distractors the scenario promises do appear on backgrounds.
    expect(distractors).toContain('screw-head');
    expect(distractors).toContain('stencil');
    for (let i = 1; i <= 3; i++) {
      const scene = generateScene(1, i);
      expect(scene.drawn.filter((kind) => kind === 'rivet')).toHaveLength(scene.boxes.length);
    }
  });

  it('gives a mean positive with a bright dome centre, a dark ring around it and panel at the border', () => {
    /*
     * Derivation (scripts/demo/rivet.js): a dome pixel is base + c·(max(0, n·L) − 0.3) + highlight·spec,
     * with c > 0. Averaged over the uniformly random light azimuth φ, n·L = nz·sin(e) + cos(e)·(nx cos φ + ny sin φ)
     * has mean nz·sin(e), and max(0, ·) only raises it. Within 3 px of the patch centre a pixel is at most
     * 3 + 1.5·√2 ≈ 5.1 px from the rivet centre, and the radius is at least 0.55·24/2 = 6.6 px, so
     * d ≤ 0.78, nz ≥ 0.63 and, with e ≥ 30°, the mean Lambert term is ≥ 0.31 > 0.3: the centre is
     * brighter than the panel level `base` on average, before the specular highlight adds more.
     * At the dome rim (d → 1, nz → 0) the mean Lambert term tends to E[max(0, cos e·cos φ)] = cos(e)/π ≤ 0.28 < 0.3,
     * and just outside lie the crevice (base − 0.7c) and the cast shadow (base − depth·c): the band at
     * 7.5–10.5 px from the centre, where rims of radius 6.6–9.6 px ± 1.5 px offset fall, is darker than panel.
     * The one-pixel border is mostly bare panel. Measured on these 400 patches (seed 1): centre 159.2,
     * band ≈ 118.5, border 128.1; the margins asserted (15 and 3 gray levels) sit well inside those gaps.
     */
    const count = 400;
    const mean = new Float64Array(24 * 24);
    for (let i = 1; i <= count; i++) {
      const { data } = generatePositive(1, i);
      for (let k = 0; k < mean.length; k++) mean[k]! += data[k]! / count;
    }
    const average = (keep: (distance: number, x: number, y: number) => boolean): number => {
      let sum = 0;
      let pixels = 0;
      for (let y = 0; y < 24; y++) {
        for (let x = 0; x < 24; x++) {
          if (keep(Math.hypot(x + 0.5 - 12, y + 0.5 - 12), x, y)) {
            sum += mean[y * 24 + x]!;
            pixels++;
          }
        }
      }
      return sum / pixels;
    };
    const centre = average((distance) => distance <= 3);
    const band = average((distance) => distance >= 7.5 && distance <= 10.5);
    const border = average((_, x, y) => x === 0 || y === 0 || x === 23 || y === 23);
    expect(centre - border).toBeGreaterThan(15);
    expect(border - band).toBeGreaterThan(3);
  });

  it('frames scene truth boxes like the positives: cropped to 24×24, the dark rim sits at the same radius', () => {
    /*
     * Positives draw head diameters of 55–80 % of the 24 px side (mean 67.5 %), scene rivets 62–73 % of the
     * box side (mean 67.5 %), so in both the rim, and the dark crevice and shadow just outside it, lie near
     * 0.675 · 24 / 2 ≈ 8.1 px from the centre. The darkest one-pixel ring of the mean image must therefore be
     * at the same radius (±1 px) for truth crops resized to 24×24 as for positives; a framing mistake
     * (say, boxes tight around the head) would move it outwards by several pixels.
     */
    const darkestRing = (images: GrayImage[]): number => {
      const sums = new Float64Array(12);
      const counts = new Float64Array(12);
      for (const image of images) {
        for (let y = 0; y < 24; y++) {
          for (let x = 0; x < 24; x++) {
            const ring = Math.floor(Math.hypot(x + 0.5 - 12, y + 0.5 - 12));
            if (ring < 12) {
              sums[ring]! += image.data[y * 24 + x]!;
              counts[ring]!++;
            }
          }
        }
      }
      const means = Array.from(sums, (sum, ring) => sum / counts[ring]!);
      // Search rings 3..11: the dome centre is bright, so the minimum is outside it.
      let darkest = 3;
      for (let ring = 4; ring < 12; ring++) if (means[ring]! < means[darkest]!) darkest = ring;
      return darkest;
    };
    const crops: GrayImage[] = [];
    for (let i = 1; i <= 4; i++) {
      const scene = generateScene(1, i);
      for (const [x, y, width, height] of scene.boxes) crops.push(resizeGrayImage(cropGrayImage(scene, x, y, width, height), 24, 24));
    }
    const positives = Array.from({ length: 200 }, (_, i) => generatePositive(1, i + 1));
    expect(crops.length).toBeGreaterThan(40);
    expect(Math.abs(darkestRing(crops) - darkestRing(positives))).toBeLessThanOrEqual(1);
    expect(darkestRing(positives)).toBeGreaterThanOrEqual(7);
    expect(darkestRing(positives)).toBeLessThanOrEqual(9);
  });

  it('reproduces the committed demo-patches/ pictures and truth from the default seed', async () => {
    // Item n has its own random stream, so the first items of the committed run can be redrawn alone.
    for (const index of [1, 2, 600]) {
      const expected = await decodeGrayImageFile(join(COMMITTED, 'positives', `rivet-${String(index).padStart(4, '0')}.png`));
      expect(Buffer.from(generatePositive(DEFAULTS.seed, index).data).equals(Buffer.from(expected.data))).toBe(true);
    }
    const background = await decodeGrayImageFile(join(COMMITTED, 'backgrounds', 'panel-01.png'));
    expect(Buffer.from(generateBackground(DEFAULTS.seed, 1).data).equals(Buffer.from(background.data))).toBe(true);
    const scene = generateScene(DEFAULTS.seed, 1);
    const committedScene = await decodeGrayImageFile(join(COMMITTED, 'scenes', 'p01.png'));
    expect(Buffer.from(scene.data).equals(Buffer.from(committedScene.data))).toBe(true);
    const firstTruth = JSON.parse(readFileSync(join(COMMITTED, 'scenes', 'truth.jsonl'), 'utf8').split('\n')[0]!) as { image: string; boxes: number[][] };
    expect(firstTruth).toEqual({ image: 'p01.png', boxes: scene.boxes });
  });
});
