import { describe, expect, it } from 'vitest';
import { isDecisionTree, type CascadeModel, type DecisionTree, type TreeSplit } from '../../src/cascade/cascade-model.js';
import { parseCascadeModel, serializeCascadeModel } from '../../src/cascade/model-json.js';
import { exportRuntimeCascade, runtimeCascadeFromValue } from '../../src/cascade/runtime-export.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { acceptSamples, cascadeDepths, stageSampleScores } from '../../src/detect/window-list.js';
import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { scanImagePlain } from '../../src/runtime/plain-scan.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { hitStrings, randomTreeCascadeModel, scanTwin } from '../helpers/scan-twin.js';
import { twinDepth, twinStageScore } from '../helpers/window-twin.js';

// Decision trees as weak classifiers: the scan kernel evaluates their full heap form with
// masks (every split for every lane); the twins walk the model's tree from the root. The
// two must agree bit for bit on decisions, margins and scores.

/** The next double above a finite value. */
function nextUp(value: number): number {
  if (value === 0) return Number.MIN_VALUE;
  const bits = new BigInt64Array(new Float64Array([value]).buffer);
  bits[0] = value > 0 ? bits[0]! + 1n : bits[0]! - 1n;
  return new Float64Array(bits.buffer)[0]!;
}

/** Window lists (kernel) against the window-by-window twin: decisions, margins, evidence and stage scores, bit for bit. */
function expectListAgreement(model: CascadeModel, windows: readonly GrayImage[]): void {
  const { width, height } = model.window;
  const samples = packWindowSamples(windows, width, height);
  const detector = detectorCascadeFromModel(model);
  const accepted = acceptSamples(detector, samples);
  const depths = cascadeDepths(detector, samples);
  windows.forEach((window, s) => {
    const twin = twinDepth(model, window);
    expect(accepted[s], `accept, sample ${s}`).toBe(twin.stagesPassed === model.stages.length ? 1 : 0);
    expect(depths.stagesPassed[s], `depth, sample ${s}`).toBe(twin.stagesPassed);
    expect(Object.is(depths.margins[s], twin.margin), `margin, sample ${s}`).toBe(true);
    expect(Object.is(depths.evidence[s], twin.evidence), `evidence, sample ${s}`).toBe(true);
  });
  model.stages.forEach((stage, k) => {
    const scores = stageSampleScores(detector.stages[k]!, width, height, samples);
    windows.forEach((window, s) => expect(Object.is(scores[s], twinStageScore(stage, window)), `stage ${k} score, sample ${s}`).toBe(true));
  });
  expect(accepted.some((a) => a === 1)).toBe(true);
  expect(accepted.some((a) => a === 0)).toBe(true);
}

describe('decision trees in the scan kernel agree with the twin', () => {
  for (const depth of [2, 3]) {
    it(`on window lists of random windows and flat windows, depth ${depth} trees (incomplete ones among them)`, () => {
      const model = randomTreeCascadeModel(`lists-${depth}`, [1, 2, 4, 5], depth);
      expect(model.stages.flat().some((stage) => stage.weakClassifiers.some(isDecisionTree))).toBe(true);
      const windows = Array.from({ length: 300 }, (_, i) => randomGrayImage(12, 10, `tree-list-${depth}-${i}`));
      windows.push(createGrayImage(12, 10), { width: 12, height: 10, data: new Uint8Array(120).fill(77) });
      expectListAgreement({ ...model, stages: model.stages.map((stage) => ({ ...stage, threshold: stage.threshold - 0.5 })) }, windows);
    });

    it(`on whole-image scans at several scales and shifts (hits, scores, counters), depth ${depth}`, () => {
      const model = randomTreeCascadeModel(`scan-${depth}`, [2, 3, 2], depth);
      const image = randomGrayImage(46, 38, `tree-scan-${depth}`);
      const integral = computeIntegralImage(image);
      for (const options of [{ scaleStep: 1.3, shift: 1 }, { scaleStep: 1.25, shift: 1.5 }]) {
        const { hits, statistics } = scanImage(detectorCascadeFromModel(model), integral, options);
        const twin = scanTwin(model, integral, options);
        expect(twin.hits.length).toBeGreaterThan(5);
        expect(twin.statistics.rejectedAtStage[0]).toBeGreaterThan(5);
        expect(hitStrings(hits)).toEqual(twin.hits.sort());
        expect(statistics.rejectedAtStage).toEqual(twin.statistics.rejectedAtStage);
        expect(statistics.featuresEvaluated).toBe(twin.statistics.featuresEvaluated);
        // The runtime's plain-JS scan walks only the path; it must still give the kernel's bits.
        const plain = scanImagePlain(detectorCascadeFromModel(model), integral, options);
        expect(plain.statistics).toEqual(statistics);
        expect(new Uint8Array(plain.hits.score.buffer)).toEqual(new Uint8Array(hits.score.buffer));
      }
    });
  }

  it('at exact ties on every split of a path: v equal to the split goes above, one ulp higher goes below', () => {
    const windows = Array.from({ length: 12 }, (_, i) => randomGrayImage(12, 10, `tree-tie-${i}`));
    const base = randomTreeCascadeModel('tree-ties', [1], 3);
    const tree = (base.stages[0]!.weakClassifiers[0] as DecisionTree).tree;
    for (const window of windows) {
      const integral = computeIntegralImage(window);
      const valueOf = (split: TreeSplit): number => evaluateNormalizedFeature(integral, split.feature, 0, 0, 12, 10);
      // Ties at the root, and at the root's below side when it is a split.
      const root = valueOf(tree);
      for (const rootSplit of [root, nextUp(root)]) {
        let below = tree.below;
        if ('feature' in below) {
          const value = valueOf(below);
          below = { ...below, splitValue: value };
        }
        const model: CascadeModel = { ...base, stages: [{ threshold: 0, weakClassifiers: [{ tree: { ...tree, splitValue: rootSplit, below } }] }] };
        expectTwinOnOne(model, window);
      }
    }
  });
});

