// Train a cascade on the demo patches, find rivets on the demo scenes, score the finds.
// In your own project, import from 'rectboost' instead of '../src/index.js'.
import { join } from 'node:path';
import {
  computeIntegralImage, decodeGrayImageFile, detectorCascadeFromModel, evaluateDetections,
  loadAnnotations, mergeDetections, scanImage, trainModel,
} from '../src/index.js';

/** Trains on `demo` (the repository's demo-patches folder), writes `modelFile`, returns the scene AP. */
export async function trainDetectEvaluate(demo: string, modelFile: string): Promise<number> {
  const { model } = await trainModel({
    positives: join(demo, 'positives'), backgrounds: join(demo, 'backgrounds'), out: modelFile,
    maxStages: 4, negativesPerStage: 500, positiveLimit: 400, recordTiming: false,
  });
  const detector = detectorCascadeFromModel(model);
  const scenes = await loadAnnotations(join(demo, 'scenes', 'truth.jsonl'));
  const scored = await Promise.all(scenes.map(async ({ image, boxes }) => {
    const { hits } = scanImage(detector, computeIntegralImage(await decodeGrayImageFile(image)), {});
    return { detections: mergeDetections(hits), truth: boxes };
  }));
  return evaluateDetections(scored).averagePrecision;
}
