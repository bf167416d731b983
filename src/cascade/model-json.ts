import { FieldChecks } from '../check.js';
import { RectboostError } from '../errors.js';
import { MAX_WINDOW_SIDE } from '../features/enumerate-features.js';
import { FEATURE_SET_KINDS, FEATURE_SET_NAMES, type FeatureSetName } from '../features/feature-kind.js';
import { featureFitsWindow, type HaarFeature } from '../features/haar-feature.js';
import {
  branchDepth,
  CASCADE_FORMAT,
  CASCADE_VERSION,
  isDecisionTree,
  isTreeLeaf,
  MAX_TREE_DEPTH,
  type CascadeModel,
  type TreeBranch,
  type Stage,
  type StageTrainingRecord,
  type TrainingProvenance,
  type WeakClassifier,
} from './cascade-model.js';

/**
 * Bounds that keep an untrusted model file from causing huge allocations or
 * long loops (DESIGN §5). Real cascades are far smaller: Viola & Jones (2004)
 * used 38 stages and 6,060 features in all.
 */
export const MODEL_LIMITS = {
  maxTextBytes: 64 * 1024 * 1024,
  maxStages: 1000,
  maxWeakClassifiersPerStage: 10_000,
  maxWeakClassifiersTotal: 200_000,
  maxAbsoluteValue: 1e12,
} as const;

const STOP_REASONS: ReadonlyArray<StageTrainingRecord['stoppedBecause']> = [
  'targets-met',
  'max-weak-classifiers',
  'perfect-separation',
  'no-better-than-chance',
];

/**
 * The model as JSON text with a fixed key order, so that the same model always
 * gives the same bytes: one weak classifier per line keeps files diffable.
 * Numbers are written in JavaScript's shortest round-trip form, so parsing gives
 * back the identical doubles.
 */
export function serializeCascadeModel(model: CascadeModel): string {
  const lines: string[] = [];
  lines.push('{');
  lines.push(`  "format": ${JSON.stringify(model.format)},`);
  lines.push(`  "version": ${model.version},`);
  lines.push(`  "window": ${JSON.stringify({ width: model.window.width, height: model.window.height })},`);
  lines.push(`  "normalization": ${JSON.stringify(model.normalization)},`);
  lines.push(`  "featureSet": ${JSON.stringify(model.featureSet)},`);
  if (model.meanPositive !== undefined) {
    lines.push(`  "meanPositive": ${JSON.stringify(model.meanPositive.map((v) => Math.round(v * 100) / 100))},`);
  }
  if (model.training !== undefined) {
    lines.push(`  "training": ${indentJson(orderedProvenance(model.training), '  ')},`);
  }
  lines.push('  "stages": [');
  model.stages.forEach((stage, s) => {
    lines.push('    {');
    lines.push(`      "threshold": ${JSON.stringify(stage.threshold)},`);
    if (stage.training !== undefined) lines.push(`      "training": ${JSON.stringify(orderedStageRecord(stage.training))},`);
    lines.push('      "weakClassifiers": [');
    stage.weakClassifiers.forEach((weak, w) => {
      const comma = w + 1 < stage.weakClassifiers.length ? ',' : '';
      lines.push(`        ${JSON.stringify(orderedWeak(weak))}${comma}`);
    });
    lines.push('      ]');
    lines.push(`    }${s + 1 < model.stages.length ? ',' : ''}`);
  });
  lines.push('  ]');
  lines.push('}');
  return `${lines.join('\n')}\n`;
}

function indentJson(value: unknown, indent: string): string {
  return JSON.stringify(value, null, 2).split('\n').join(`\n${indent}`);
}

function orderedWeak(weak: WeakClassifier): object {
  if (isDecisionTree(weak)) return { tree: orderedBranch(weak.tree) };
  return {
    feature: orderedFeature(weak.feature),
    splitValue: weak.splitValue,
    belowOutput: weak.belowOutput,
    aboveOutput: weak.aboveOutput,
  };
}

function orderedFeature(f: HaarFeature): object {
  return { kind: f.kind, x: f.x, y: f.y, cellWidth: f.cellWidth, cellHeight: f.cellHeight };
}

function orderedBranch(branch: TreeBranch): object {
  if (isTreeLeaf(branch)) return { output: branch.output };
  return { feature: orderedFeature(branch.feature), splitValue: branch.splitValue, below: orderedBranch(branch.below), above: orderedBranch(branch.above) };
}