/** One window through window lists and the twin (no both-outcomes requirement). */
function expectTwinOnOne(model: CascadeModel, window: GrayImage): void {
  const samples = packWindowSamples([window], 12, 10);
  const detector = detectorCascadeFromModel(model);
  const score = stageSampleScores(detector.stages[0]!, 12, 10, samples)[0]!;
  expect(Object.is(score, twinStageScore(model.stages[0]!, window))).toBe(true);
  expect(cascadeDepths(detector, samples).stagesPassed[0]).toBe(twinDepth(model, window).stagesPassed);
}

describe('tree models in files', () => {
  it('round-trip through the model JSON, and scan the same after loading', () => {
    const model = randomTreeCascadeModel('json', [3, 4], 3);
    const text = serializeCascadeModel(model);
    const loaded = parseCascadeModel(text, 'trees.json');
    expect(loaded).toEqual(model);
    expect(serializeCascadeModel(loaded)).toBe(text);
  });

  it('refuse a depth-1 tree (written as a stump), a tree deeper than 3, and a leaf root, naming the field', () => {
    const model = randomTreeCascadeModel('bad', [1], 2);
    const json = JSON.parse(serializeCascadeModel(model)) as { stages: Array<{ weakClassifiers: unknown[] }> };
    const feature = { kind: 'two-horizontal', x: 0, y: 0, cellWidth: 1, cellHeight: 1 };
    const leaf = { output: 0.5 };
    const split = (below: unknown, above: unknown): object => ({ feature, splitValue: 0, below, above });
    const cases: Array<[unknown, RegExp]> = [
      [{ tree: split(leaf, leaf) }, /stages\[0\]\.weakClassifiers\[0\]\.tree.*depth 1.*stump/],
      [{ tree: split(split(split(split(leaf, leaf), leaf), leaf), leaf) }, /tree\.below\.below\.below.*at most 3/],
      [{ tree: leaf }, /weakClassifiers\[0\]\.tree must be a split/],
      [{ tree: split({ output: 'x' }, leaf) }, /tree\.below\.output/],
    ];
    for (const [weak, message] of cases) {
      json.stages[0]!.weakClassifiers[0] = weak;
      expect(() => parseCascadeModel(JSON.stringify(json), 'bad.json')).toThrow(message);
    }
  });

  it('export to the runtime file, which loads back and scans with the kernel as the model does', () => {
    const model = randomTreeCascadeModel('runtime', [2, 3], 3);
    const file = JSON.parse(JSON.stringify(exportRuntimeCascade(model))) as unknown;
    const runtime = runtimeCascadeFromValue(file, 'trees.runtime.json');
    expect(runtime).toEqual(detectorCascadeFromModel(model));
    const integral = computeIntegralImage(randomGrayImage(40, 36, 'runtime-trees'));
    const fromModel = scanImage(detectorCascadeFromModel(model), integral, { scaleStep: 1.2 });
    const fromFile = scanImage(runtime, integral, { scaleStep: 1.2 });
    expect(fromModel.hits.count).toBeGreaterThan(0);
    expect(hitStrings(fromFile.hits)).toEqual(hitStrings(fromModel.hits));
  });
});
