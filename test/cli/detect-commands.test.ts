import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { createGrayImage, cropGrayImage } from '../../src/image/gray-image.js';
import { encodeGrayPng } from '../../src/io/encode-image.js';
import { runCli } from '../helpers/run-cli.js';
import { handBuiltCascade, noiseBackground, paintObject, syntheticScene } from '../helpers/synthetic-scene.js';

const folder = mkdtempSync(join(tmpdir(), 'rectboost-detect-'));
const scenes = join(folder, 'scenes');
const model = join(folder, 'model.json');
const truth = join(scenes, 'truth.jsonl');

function withoutTimes(stdout: string): unknown[] {
  return stdout.trim().split('\n').map((line) => {
    const { milliseconds: _ignored, ...rest } = JSON.parse(line) as Record<string, unknown>;
    return rest;
  });
}

beforeAll(async () => {
  mkdirSync(scenes, { recursive: true });
  writeFileSync(model, JSON.stringify(handBuiltCascade()));
  const { image, truth: boxes } = syntheticScene();
  writeFileSync(join(scenes, 'a-scene.png'), await encodeGrayPng(image));
  // Second scene: the first one's right part, so its truth is the boxes that lie inside it, shifted.
  writeFileSync(join(scenes, 'b-scene.png'), await encodeGrayPng(cropGrayImage(image, 50, 0, 150, 150)));
  writeFileSync(join(scenes, 'c-flat.png'), await encodeGrayPng(createGrayImage(60, 40, new Uint8Array(2400).fill(77))));
  writeFileSync(join(scenes, 'd-broken.png'), 'not a picture at all\n');
  const second = boxes.filter((b) => b[0] >= 50).map((b) => [b[0] - 50, b[1], b[2], b[3]]);
  writeFileSync(truth, `${JSON.stringify({ image: 'a-scene.png', boxes })}\n${JSON.stringify({ image: 'b-scene.png', boxes: second })}\n`);
  // Patches for patch-level evaluation and tune: objects with varied contrast, and noise.
  for (const kind of ['objects', 'noise']) mkdirSync(join(folder, kind));
  for (let k = 0; k < 12; k++) {
    const patch = noiseBackground(24, 24, `patch-${k}`);
    paintObject(patch, 0, 0, 24, 30 + 5 * k, 150 + 8 * k);
    writeFileSync(join(folder, 'objects', `o${k}.png`), await encodeGrayPng(patch));
    writeFileSync(join(folder, 'noise', `n${k}.png`), await encodeGrayPng(noiseBackground(24, 24, `noise-${k}`)));
  }
});

