import type { DetectorCascade } from '../detect/detector-cascade.js';
import { cascadeDepths } from '../detect/window-list.js';
import type { WindowSamples } from '../features/window-samples.js';
import { rocCurve, type RocCurve } from './roc-curve.js';

/**
 * How far each window-sized sample gets through a cascade, as one number that
 * orders samples by depth first and evidence second ("cascade depth score"):
 * a sample rejected after passing k stages, with margin m < 0 (Σ − threshold of
 * the stage it failed), scores k + m / (1 + |m|), in (k − 1, k); an accepted one
 * scores S + e / (1 + e) for a cascade of S stages, where e ≥ 0 is its detection
 * score (the sum of its stage margins, RawHits), in [S, S + 1). So "score ≥ S" is
 * exactly the cascade's own decision, accepted samples rank as detection ranks
 * them, and lower thresholds trade false positives for detections.
 * Flat samples pass no stage, as in detection, and score −1, below every other.
 * Margins come from the scan kernel (cascadeDepths), the bits detection computes.
 */
export function cascadeDepthScores(cascade: DetectorCascade, samples: WindowSamples): { scores: Float64Array; stagesPassed: Int32Array } {
  const { stagesPassed, margins, evidence } = cascadeDepths(cascade, samples);
  const stageCount = cascade.stages.length;
  const scores = new Float64Array(samples.count);
  for (let s = 0; s < samples.count; s++) {
    const margin = margins[s]!;
    const accepted = stagesPassed[s] === stageCount && margin !== -Infinity;
    const tail = accepted ? evidence[s]! : margin;
    scores[s] = margin === -Infinity ? -1 : stagesPassed[s]! + tail / (1 + Math.abs(tail));
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
