import { weakClassifierSplits } from '../../src/model/cascade-model.js';
import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { exportRuntimeCascade, parseRuntimeCascade } from '../../src/cascade/runtime-export.js';
import { cascadeUsesTiltedFeatures, detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { acceptSamples, cascadeDepths, stageSampleScores } from '../../src/detect/window-list.js';
import { EXTENDED_ONLY_FEATURE_KINDS } from '../../src/features/feature-kind.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { scanImagePlain } from '../../src/runtime/plain-scan.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { hitStrings, randomCascadeModel, scanTwin } from '../helpers/scan-twin.js';
import { twinDepth, twinStageScore } from '../helpers/window-twin.js';

// Extended cascades (tilted and centre-surround features) through every evaluator:
// the scan kernel over images and over window lists, and the plain-JS runtime scan,
// each against the window-by-window twins of test/helpers, bit for bit.

/** A random extended cascade whose weak classifiers include every added kind. */
function extendedModel(seed: string, stageSizes: number[]): CascadeModel {
  const model = randomCascadeModel(seed, stageSizes, { width: 12, height: 10 }, 'extended');
  const kinds = new Set(model.stages.flatMap((stage) => stage.weakClassifiers.map((weak) => weakClassifierSplits(weak)[0]!.feature.kind)));
  expect(EXTENDED_ONLY_FEATURE_KINDS.filter((kind) => kinds.has(kind)).length).toBeGreaterThanOrEqual(3);
  return model;
}

describe('extended cascades in the scan kernel', () => {
  for (const stageSizes of [[1, 3, 2], [2, 4], [6]]) {
    it(`stages of ${stageSizes.join(', ')}: the same hits and scores as the brute-force twin at every scale`, () => {
      const model = extendedModel(`extended-${stageSizes.join('-')}`, stageSizes);
      const integral = computeIntegralImage(randomGrayImage(47, 39, `extended-image-${stageSizes.join('-')}`), { rotated: true });
      const options = { scaleStep: 1.21, shift: 1 };
      const detector = detectorCascadeFromModel(model);
      expect(cascadeUsesTiltedFeatures(detector)).toBe(true);
      const { hits, statistics } = scanImage(detector, integral, options);
      const twin = scanTwin(model, integral, options);
      expect(twin.hits.length).toBeGreaterThan(10);
      expect(twin.statistics.rejectedAtStage[0]).toBeGreaterThan(10);
      expect(hitStrings(hits)).toEqual(twin.hits.sort());
      expect(statistics.rejectedAtStage).toEqual(twin.statistics.rejectedAtStage);
      expect(statistics.featuresEvaluated).toBe(twin.statistics.featuresEvaluated);
    });
  }

  it('window lists (acceptance, depths, stage scores) give the twin’s bits on sample tables with rotated parts', () => {
    const model = extendedModel('extended-lists', [2, 3]);
    const windows = Array.from({ length: 60 }, (_, i) => randomGrayImage(12, 10, `extended-window-${i}`));
    const samples = packWindowSamples(windows, 12, 10, undefined, { rotated: true });
    const detector = detectorCascadeFromModel(model);
    const accepted = acceptSamples(detector, samples);
    const depths = cascadeDepths(detector, samples);
    windows.forEach((window, s) => {
      const twin = twinDepth(model, window);
      expect(accepted[s]).toBe(twin.stagesPassed === 2 ? 1 : 0);
      expect(depths.stagesPassed[s]).toBe(twin.stagesPassed);
      expect(Object.is(depths.margins[s], twin.margin)).toBe(true);
      expect(Object.is(depths.evidence[s], twin.evidence)).toBe(true);
    });
    const scores = stageSampleScores(detector.stages[1]!, 12, 10, samples);
    windows.forEach((window, s) => expect(Object.is(scores[s], twinStageScore(model.stages[1]!, window))).toBe(true));
    expect(accepted.some((a) => a === 1) && accepted.some((a) => a === 0)).toBe(true);
  });

  it('refuses an extended cascade on tables built without the rotated part, saying how to build them', () => {
    const detector = detectorCascadeFromModel(extendedModel('extended-refuse', [4, 4]));
    expect(() => scanImage(detector, computeIntegralImage(randomGrayImage(30, 30, 'refuse')))).toThrow(/rotated/);
    expect(() => acceptSamples(detector, packWindowSamples([randomGrayImage(12, 10, 'refuse-window')], 12, 10))).toThrow(/rotated/);
  });

  it('the plain-JS runtime scan gives the kernel’s hits, scores (bit patterns) and counters', () => {
    const detector = detectorCascadeFromModel(extendedModel('extended-plain', [2, 3, 2]));
    const integral = computeIntegralImage(randomGrayImage(53, 41, 'extended-plain-image'), { rotated: true });
    for (const options of [{ scaleStep: 1.25, shift: 1 }, { scaleStep: 1.4, shift: 1.5 }]) {
      const kernel = scanImage(detector, integral, options);
      const plain = scanImagePlain(detector, integral, options);
      expect(kernel.hits.count).toBeGreaterThan(5);
      expect(plain.statistics).toEqual(kernel.statistics);
      for (const field of ['x', 'y', 'width', 'height'] as const) expect(plain.hits[field]).toEqual(kernel.hits[field]);
      expect(new Uint8Array(plain.hits.score.buffer)).toEqual(new Uint8Array(kernel.hits.score.buffer));
    }
  });

  it('the runtime file carries tilted rectangles as [x, y, width, height, weight, 1] and scans the same', () => {
    const model = extendedModel('extended-runtime', [3, 2]);
    const file = exportRuntimeCascade(model);
    const rectangles = file.stages.flatMap((stage) => stage.classifiers.flatMap((weak) => ('rectangles' in weak ? weak.rectangles : weak.splits.flatMap((split) => split.rectangles))));
    expect(rectangles.some((r) => r.length === 6 && r[5] === 1)).toBe(true);
    // Ajv (JSON Schema draft 2020-12) as the outside check that the file matches the published schema.
    const schema = JSON.parse(readFileSync(new URL('../../schema/runtime-cascade.schema.json', import.meta.url), 'utf8')) as object;
    expect(new Ajv2020({ allErrors: true }).compile(schema)(JSON.parse(JSON.stringify(file)))).toBe(true);
    const parsed = parseRuntimeCascade(JSON.stringify(file), 'extended.json');
    expect(parsed).toEqual(detectorCascadeFromModel(model));
    const integral = computeIntegralImage(randomGrayImage(40, 40, 'extended-runtime-image'), { rotated: true });
    expect(hitStrings(scanImage(parsed, integral).hits)).toEqual(hitStrings(scanImage(detectorCascadeFromModel(model), integral).hits));
  });

  it('refuses a runtime file whose tilted rectangle leaves the window', () => {
    const file = exportRuntimeCascade(randomCascadeModel('runtime-outside', [1]));
    const bad = { ...file, stages: [{ threshold: 0, classifiers: [{ rectangles: [[2, 0, 3, 3, 1, 1]], split: 0, below: -1, above: 1 }] }] };
    expect(() => parseRuntimeCascade(JSON.stringify(bad), 'bad.json')).toThrow(/rectangles\[0\]\[3\]/);
  });

});
