/**
 * rectboost's public library API. Everything a program needs is re-exported
 * here by name; the CLI uses only these.
 */
export { RectboostError, isRectboostError, type RectboostErrorCode } from './errors.js';

export {
  createGrayImage,
  cropGrayImage,
  cropBoxToWindow,
  mirrorGrayImage,
  resizeGrayImage,
  DEFAULT_MAX_PIXELS,
  type GrayImage,
} from './image/gray-image.js';
export {
  augmentWindows,
  applyAugmentation,
  drawAugmentation,
  DEFAULT_AUGMENTATION,
  type AugmentationLimits,
  type AugmentationDraw,
} from './image/augment-window.js';
export { computeIntegralImage, rectangleSum, type IntegralImage } from './image/integral-image.js';
export { windowStatistics, windowInverseDeviation, inverseStandardDeviation, FLAT_WINDOW_VARIANCE, type WindowStatistics } from './image/window-statistics.js';

export { BASIC_FEATURE_KINDS, CELL_LAYOUTS, isFeatureKind, type FeatureKind, type FeatureSetName, type CellLayout } from './features/feature-kind.js';
export {
  featureCells,
  featureExtent,
  featureFitsWindow,
  scaledFeatureCells,
  type HaarFeature,
  type WeightedRectangle,
} from './features/haar-feature.js';
export { enumerateFeatures, countFeatures, countFeaturesOfKind, MAX_WINDOW_SIDE } from './features/enumerate-features.js';
export { evaluateFeature, evaluateNormalizedFeature } from './features/evaluate-feature.js';
export { compileFeatures, evaluateCompiledFeature, type CompiledFeatures } from './features/compiled-features.js';
export { packWindowSamples, type WindowSamples } from './features/window-samples.js';

export { decodeGrayImageFile, decodeGrayImageBytes, hasImageExtension, IMAGE_EXTENSIONS, type DecodeOptions } from './io/decode-image.js';
export { encodeGrayPng, encodeRgbPng, type RgbImage } from './io/encode-image.js';
export { boxCropPng, writeErrorCrops, ERROR_CROP_FOLDERS, type WrittenErrorCrops } from './io/box-crops.js';
export { writeFileAtomic } from './io/atomic-write.js';
export { listImageFiles, listImageFilesOfAll } from './data/list-images.js';

// Data-set readers: NumPy .npy and IDX files, lfw_subset and Fashion-MNIST loaders.
export { readNpy, readNpyFile, type NpyArray } from './data/npy-reader.js';
export { readIdx, readIdxFile, type IdxArray } from './data/idx-reader.js';
export { loadLfwSubset, lfwSubsetFromArray, LFW_SUBSET_ITEMS_PER_CLASS, LFW_SUBSET_SIDE, type LfwSubset } from './data/lfw-subset.js';
export { loadFashionMnist, FASHION_MNIST_SIDE, type FashionMnistSplit } from './data/fashion-mnist.js';

// --- Boosting engine (issue 3): response matrix, weak-learner search, AdaBoost, stage training, worker pool
export { BOOSTER_KINDS, CHANCE_MARGIN, PERFECT_ERROR, discreteAlpha, initialWeights, updateWeights, type BoosterKind } from './boost/booster.js';
export { BIN_COUNT, binEdge, quantizeBetween, quantizeResponses } from './boost/response-bins.js';
export { packSampleColumns, type SampleColumns } from './boost/sample-columns.js';
export {
  buildResponseMatrix,
  fillResponseRows,
  responseMatrixFromValues,
  splitValueOf,
  type ResponseMatrix,
  type ResponseRowsTarget,
} from './boost/response-matrix.js';
export { betterSplit, createSplitScratch, searchBestSplit, type SplitCandidate } from './boost/best-split.js';
export {
  boostRounds,
  decideRound,
  stumpOutputs,
  type BoostRoundsOptions,
  type BoostedRound,
  type ChosenStump,
  type RoundOutcome,
} from './boost/adaboost.js';
export { passRate, thresholdForDetectionRate } from './boost/stage-threshold.js';
export {
  DEFAULT_MATRIX_MEMORY_BYTES,
  trainStage,
  type StageRoundReport,
  type StageTrainingOptions,
  type StageTrainingResult,
} from './boost/train-stage.js';
export { createStageBuffers, stageBuffersForRun, placeCompiledFeatures, type StageBuffers, type StageBufferLimits } from './boost/stage-buffers.js';
export { createBoostingPool, defaultWorkerCount, type BoostingPool } from './parallel/boosting-pool.js';
export type { MatrixBuildJob, SplitSearchJob } from './parallel/boosting-jobs.js';
// --- Detection, metrics, evaluation, export, inspection (issue 5) ---
export { detectorCascadeFromModel, detectorWeakClassifier, type DetectorCascade, type DetectorStage, type DetectorWeakClassifier } from './detect/detector-cascade.js';
export {
  scanImage,
  scanScales,
  resolveScanOptions,
  DEFAULT_SCAN_OPTIONS,
  type ScanOptions,
  type ScanResult,
  type ScanStatistics,
  type RawHits,
} from './detect/scan-image.js';
export { mergeDetections, MERGE_METHODS, DEFAULT_MERGE_OPTIONS, type Detection, type MergeMethod, type MergeOptions } from './detect/merge-detections.js';
export { intersectionOverUnion, type Box } from './metrics/intersection-over-union.js';
export {
  matchDetections,
  detectionErrors,
  type ImageDetectionsAndTruth,
  type MatchedDetection,
  type MatchResult,
  type DetectionError,
  type DetectionErrors,
} from './metrics/match-detections.js';
export { precisionRecallCurve, averagePrecision, detectionRateAtFalsePositives, type PrecisionRecallCurve } from './metrics/precision-recall.js';
export { missRateCurve, logAverageMissRate, LOG_AVERAGE_REFERENCE_POINTS, type MissRateCurve } from './metrics/miss-rate.js';
export { rocCurve, truePositiveRateAt, type RocCurve } from './metrics/roc-curve.js';
export {
  exportRuntimeCascade,
  runtimeFileFromDetector,
  parseRuntimeCascade,
  runtimeCascadeFromValue,
  RUNTIME_CASCADE_FORMAT,
  RUNTIME_CASCADE_VERSION,
  RUNTIME_LIMITS,
  type RuntimeCascadeFile,
} from './cascade/runtime-export.js';
export { exportCDetector, cWorkBytes, type CDetectorExport, type CDetectorTemplates } from './cascade/c-export.js';
export { cascadeDepthScores, evaluatePatches, type PatchEvaluation, type StagePassRates } from './metrics/patch-evaluation.js';
export { evaluateDetections, summarizeScans, type DetectionEvaluation, type ScanSummary } from './metrics/detection-evaluation.js';
export { retuneCascade, backgroundPassRates, type RetuneOptions, type RetuneResult, type RetunedStage } from './cascade/retune.js';
export { loadAnnotations, parseAnnotations, type AnnotatedImage } from './data/annotations.js';
export { drawBoxes, DETECTION_COLOUR, TRUTH_COLOUR, type RgbColour } from './io/draw-boxes.js';
export { drawFeatureSheet, POSITIVE_CELL_COLOUR, NEGATIVE_CELL_COLOUR } from './io/draw-features.js';
export { createScanPool, type ScanPool, type TimedScanResult } from './parallel/scan-pool.js';
export { detectFiles, detectEntries, type DetectFilesOptions, type FileOutcome, type ImageDetections } from './parallel/detect-files.js';

