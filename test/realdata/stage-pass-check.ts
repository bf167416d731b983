import { expect } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { twinStagesPassed } from '../helpers/window-twin.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import type { GrayImage } from '../../src/image/gray-image.js';
import { cascadeDepthScores, evaluatePatches } from '../../src/metrics/patch-evaluation.js';

/**
 * Peer-free sanity check of patch-level evaluation: two independent code paths must agree.
 * the window-by-window twin (test/helpers/window-twin.ts: each feature from its rectangles on
 * each window's own integral image) and `evaluatePatches` (the scan kernel over the packed
 * sample tables) share no evaluation code but the σ rule, so equal per-sample depths, per-stage
 * pass rates recounted from those depths, and the overall rates are evidence that both read the
 * model the same way.
 */
export function expectStagePassRatesMatchStagesPassed(model: Pick<CascadeModel, 'window' | 'stages'>, positives: readonly GrayImage[], negatives: readonly GrayImage[]): void {
  const { width, height } = model.window;
  const positiveSamples = packWindowSamples(positives, width, height);
  const negativeSamples = packWindowSamples(negatives, width, height);
  const detector = detectorCascadeFromModel(model);
  const positiveDepths = Int32Array.from(twinStagesPassed(model, positives));
  const negativeDepths = Int32Array.from(twinStagesPassed(model, negatives));
  expect(Array.from(cascadeDepthScores(detector, positiveSamples).stagesPassed)).toEqual(Array.from(positiveDepths));
  expect(Array.from(cascadeDepthScores(detector, negativeSamples).stagesPassed)).toEqual(Array.from(negativeDepths));

  const evaluation = evaluatePatches(detector, positiveSamples, negativeSamples);
  const reaching = (depths: Int32Array, k: number): number => depths.filter((depth) => depth >= k).length;
  const stageCount = model.stages.length;
  expect(evaluation.stages).toHaveLength(stageCount);
  evaluation.stages.forEach((stage, k) => {
    expect(stage.positivesReaching).toBe(reaching(positiveDepths, k));
    expect(stage.negativesReaching).toBe(reaching(negativeDepths, k));
    // Pass rate of stage k = samples past it / samples reaching it (0 when none reach it).
    const rate = (depths: Int32Array): number => (reaching(depths, k) > 0 ? reaching(depths, k + 1) / reaching(depths, k) : 0);
    expect(stage.positivePassRate).toBe(rate(positiveDepths));
    expect(stage.negativePassRate).toBe(rate(negativeDepths));
  });
  expect(evaluation.detectionRate).toBe(reaching(positiveDepths, stageCount) / positives.length);
  expect(evaluation.falsePositiveRate).toBe(reaching(negativeDepths, stageCount) / negatives.length);
}