describe('rectboost detect', () => {
  it('skips the one unreadable image of a folder, names it, processes the others and exits 1', () => {
    const { status, stdout, stderr } = runCli(['detect', model, scenes, '--workers', '2']);
    expect(status).toBe(1);
    expect(stderr).toMatch(/d-broken\.png is not a readable PNG, JPEG, TIFF or WebP file/);
    expect(stderr).toMatch(/1 of 4 images could not be read and were skipped/);
    const lines = stdout.trim().split('\n').map((line) => JSON.parse(line) as { image: string; detections: unknown[] });
    expect(lines.map((l) => l.image.split('/').pop())).toEqual(['a-scene.png', 'b-scene.png', 'c-flat.png']);
    expect(lines[2]!.detections).toEqual([]); // flat image: nothing
    expect(lines[0]!.detections.length).toBeGreaterThanOrEqual(5); // five objects painted
  });

  it('gives identical detections with the exported runtime cascade as with the full model', () => {
    const exported = join(folder, 'runtime.json');
    expect(runCli(['export', model, '--out', exported]).status).toBe(0);
    const file = JSON.parse(readFileSync(exported, 'utf8')) as Record<string, unknown>;
    expect(file['format']).toBe('rectboost-runtime-cascade');
    expect(file).not.toHaveProperty('training');
    const image = join(scenes, 'a-scene.png');
    const full = runCli(['detect', model, image, '--merge', 'none', '--workers', '1']);
    const runtime = runCli(['detect', exported, image, '--merge', 'none', '--workers', '1']);
    expect(full.status).toBe(0);
    expect(withoutTimes(runtime.stdout)).toEqual(withoutTimes(full.stdout));
  });

  it('writes --out and annotated PNGs with --draw', async () => {
    const out = join(folder, 'detections.jsonl');
    const drawn = join(folder, 'drawn');
    const { status } = runCli(['detect', model, join(scenes, 'a-scene.png'), '--out', out, '--draw', drawn, '--workers', '0']);
    expect(status).toBe(0);
    expect(readFileSync(out, 'utf8').trim().split('\n')).toHaveLength(1);
    const meta = await sharp(join(drawn, 'a-scene.png')).metadata();
    expect([meta.width, meta.height, meta.channels]).toEqual([200, 150, 3]);
  });

  it('refuses a missing model, a model with a bad field, and a bad option value, each in one sentence', () => {
    const missing = runCli(['detect', join(folder, 'nope.json'), scenes]);
    expect(missing.status).toBe(1);
    expect(missing.stderr.trim()).toMatch(/^rectboost: Model .*nope\.json does not exist; check the path\.$/);
    const broken = join(folder, 'broken-model.json');
    const bad = handBuiltCascade() as unknown as { stages: Array<{ threshold: unknown }> };
    bad.stages[1]!.threshold = 'high';
    writeFileSync(broken, JSON.stringify(bad));
    const wrong = runCli(['detect', broken, scenes]);
    expect(wrong.status).toBe(1);
    expect(wrong.stderr).toMatch(/stages\[1\]\.threshold must be a finite number/);
    const option = runCli(['detect', model, scenes, '--merge', 'vote']);
    expect(option.status).toBe(2);
    expect(option.stderr.trim()).toBe('rectboost: --merge must be one of nms, mean, none; received "vote".');
  });

  it('refuses a runtime export whose rectangle leaves the window, naming the field', () => {
    const exported = join(folder, 'runtime-bad.json');
    runCli(['export', model, '--out', exported]);
    const file = JSON.parse(readFileSync(exported, 'utf8')) as { stages: Array<{ classifiers: Array<{ rectangles: number[][] }> }> };
    file.stages[0]!.classifiers[0]!.rectangles[0]![2] = 30;
    writeFileSync(exported, JSON.stringify(file));
    const { status, stderr } = runCli(['detect', exported, scenes]);
    expect(status).toBe(1);
    expect(stderr).toMatch(/stages\[0\]\.classifiers\[0\]\.rectangles\[0\]\[2\] \(width, inside the window\) must be an integer from 1 to 24; received 30/);
  });
});

