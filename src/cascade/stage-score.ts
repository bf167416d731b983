import { compileFeatures, evaluateCompiledFeature } from '../features/compiled-features.js';
import type { WindowSamples } from '../features/window-samples.js';
import type { CascadeModel, Stage } from './cascade-model.js';

/**
 * Stage scores Σ outputs of one stage on every sample at scale 1 (training and
 * patch-level evaluation). Result[s] is the score of sample s.
 */
export function stageScores(stage: Stage, samples: WindowSamples): Float64Array {
  const compiled = compileFeatures(stage.weakClassifiers.map((weak) => weak.feature), samples.windowWidth + 1);
  const scores = new Float64Array(samples.count);
  for (let s = 0; s < samples.count; s++) {
    const base = s * samples.tableSize;
    const inverseDeviation = samples.inverseStandardDeviations[s]!;
    let score = 0;
    for (let w = 0; w < stage.weakClassifiers.length; w++) {
      const weak = stage.weakClassifiers[w]!;
      const value = evaluateCompiledFeature(compiled, w, samples.tables, base) * inverseDeviation;
      score += value < weak.splitValue ? weak.belowOutput : weak.aboveOutput;
    }
    scores[s] = score;
  }
  return scores;
}

/**
 * How far each sample gets through the cascade at scale 1: result[s] is the
 * number of stages sample s passed (cascade.stages.length means accepted).
 * Samples stop at the first stage they fail, as in detection.
 */
export function stagesPassed(cascade: Pick<CascadeModel, 'stages'>, samples: WindowSamples): Int32Array {
  const passed = new Int32Array(samples.count);
  const alive: boolean[] = new Array<boolean>(samples.count).fill(true);
  cascade.stages.forEach((stage) => {
    const scores = stageScores(stage, samples);
    for (let s = 0; s < samples.count; s++) {
      if (!alive[s]) continue;
      if (scores[s]! >= stage.threshold) passed[s]!++;
      else alive[s] = false;
    }
  });
  return passed;
}