// --- Large batches (issue 15): image lists, shards (also from Slurm array variables), resumable shard files, join
export { imageListEntries, readImageList, type ImageListEntry } from './data/image-list.js';
export { parseShard, shardFromEnvironment, shardOfLine, lineInShard, WHOLE_LIST, type Shard } from './data/shard.js';
export { formatDetectionLine, DETECTIONS_VERSION, type DetectionLineOptions } from './parallel/detections-file.js';
export { openShardOutput, shardPaths, type ShardOutput, type ShardDoneMarker, type ShardRunFigures } from './parallel/shard-output.js';
export { joinShards, type JoinSummary } from './parallel/join-shards.js';

// --- Peer benchmark support (issue 7): .npy writing for exchanging arrays with NumPy-based libraries
export { encodeNpy, encodeNpyHeader, writeNpyFile, type NpyData, type NpyElementType } from './data/npy-writer.js';

// --- Cascades (issue 4): model type and files, training loop, negative mining, data loading, checkpoints
export {
  CASCADE_FORMAT,
  CASCADE_VERSION,
  newCascadeModel,
  type CascadeModel,
  type Stage,
  type StageTrainingRecord,
  type TrainingProvenance,
  type WeakClassifier,
} from './cascade/cascade-model.js';
export { MODEL_LIMITS, parseCascadeModel, serializeCascadeModel, validateCascadeModel } from './cascade/model-json.js';
export { compileCascadeAtScale } from './detect/compiled-cascade.js';
export { WindowListEvaluator, acceptSamples, cascadeDepths, stageSampleScores, sampleTable } from './detect/window-list.js';
export { BackgroundWindows, MINING_SCALE_STEP, mineHardNegatives, sampleUniformNegatives, type MiningProgress, type MiningResult } from './cascade/negative-mining.js';
export {
  trainCascade,
  DEFAULT_NEGATIVE_PATCH_SHARE,
  heldOutCount,
  resolvableRate,
  formatRate,
  type CascadeStopReason,
  type CascadeTrainingOptions,
  type CascadeTrainingResult,
  type StageReport,
  type TrainingEvent,
} from './cascade/build-cascade.js';
export { trainModel, TOOL_NAME, INTERRUPTED_STOP_REASON, type TrainModelOptions, type TrainModelEvent, type TrainedModel } from './jobs/train-model.js';
export {
  loadModelFile,
  saveCascadeModel,
  type LoadModelOptions,
  type LoadedFullModel,
  type LoadedRuntimeCascade,
  type ModelRequirement,
} from './io/model-file.js';
export { readCheckpoint, writeCheckpoint, removeCheckpoint, type Checkpoint, type TrainingFingerprint } from './io/checkpoint.js';
export { loadPositiveWindows, type LoadedPositives, type PositiveLoadOptions } from './data/positives.js';
export { loadBackgroundImages, type LoadedBackgrounds } from './data/backgrounds.js';
export { readImagesChecked, refuseBadImages, type CheckedImages, type ReadImagesOptions } from './data/read-images.js';

// --- Visual report (issue 14): SVG charts, the offline HTML page, the cases to act on, PNG plots
export { findCasesToReview, findPatchCases, type CaseLists, type CasesToReview, type PatchCasesToReview, type PatchCase, type FalseAlarm, type MissedObject } from './report/cases.js';
export { windowDepthNearBox, type WindowDepth } from './report/window-depth.js';
export { lineChart, barChart, type LineChartSpec, type BarChartSpec, type ChartSeries } from './report/svg-chart.js';
export {
  renderReportPage,
  reportCharts,
  REPORT_DATA_ID,
  type ReportContent,
  type CaseThumbnail,
  type DetectionSection,
  type PatchSection,
} from './report/report-page.js';
export { assembleReportContent, writeReportFiles, boxThumbnailPng, svgToPng, type ReportInputs } from './io/report-files.js';