function orderedStageRecord(record: StageTrainingRecord): object {
  return {
    detectionRate: record.detectionRate,
    falsePositiveRate: record.falsePositiveRate,
    positives: record.positives,
    negatives: record.negatives,
    ...(record.negativesFromPatches === undefined ? {} : { negativesFromPatches: record.negativesFromPatches }),
    windowsScanned: record.windowsScanned,
    featuresUsed: record.featuresUsed,
    stoppedBecause: record.stoppedBecause,
  };
}

function orderedProvenance(training: TrainingProvenance): object {
  const options: Record<string, unknown> = {};
  for (const key of Object.keys(training.options).sort()) options[key] = training.options[key];
  return {
    tool: training.tool,
    seed: training.seed,
    options,
    data: {
      positives: training.data.positives,
      validationPositives: training.data.validationPositives,
      backgroundImages: training.data.backgroundImages,
      positivesHash: training.data.positivesHash,
      backgroundsHash: training.data.backgroundsHash,
      ...(training.data.negativePatches === undefined ? {} : { negativePatches: training.data.negativePatches }),
      ...(training.data.negativePatchesHash === undefined ? {} : { negativePatchesHash: training.data.negativePatchesHash }),
    },
    stopReason: training.stopReason,
    ...(training.timing === undefined
      ? {}
      : {
          timing: {
            createdAt: training.timing.createdAt,
            totalSeconds: training.timing.totalSeconds,
            stageSeconds: training.timing.stageSeconds,
          },
        }),
  };
}

/**
 * Parses JSON text of a model or runtime-cascade file, refusing text above
 * MODEL_LIMITS.maxTextBytes. `label` names the source (usually the file path).
 * @throws RectboostError `bad-model` for oversized text or text that is not JSON.
 */
