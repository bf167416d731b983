import type { DetectorCascade } from '../detect/detector-cascade.js';
import type { WindowSamples } from '../features/window-samples.js';
import { rocCurve, type RocCurve } from './roc-curve.js';

/**
 * How far each window-sized sample gets through a cascade, as one number that
 * orders samples by depth first and margin second ("cascade depth score"):
 * a sample that passed k stages and stopped with margin m (Σ − threshold of the
 * stage it failed, or of the last stage when it passed all) scores
 * k + m / (1 + |m|). Rejected samples score in (k − 1, k); accepted ones in
 * [S, S + 1) for a cascade of S stages, so "score ≥ S" is exactly the cascade's
 * own decision and lower thresholds trade false positives for detections.
 * Flat samples (σ = 0) read every feature as 0, as in training.
 */
export function cascadeDepthScores(cascade: DetectorCascade, samples: WindowSamples): { scores: Float64Array; stagesPassed: Int32Array } {
  const stride = samples.windowWidth + 1;
  const scores = new Float64Array(samples.count);
  const stagesPassed = new Int32Array(samples.count);
  for (let s = 0; s < samples.count; s++) {
    const base = s * samples.tableSize;
    const table = samples.tables;
    const inverseDeviation = samples.inverseStandardDeviations[s]!;
    let passed = 0;
    let margin = 0;
    for (const stage of cascade.stages) {
      let sum = 0;
      for (const weak of stage.weakClassifiers) {
        let value = 0;
        for (const r of weak.rectangles) {
          const top = base + r.y * stride;
          const bottom = base + (r.y + r.height) * stride;
          value += r.weight * (table[bottom + r.x + r.width]! - table[bottom + r.x]! - table[top + r.x + r.width]! + table[top + r.x]!);
        }
        sum += value * inverseDeviation < weak.splitValue ? weak.belowOutput : weak.aboveOutput;
      }
      margin = sum - stage.threshold;
      if (margin < 0) break;
      passed++;
    }
    stagesPassed[s] = passed;
    scores[s] = passed + margin / (1 + Math.abs(margin));
  }
  return { scores, stagesPassed };
}

/** Per-stage pass rates of positives and negatives among the samples that reach the stage. */
export interface StagePassRates {
  readonly stage: number;
  readonly positivesReaching: number;
  readonly positivePassRate: number;
  readonly negativesReaching: number;
  readonly negativePassRate: number;
}

/** Patch-level evaluation: ROC over the cascade depth score, per-stage pass rates, and the cascade's own operating point. */
export interface PatchEvaluation {
  readonly roc: RocCurve;
  readonly stages: readonly StagePassRates[];
  readonly detectionRate: number;
  readonly falsePositiveRate: number;
}

/**
 * Evaluates a cascade on labelled window-sized patches (Viola & Jones 2004:
 * detection and false-positive rates per stage and overall).
 * @example evaluatePatches(cascade, packWindowSamples(faces, 24, 24), packWindowSamples(others, 24, 24))
 */
export function evaluatePatches(cascade: DetectorCascade, positives: WindowSamples, negatives: WindowSamples): PatchEvaluation {
  const positive = cascadeDepthScores(cascade, positives);
  const negative = cascadeDepthScores(cascade, negatives);
  const stageCount = cascade.stages.length;
  const reaching = (passed: Int32Array, k: number): number => passed.reduce((n, p) => n + (p >= k ? 1 : 0), 0);
  const stages: StagePassRates[] = cascade.stages.map((_, k) => {
    const positivesReaching = reaching(positive.stagesPassed, k);
    const negativesReaching = reaching(negative.stagesPassed, k);
    return {
      stage: k,
      positivesReaching,
      positivePassRate: positivesReaching > 0 ? reaching(positive.stagesPassed, k + 1) / positivesReaching : 0,
      negativesReaching,
      negativePassRate: negativesReaching > 0 ? reaching(negative.stagesPassed, k + 1) / negativesReaching : 0,
    };
  });
  return {
    roc: rocCurve(positive.scores, negative.scores),
    stages,
    detectionRate: positives.count > 0 ? reaching(positive.stagesPassed, stageCount) / positives.count : 0,
    falsePositiveRate: negatives.count > 0 ? reaching(negative.stagesPassed, stageCount) / negatives.count : 0,
  };
}
