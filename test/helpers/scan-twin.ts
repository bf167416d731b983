import seedrandom from 'seedrandom';
import { weakClassifierDepth, weakClassifierFromTree, type CascadeModel, type DecisionStump, type Stage, type TreeBranch, type TreeSplit, type WeakClassifier } from '../../src/cascade/cascade-model.js';
import type { HaarFeature } from '../../src/features/haar-feature.js';
import { resolveScanOptions, scanScales, type ScanOptions, type RawHits, type ScanStatistics } from '../../src/detect/scan-image.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { FEATURE_SET_KINDS, type FeatureSetName } from '../../src/features/feature-kind.js';
import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import type { IntegralImage } from '../../src/image/integral-image.js';
import { windowStatistics } from '../../src/image/window-statistics.js';
import { twinWeakOutput } from './window-twin.js';

/** What the twin found: hits as "x,y,width,height,score" strings (score: the evidence, see RawHits) and the scan's counters. */
export interface TwinScan {
  readonly hits: string[];
  readonly statistics: Omit<ScanStatistics, 'scales'>;
}

/**
 * The scan done the slow, obvious way: every window of every scale on its own,
 * σ from windowStatistics (flat windows skipped), every feature through the
 * training side's evaluateNormalizedFeature, outputs summed from 0 in order,
 * and the window leaving at the first stage whose sum is below the threshold.
 * Its scores (the sums of its stage margins) equal the scan's bit for bit
 * whenever the decisions agree.
 */
export function scanTwin(model: CascadeModel, integral: IntegralImage, options: ScanOptions = {}): TwinScan {
  const { width: windowWidth, height: windowHeight } = model.window;
  const { shift } = resolveScanOptions(options);
  const hits: string[] = [];
  const statistics = { windowsScanned: 0, flatWindows: 0, featuresEvaluated: 0, rejectedAtStage: model.stages.map(() => 0), accepted: 0 };
  for (const scale of scanScales({ windowWidth, windowHeight }, integral.width, integral.height, options)) {
    const width = Math.round(windowWidth * scale);
    const height = Math.round(windowHeight * scale);
    const step = Math.max(1, Math.round(shift * scale));
    for (let y = 0; y + height <= integral.height; y += step) {
      for (let x = 0; x + width <= integral.width; x += step) {
        statistics.windowsScanned++;
        if (windowStatistics(integral, x, y, width, height).standardDeviation === 0) {
          statistics.flatWindows++;
          continue;
        }
        let evidence = 0;
        const failedAt = model.stages.findIndex((stage, k) => {
          let score = 0;
          for (const weak of stage.weakClassifiers) {
            score += twinWeakOutput(weak, (feature) => evaluateNormalizedFeature(integral, feature, x, y, windowWidth, windowHeight, scale));
            // The scan counts split records: one per stump, 2^d − 1 per tree of depth d (its full heap form).
            statistics.featuresEvaluated += 2 ** weakClassifierDepth(weak) - 1;
          }
          const margin = score - stage.threshold;
          // Evidence: the margins of the stages passed, added in stage order (RawHits).
          evidence = k === 0 ? margin : evidence + margin;
          return score < stage.threshold;
        });
        if (failedAt >= 0) {
          statistics.rejectedAtStage[failedAt]!++;
        } else {
          statistics.accepted++;
          hits.push(`${x},${y},${width},${height},${evidence}`);
        }
      }
    }
  }
  return { hits, statistics };
}

/** Raw hits in the twin's string form, sorted. */
export function hitStrings(hits: RawHits): string[] {
  return Array.from({ length: hits.count }, (_, i) => `${hits.x[i]},${hits.y[i]},${hits.width[i]},${hits.height[i]},${hits.score[i]}`).sort();
}

/**
 * A cascade of random features of a feature set (default basic) on a 12×10 window (by default), seeded:
 * stage k has stageSizes[k] classifiers with splits in [−0.5, 0.5), below outputs
 * in (−1, 0], above outputs in [0, 1); a lone classifier gets threshold 0 (the only
 * one at which it can reject), larger stages a threshold in (−0.3, 0].
 */
export function randomCascadeModel(seed: string, stageSizes: number[], window = { width: 12, height: 10 }, featureSet: FeatureSetName = 'basic'): CascadeModel & { readonly stages: ReadonlyArray<Stage & { readonly weakClassifiers: readonly DecisionStump[] }> } {
  const random = seedrandom(seed);
  // Basic: uniform over all features. Extended: a uniform kind first, so the six added
  // kinds are not drowned by the many upright features.
  const kinds = FEATURE_SET_KINDS[featureSet];
  const byKind = kinds.map((kind) => enumerateFeatures(window.width, window.height, [kind]));
  const all = byKind.flat();
  const pick = () => {
    if (featureSet === 'basic') return all[Math.floor(random() * all.length)]!;
    const ofKind = byKind[Math.floor(random() * kinds.length)]!;
    return ofKind[Math.floor(random() * ofKind.length)]!;
  };
  return {
    format: 'rectboost-cascade', version: 1, window, normalization: 'window-standard-deviation', featureSet,
    stages: stageSizes.map((size) => ({
      threshold: size === 1 ? 0 : -0.3 * random(),
      weakClassifiers: Array.from({ length: size }, () => ({
        feature: pick(), splitValue: random() - 0.5, belowOutput: -random(), aboveOutput: random(),
      })),
    })),
  };
}

/**
 * A cascade of random decision trees (and stumps) on a 12×10 window, seeded: weak
 * classifier i of stage k is a tree of depth up to `depth` (every third one a stump);
 * below the root a node ends early with probability ¼, so incomplete trees occur; splits
 * in [−0.5, 0.5), leaf outputs in [−1, 1); thresholds as in randomCascadeModel.
 */
export function randomTreeCascadeModel(seed: string, stageSizes: number[], depth: number, window = { width: 12, height: 10 }): CascadeModel {
  const random = seedrandom(seed);
  const features = enumerateFeatures(window.width, window.height);
  const feature = (): HaarFeature => features[Math.floor(random() * features.length)]!;
  const branch = (level: number): TreeBranch => {
    if (level > depth || (level > 1 && random() < 0.25)) return { output: 2 * random() - 1 };
    return { feature: feature(), splitValue: random() - 0.5, below: branch(level + 1), above: branch(level + 1) };
  };
  return {
    format: 'rectboost-cascade', version: 1, window, normalization: 'window-standard-deviation', featureSet: 'basic',
    stages: stageSizes.map((size) => ({
      threshold: size === 1 ? 0 : -0.3 * random(),
      weakClassifiers: Array.from({ length: size }, (_, i): WeakClassifier => (i % 3 === 2
        ? { feature: feature(), splitValue: random() - 0.5, belowOutput: -random(), aboveOutput: random() }
        : weakClassifierFromTree(branch(1) as TreeSplit))),
    })),
  };
}