describe('rectboost evaluate', () => {
  it('finds every annotated object (detection rate 100% at ≤ 100 false positives) and writes a JSON report', () => {
    // Every object is found with IoU ≥ 0.5 by the same cascade in test/detect/scan-image.test.ts.
    const report = join(folder, 'report.json');
    const { status, stdout } = runCli(['evaluate', model, '--truth', truth, '--json', report, '--workers', '1']);
    expect(status).toBe(0);
    expect(stdout).toMatch(/average precision/);
    const json = JSON.parse(readFileSync(report, 'utf8')) as { truthCount: number; detectionRateAtFalsePositives: Record<string, number>; speed: { windowsScanned: number } };
    expect(json.truthCount).toBe(5 + 3); // 5 objects in scene a, 3 of them with x ≥ 50 in scene b
    expect(json.detectionRateAtFalsePositives['100']).toBe(1);
    expect(json.speed.windowsScanned).toBeGreaterThan(0);
  });

  it('--errors writes every false alarm and missed object as a window-sized crop, and refuses a used folder', async () => {
    // Truth that leaves out the last two of the five painted objects (their detections become
    // false alarms) and adds a box on bare noise (a miss).
    const { truth: boxes } = syntheticScene();
    const partial = join(scenes, 'partial-truth.jsonl');
    writeFileSync(partial, `${JSON.stringify({ image: 'a-scene.png', boxes: [...boxes.slice(0, 3), [150, 2, 24, 24]] })}\n`);
    const errors = join(folder, 'errors');
    const report = join(folder, 'errors-report.json');
    const { status, stdout } = runCli(['evaluate', model, '--truth', partial, '--errors', errors, '--json', report, '--workers', '1']);
    expect(status).toBe(0);
    const json = JSON.parse(readFileSync(report, 'utf8')) as { truthCount: number; detectionCount: number; truePositives: number };
    const falseAlarms = readdirSync(join(errors, 'false-alarms')).sort();
    const missed = readdirSync(join(errors, 'missed'));
    // The counts follow from VOC matching, as the report states them.
    expect(falseAlarms).toHaveLength(json.detectionCount - json.truePositives);
    expect(missed).toHaveLength(json.truthCount - json.truePositives);
    expect(falseAlarms.length).toBeGreaterThanOrEqual(2);
    expect(missed).toEqual(['a-scene-x150-y2-w24.png']);
    expect(falseAlarms[0]).toMatch(/^0001-a-scene-x\d+-y\d+-w\d+\.png$/);
    expect(stdout).toMatch(new RegExp(`crops: ${falseAlarms.length} false alarms in .*false-alarms, 1 missed objects in .*missed`));
    for (const file of falseAlarms) {
      const meta = await sharp(join(errors, 'false-alarms', file)).metadata();
      expect([meta.width, meta.height]).toEqual([24, 24]); // the model window
    }
    const listed = readFileSync(join(errors, 'errors.jsonl'), 'utf8').trim().split('\n').map((line) => JSON.parse(line) as { kind: string });
    expect(listed.filter((entry) => entry.kind === 'false-alarm')).toHaveLength(falseAlarms.length);
    const again = runCli(['evaluate', model, '--truth', partial, '--errors', errors, '--workers', '1']);
    expect(again.status).toBe(2);
    expect(again.stderr).toMatch(/false-alarms already holds \d+ files; give --errors an empty or new folder/);
  });

  it('reads COCO-style truth too', () => {
    const coco = join(scenes, 'truth-coco.json');
    const { truth: boxes } = syntheticScene();
    writeFileSync(coco, JSON.stringify({ images: [{ id: 7, file_name: 'a-scene.png' }], annotations: boxes.map((bbox) => ({ image_id: 7, bbox })) }));
    const report = join(folder, 'coco-report.json');
    expect(runCli(['evaluate', model, '--truth', coco, '--json', report, '--workers', '0']).status).toBe(0);
    expect((JSON.parse(readFileSync(report, 'utf8')) as { truthCount: number }).truthCount).toBe(5);
  });

  it('names the file and line of an annotation with a negative size, and of a missing image', () => {
    const negative = join(scenes, 'negative.jsonl');
    writeFileSync(negative, `${JSON.stringify({ image: 'a-scene.png', boxes: [[1, 2, 3, 4]] })}\n${JSON.stringify({ image: 'a-scene.png', boxes: [[1, 2, -3, 4]] })}\n`);
    const a = runCli(['evaluate', model, '--truth', negative]);
    expect(a.status).toBe(1);
    expect(a.stderr.trim()).toMatch(/negative\.jsonl, line 2, box 1 has width -3 and height 4; both must be positive\.$/);
    const missing = join(scenes, 'missing.jsonl');
    writeFileSync(missing, `${JSON.stringify({ image: 'gone.png', boxes: [] })}\n`);
    const b = runCli(['evaluate', model, '--truth', missing]);
    expect(b.status).toBe(1);
    expect(b.stderr).toMatch(/line 1 of .*missing\.jsonl names image .*gone\.png, which does not exist/);
  });

  it('patch level: separates object patches from noise patches (ROC area 1, all objects detected)', () => {
    // Every object patch reads ≈ 400 on both features (see handBuiltCascade), noise ≈ ±20.
    const report = join(folder, 'patch-report.json');
    const { status, stdout } = runCli(['evaluate', model, '--positives', join(folder, 'objects'), '--negatives', join(folder, 'noise'), '--json', report]);
    expect(status, stdout).toBe(0);
    const json = JSON.parse(readFileSync(report, 'utf8')) as { detectionRate: number; falsePositiveRate: number; roc: { area: number } };
    expect(json.detectionRate).toBe(1);
    expect(json.falsePositiveRate).toBe(0);
    expect(json.roc.area).toBe(1);
  });
});

describe('rectboost tune, export, inspect', () => {
  it('tune writes a model whose detection rates it reports', () => {
    const tuned = join(folder, 'tuned.json');
    const { status, stdout, stderr } = runCli(['tune', model, '--positives', join(folder, 'objects'), '--backgrounds', join(folder, 'noise'), '--stage-detection', '0.5', '--out', tuned, '--workers', '1']);
    expect(status, stderr).toBe(0);
    expect(stdout).toMatch(/overall: detection/);
    const written = JSON.parse(readFileSync(tuned, 'utf8')) as { stages: Array<{ threshold: number }> };
    expect(written.stages).toHaveLength(3);
  });

  it('inspect prints one row per stage and draws a sheet of 3 stages × 5 features at zoom 8', async () => {
    const picture = join(folder, 'features.png');
    const { status, stdout } = runCli(['inspect', model, '--draw', picture]);
    expect(status).toBe(0);
    expect(stdout.split('\n').filter((line) => /^\s+\d+\s+\d+\s/.test(line))).toHaveLength(3);
    expect(existsSync(picture)).toBe(true);
    // Width 2 + 5 · (24·8 + 2) = 972; height 2 + 3 · (24·8 + 2) = 584 (drawFeatureSheet layout).
    const meta = await sharp(picture).metadata();
    expect([meta.width, meta.height]).toEqual([972, 584]);
  });
});
