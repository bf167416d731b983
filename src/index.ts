/**
 * rectboost's public library API: the names a program needs, in the order data
 * flows — images, training data, features, training, model files, detection,
 * measurement. Each has its doc comment where it is defined. The README's
 * "Library" section lists exactly these names (a test holds the two together);
 * everything else in the package is internal and may change.
 * The browser runtime has its own entry point, `rectboost/runtime`.
 */
export { RectboostError, isRectboostError, type RectboostErrorCode } from './errors.js';

// 1. Images: decode to gray, summed-area tables.
export { decodeGrayImageFile, type DecodeOptions } from './io/decode-image.js';
export type { GrayImage } from './image/gray-image.js';
export { computeIntegralImage, type IntegralImage } from './image/integral-image.js';

// 2. Training data: positive patches, background images, annotations, window samples.
export { loadPositiveWindows, type LoadedPositives, type PositiveLoadOptions } from './data/positives.js';
export { loadBackgroundImages, type LoadedBackgrounds } from './data/backgrounds.js';
export { loadAnnotations, type AnnotatedImage } from './data/annotations.js';
export { packWindowSamples, type WindowSamples } from './features/window-samples.js';

// 3. Haar-like features.
export type { FeatureKind } from './features/feature-kind.js';
export type { HaarFeature } from './features/haar-feature.js';
export { enumerateFeatures } from './features/enumerate-features.js';
export { evaluateNormalizedFeature } from './features/evaluate-feature.js';

// 4. Training: a cascade in memory, or files to a model file with checkpoints; retuning.
export { createBoostingPool, type BoostingPool } from './parallel/boosting-pool.js';
export {
  trainCascade,
  type CascadeTrainingOptions,
  type CascadeTrainingResult,
  type CascadeStopReason,
  type StageReport,
  type TrainingEvent,
} from './cascade/build-cascade.js';
export { trainModel, type TrainModelOptions, type TrainModelEvent, type TrainedModel } from './jobs/train-model.js';
export { retuneCascade, type RetuneOptions, type RetuneResult } from './cascade/retune.js';

// 5. Model files: the model, its runtime export and C99 detector.
export type { CascadeModel, Stage, WeakClassifier, TrainingProvenance } from './model/cascade-model.js';
export { loadModelFile, saveCascadeModel, type LoadModelOptions, type LoadedFullModel, type LoadedRuntimeCascade, type ModelRequirement } from './io/model-file.js';
export { parseCascadeModel } from './cascade/model-json.js';
export { exportRuntimeCascade, type RuntimeCascadeFile } from './cascade/runtime-export.js';
export { exportCDetector, type CDetectorExport } from './cascade/c-export.js';

// 6. Detection: one image in this thread, many on worker threads, lists in shards.
export { detectorCascadeFromModel, type DetectorCascade } from './detect/detector-cascade.js';
export { scanImage, type ScanOptions, type ScanResult, type RawHits } from './detect/scan-image.js';
export { mergeDetections, type Detection, type MergeMethod, type MergeOptions } from './detect/merge-detections.js';
export { detectFiles, type DetectFilesOptions, type FileOutcome, type ImageDetections } from './parallel/detect-files.js';
export { readImageList, type ImageListEntry } from './data/image-list.js';
export { joinShards, type JoinSummary } from './parallel/join-shards.js';

// 7. Measurement: matching, detection and patch evaluation, the visual report.
export { intersectionOverUnion, type Box } from './detect/intersection-over-union.js';
export { evaluateDetections, type DetectionEvaluation } from './metrics/detection-evaluation.js';
export { evaluatePatches, type PatchEvaluation } from './metrics/patch-evaluation.js';
export { assembleReportContent, writeReportFiles, type ReportInputs } from './io/report-files.js';