export function parseModelText(text: string, label: string): unknown {
  if (text.length > MODEL_LIMITS.maxTextBytes) {
    throw new RectboostError('bad-model', `Model ${label} is ${text.length} bytes, above the limit of ${MODEL_LIMITS.maxTextBytes}; pass a file written by rectboost train or export.`);
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (error) {
    throw new RectboostError(
      'bad-model',
      `Model ${label} is not valid JSON (${(error as Error).message}); it may be truncated — pass a file written by rectboost train or export.`,
      { cause: error },
    );
  }
}

/**
 * Parses and strictly validates model JSON text. `label` (usually the file path)
 * names the source in errors. Checks: known format and version, window within
 * 1..MAX_WINDOW_SIDE, every number finite and bounded, every feature of a known
 * kind and inside the window, sizes within MODEL_LIMITS. Unknown fields are refused
 * so that typos do not pass silently.
 * @throws RectboostError `bad-model` with the field path, e.g. `stages[2].weakClassifiers[5].splitValue`.
 */
export function parseCascadeModel(text: string, label: string): CascadeModel {
  return validateCascadeModel(parseModelText(text, label), label);
}

/** The checks of a full model file's fields, messages naming `label` and the field path. */
function modelChecks(label: string): FieldChecks {
  return new FieldChecks({ code: 'bad-model', source: `Model ${label}`, remedy: 'Pass a model written by rectboost train or tune, unedited.' });
}

/** A number a model may hold: finite and within ±MODEL_LIMITS.maxAbsoluteValue. */
function modelNumber(v: FieldChecks, value: unknown, path: string): number {
  return v.numberIn(value, path, -MODEL_LIMITS.maxAbsoluteValue, MODEL_LIMITS.maxAbsoluteValue);
}

/** Validates an already-parsed value as a CascadeModel (see parseCascadeModel). */
export function validateCascadeModel(raw: unknown, label: string): CascadeModel {
  const v = modelChecks(label);
  const root = v.object(raw, '', ['format', 'version', 'window', 'normalization', 'featureSet', 'stages'], ['meanPositive', 'training']);
  v.constant(root.format, 'format', CASCADE_FORMAT, 'this is not a rectboost model');
  v.constant(root.version, 'version', CASCADE_VERSION, `this rectboost reads version ${CASCADE_VERSION} models only`);
  const windowObject = v.object(root.window, 'window', ['width', 'height'], []);
  const width = v.integer(windowObject.width, 'window.width', 1, MAX_WINDOW_SIDE);
  const height = v.integer(windowObject.height, 'window.height', 1, MAX_WINDOW_SIDE);
  v.constant(root.normalization, 'normalization', 'window-standard-deviation');
  // The set names which kinds the stages may use: basic models never hold tilted or centre-surround kinds.
  const featureSet = v.oneOf(root.featureSet, 'featureSet', FEATURE_SET_NAMES);
  const stagesRaw = v.array(root.stages, 'stages', MODEL_LIMITS.maxStages);
  let totalWeak = 0;
  const stages: Stage[] = stagesRaw.map((stageRaw, s) => {
    const path = `stages[${s}]`;
    const stageObject = v.object(stageRaw, path, ['threshold', 'weakClassifiers'], ['training']);
    const threshold = modelNumber(v, stageObject.threshold, `${path}.threshold`);
    const weakRaw = v.array(stageObject.weakClassifiers, `${path}.weakClassifiers`, MODEL_LIMITS.maxWeakClassifiersPerStage);
    totalWeak += weakRaw.length;
    if (totalWeak > MODEL_LIMITS.maxWeakClassifiersTotal) {
      v.fail(`${path}.weakClassifiers`, `brings the total above ${MODEL_LIMITS.maxWeakClassifiersTotal} weak classifiers`);
    }
    const weakClassifiers = weakRaw.map((w, i) => parseWeak(v, w, `${path}.weakClassifiers[${i}]`, width, height, featureSet));
    const stage: Stage = { threshold, weakClassifiers };
    if (stageObject.training === undefined) return stage;
    return { ...stage, training: parseStageRecord(v, stageObject.training, `${path}.training`) };
  });
  let model: CascadeModel = {
    format: CASCADE_FORMAT,
    version: CASCADE_VERSION,
    window: { width, height },
    normalization: 'window-standard-deviation',
    featureSet,
    stages,
  };
  if (root.meanPositive !== undefined) {
    const mean = v.array(root.meanPositive, 'meanPositive', width * height);
    if (mean.length !== width * height) v.fail('meanPositive', `must hold ${width * height} values; received ${mean.length}`);
    model = { ...model, meanPositive: mean.map((value, i) => v.numberIn(value, `meanPositive[${i}]`, 0, 255)) };
  }
  if (root.training !== undefined) model = { ...model, training: parseProvenance(v, root.training) };
  return model;
}

function parseWeak(v: FieldChecks, raw: unknown, path: string, width: number, height: number, featureSet: FeatureSetName): WeakClassifier {
  if (typeof raw === 'object' && raw !== null && !Array.isArray(raw) && 'tree' in raw) {
    const tree = v.object(raw, path, ['tree'], []);
    const root = parseBranch(v, tree.tree, `${path}.tree`, 1, width, height, featureSet);
    if (isTreeLeaf(root)) return v.fail(`${path}.tree`, 'must be a split (feature, splitValue, below, above), not a leaf');
    if (branchDepth(root) === 1) {
      return v.fail(`${path}.tree`, 'is a tree of depth 1; write it as a stump (feature, splitValue, belowOutput, aboveOutput)');
    }
    return { tree: root };
  }
  const weak = v.object(raw, path, ['feature', 'splitValue', 'belowOutput', 'aboveOutput'], []);
  return {
    feature: parseFeature(v, weak.feature, `${path}.feature`, width, height, featureSet),
    splitValue: modelNumber(v, weak.splitValue, `${path}.splitValue`),
    belowOutput: modelNumber(v, weak.belowOutput, `${path}.belowOutput`),
    aboveOutput: modelNumber(v, weak.aboveOutput, `${path}.aboveOutput`),
  };
}

/** A tree branch at `level` (the root split is level 1): a leaf `{output}` or a split at most MAX_TREE_DEPTH levels deep. */
function parseBranch(v: FieldChecks, raw: unknown, path: string, level: number, width: number, height: number, featureSet: FeatureSetName): TreeBranch {
  if (typeof raw === 'object' && raw !== null && !Array.isArray(raw) && 'output' in raw) {
    const leaf = v.object(raw, path, ['output'], []);
    return { output: modelNumber(v, leaf.output, `${path}.output`) };
  }
  if (level > MAX_TREE_DEPTH) return v.fail(path, `must be a leaf {output}: trees are at most ${MAX_TREE_DEPTH} splits deep`);
  const split = v.object(raw, path, ['feature', 'splitValue', 'below', 'above'], []);
  return {
    feature: parseFeature(v, split.feature, `${path}.feature`, width, height, featureSet),
    splitValue: modelNumber(v, split.splitValue, `${path}.splitValue`),
    below: parseBranch(v, split.below, `${path}.below`, level + 1, width, height, featureSet),
    above: parseBranch(v, split.above, `${path}.above`, level + 1, width, height, featureSet),
  };
}

function parseFeature(v: FieldChecks, raw: unknown, path: string, width: number, height: number, featureSet: FeatureSetName): HaarFeature {
  const featureObject = v.object(raw, path, ['kind', 'x', 'y', 'cellWidth', 'cellHeight'], []);
  const feature: HaarFeature = {
    kind: v.oneOf(featureObject.kind, `${path}.kind`, FEATURE_SET_KINDS[featureSet]),
    x: v.integer(featureObject.x, `${path}.x`, 0, MAX_WINDOW_SIDE),
    y: v.integer(featureObject.y, `${path}.y`, 0, MAX_WINDOW_SIDE),
    cellWidth: v.integer(featureObject.cellWidth, `${path}.cellWidth`, 1, MAX_WINDOW_SIDE),
    cellHeight: v.integer(featureObject.cellHeight, `${path}.cellHeight`, 1, MAX_WINDOW_SIDE),
  };
  if (!featureFitsWindow(feature, width, height)) {
    v.fail(path, `lies outside the ${width}×${height} window`);
  }
  return feature;
}

function parseStageRecord(v: FieldChecks, raw: unknown, path: string): StageTrainingRecord {
  const record = v.object(raw, path, ['detectionRate', 'falsePositiveRate', 'positives', 'negatives', 'windowsScanned', 'featuresUsed', 'stoppedBecause'], ['negativesFromPatches']);
  const count = (key: string) => v.integer(record[key], `${path}.${key}`, 0, Number.MAX_SAFE_INTEGER);
  return {
    detectionRate: v.numberIn(record.detectionRate, `${path}.detectionRate`, 0, 1),
    falsePositiveRate: v.numberIn(record.falsePositiveRate, `${path}.falsePositiveRate`, 0, 1),
    positives: count('positives'),
    negatives: count('negatives'),
    ...(record.negativesFromPatches === undefined
      ? {}
      : { negativesFromPatches: v.integer(record.negativesFromPatches, `${path}.negativesFromPatches`, 0, count('negatives')) }),
    windowsScanned: count('windowsScanned'),
    featuresUsed: count('featuresUsed'),
    stoppedBecause: v.oneOf(record.stoppedBecause, `${path}.stoppedBecause`, STOP_REASONS),
  };
}

function parseProvenance(v: FieldChecks, raw: unknown): TrainingProvenance {
  const t = v.object(raw, 'training', ['tool', 'seed', 'options', 'data', 'stopReason'], ['timing']);
  const optionsObject = v.object(t.options, 'training.options', [], null);
  const options: Record<string, string | number | boolean | null> = {};
  for (const [key, value] of Object.entries(optionsObject)) {
    if (value !== null && typeof value !== 'string' && typeof value !== 'boolean') modelNumber(v, value, `training.options.${key}`);
    options[key] = value as string | number | boolean | null;
  }
  const data = v.object(t.data, 'training.data', ['positives', 'validationPositives', 'backgroundImages', 'positivesHash', 'backgroundsHash'], ['negativePatches', 'negativePatchesHash']);
  const count = (key: string) => v.integer(data[key], `training.data.${key}`, 0, Number.MAX_SAFE_INTEGER);
  const provenance: TrainingProvenance = {
    tool: v.string(t.tool, 'training.tool'),
    seed: v.integer(t.seed, 'training.seed', 0, Number.MAX_SAFE_INTEGER),
    options,
    data: {
      positives: count('positives'),
      validationPositives: count('validationPositives'),
      backgroundImages: count('backgroundImages'),
      positivesHash: v.string(data.positivesHash, 'training.data.positivesHash'),
      backgroundsHash: v.string(data.backgroundsHash, 'training.data.backgroundsHash'),
      ...(data.negativePatches === undefined ? {} : { negativePatches: v.integer(data.negativePatches, 'training.data.negativePatches', 0, Number.MAX_SAFE_INTEGER) }),
      ...(data.negativePatchesHash === undefined ? {} : { negativePatchesHash: v.string(data.negativePatchesHash, 'training.data.negativePatchesHash') }),
    },
    stopReason: v.string(t.stopReason, 'training.stopReason'),
  };
  if (t.timing === undefined) return provenance;
  const timing = v.object(t.timing, 'training.timing', ['createdAt', 'totalSeconds', 'stageSeconds'], []);
  const stageSeconds = v.array(timing.stageSeconds, 'training.timing.stageSeconds', MODEL_LIMITS.maxStages);
  return {
    ...provenance,
    timing: {
      createdAt: v.string(timing.createdAt, 'training.timing.createdAt'),
      totalSeconds: v.numberIn(timing.totalSeconds, 'training.timing.totalSeconds', 0, MODEL_LIMITS.maxAbsoluteValue),
      stageSeconds: stageSeconds.map((value, i) => v.numberIn(value, `training.timing.stageSeconds[${i}]`, 0, MODEL_LIMITS.maxAbsoluteValue)),
    },
  };
}
