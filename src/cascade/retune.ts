import { thresholdForDetectionRate } from '../boost/stage-threshold.js';
import { checkNumber, checkThat } from '../check.js';
import type { WindowSamples } from '../features/window-samples.js';
import type { CascadeModel, Stage } from './cascade-model.js';
import { detectorCascadeFromModel } from '../detect/detector-cascade.js';
import { stageSampleScores } from '../detect/window-list.js';

/** New targets for retuneCascade; give either or both. */
export interface RetuneOptions {
  /** Detection rate each stage must keep on the positives that reach it, in (0, 1]. Omitted: thresholds stay. */
  readonly stageDetectionRate?: number;
  /** Added to the last stage's threshold after retuning (positive = stricter). Default 0. */
  readonly finalStageOffset?: number;
}

/** What retuning measured for one stage. */
export interface RetunedStage {
  readonly previousThreshold: number;
  readonly threshold: number;
  /** Positives that passed every earlier stage (with the new thresholds). */
  readonly positivesReaching: number;
  /** Share of those that pass this stage. */
  readonly detectionRate: number;
}

/** Result of retuneCascade: the new model and its per-stage and overall rates on the positives. */
export interface RetuneResult {
  readonly model: CascadeModel;
  readonly stages: readonly RetunedStage[];
  readonly overallDetectionRate: number;
}

/**
 * Resets every stage's threshold for a new detection target without touching
 * the weak classifiers (Viola & Jones 2004, training the cascade: stage thresholds trade
 * detection rate against false positives). Stages are retuned in order; stage k
 * sees only the positives that pass stages 0..k−1 with their new thresholds and
 * takes as threshold the ⌈rate · n⌉-th highest score among them, so that at least
 * that share passes (ties may let more pass). Then `finalStageOffset` is added
 * to the last stage. The input model is not modified; training provenance is kept.
 * @param positives window-sized positive samples (packWindowSamples), at least 1.
 * @throws RectboostError `invalid-option` when the rate is outside (0, 1], the
 *   offset is not finite, or the samples do not match the model window.
 * @example retuneCascade(model, packWindowSamples(windows, 24, 24), { stageDetectionRate: 0.99 })
 */
export function retuneCascade(model: CascadeModel, positives: WindowSamples, options: RetuneOptions): RetuneResult {
  const rate = options.stageDetectionRate === undefined ? undefined : checkNumber('stageDetectionRate', options.stageDetectionRate, Number.MIN_VALUE, 1);
  const offset = checkNumber('finalStageOffset', options.finalStageOffset ?? 0, -1e12, 1e12);
  checkThat(positives.count >= 1, 'Retuning needs at least one positive window.');
  checkThat(
    positives.windowWidth === model.window.width && positives.windowHeight === model.window.height,
    `Positive windows are ${positives.windowWidth}×${positives.windowHeight}; the model window is ${model.window.width}×${model.window.height}.`,
  );
  // Flat positives can pass no stage (as in detection), so they never reach one.
  let alive = Array.from({ length: positives.count }, (_, i) => i).filter((i) => positives.inverseStandardDeviations[i] !== 0);
  const report: RetunedStage[] = [];
  const detector = detectorCascadeFromModel(model);
  const stages: Stage[] = model.stages.map((stage, index) => {
    const scores = stageSampleScores(detector.stages[index]!, model.window.width, model.window.height, positives);
    let threshold = stage.threshold;
    if (rate !== undefined && alive.length > 0) {
      // The same rule training uses to set a stage threshold.
      threshold = thresholdForDetectionRate(alive.map((i) => scores[i]!), rate);
    }
    if (index === model.stages.length - 1) threshold += offset;
    const passing = alive.filter((i) => scores[i]! >= threshold);
    report.push({
      previousThreshold: stage.threshold,
      threshold,
      positivesReaching: alive.length,
      detectionRate: alive.length > 0 ? passing.length / alive.length : 0,
    });
    alive = passing;
    return { ...stage, threshold };
  });
  return { model: { ...model, stages }, stages: report, overallDetectionRate: alive.length / positives.count };
}

/**
 * Per-stage and overall false-positive rates on background windows from scan
 * counters (every background window is a negative): stage k's rate is the share
 * of non-flat windows reaching stage k that pass it; the overall rate is accepted
 * windows over all scanned windows.
 */
export function backgroundPassRates(statistics: ReadonlyArray<{ windowsScanned: number; flatWindows: number; rejectedAtStage: readonly number[]; accepted: number }>): {
  readonly windows: number;
  readonly stageFalsePositiveRates: readonly number[];
  readonly overallFalsePositiveRate: number;
} {
  let windows = 0;
  let reaching = 0;
  let accepted = 0;
  const stages = Math.max(0, ...statistics.map((s) => s.rejectedAtStage.length));
  const rejected = new Array<number>(stages).fill(0);
  for (const s of statistics) {
    windows += s.windowsScanned;
    reaching += s.windowsScanned - s.flatWindows;
    accepted += s.accepted;
    s.rejectedAtStage.forEach((count, k) => (rejected[k]! += count));
  }
  const stageFalsePositiveRates = rejected.map((count) => {
    const rateHere = reaching > 0 ? (reaching - count) / reaching : 0;
    reaching -= count;
    return rateHere;
  });
  return { windows, stageFalsePositiveRates, overallFalsePositiveRate: windows > 0 ? accepted / windows : 0 };
}
