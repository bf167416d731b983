import { join } from 'node:path';
import sharp from 'sharp';
import type { CascadeModel } from '../cascade/cascade-model.js';
import type { DetectorCascade } from '../detect/detector-cascade.js';
import type { ScanOptions } from '../detect/scan-image.js';
import { cropGrayImage, type GrayImage } from '../image/gray-image.js';
import type { Box } from '../metrics/intersection-over-union.js';
import type { DetectionEvaluation, ScanSummary } from '../metrics/detection-evaluation.js';
import type { ImageDetectionsAndTruth } from '../metrics/match-detections.js';
import { findCasesToReview, findPatchCases, type CasesToReview, type PatchCase } from '../report/cases.js';
import { cascadeDepthScores, type PatchEvaluation } from '../metrics/patch-evaluation.js';
import type { WindowSamples } from '../features/window-samples.js';
import { reportCharts, renderReportPage, type CaseThumbnail, type DetectionSection, type PatchSection, type ReportContent } from '../report/report-page.js';
import { windowDepthNearBox } from '../report/window-depth.js';
import { writeFileAtomic } from './atomic-write.js';
import { decodeGrayImageFile } from './decode-image.js';
import { DETECTION_COLOUR, TRUTH_COLOUR, drawBoxes, type RgbColour } from './draw-boxes.js';
import { drawModelFeatureSheet } from './draw-features.js';
import { encodeRgbPng, type RgbImage } from './encode-image.js';

/** Side of a case thumbnail in pixels (the crop is enlarged to about this size). */
export const THUMBNAIL_SIDE = 128;

/** PNG bytes as a `data:` URI for the page. */
function pngDataUri(png: Buffer): string {
  return `data:image/png;base64,${png.toString('base64')}`;
}

/**
 * A thumbnail of one box: the box with a margin of half its size on every side
 * (clipped to the image), enlarged by nearest neighbour to about THUMBNAIL_SIDE
 * pixels, with the box outlined in `colour`. PNG bytes.
 */
export async function boxThumbnailPng(image: GrayImage, box: Box, colour: RgbColour): Promise<Buffer> {
  const marginX = box[2] / 2;
  const marginY = box[3] / 2;
  const left = Math.max(0, Math.floor(box[0] - marginX));
  const top = Math.max(0, Math.floor(box[1] - marginY));
  const right = Math.min(image.width, Math.max(left + 1, Math.ceil(box[0] + box[2] + marginX)));
  const bottom = Math.min(image.height, Math.max(top + 1, Math.ceil(box[1] + box[3] + marginY)));
  const crop = cropGrayImage(image, left, top, right - left, bottom - top);
  const zoom = Math.max(1, Math.round(THUMBNAIL_SIDE / Math.max(crop.width, crop.height)));
  const { data, info } = await sharp(Buffer.from(crop.data.buffer, crop.data.byteOffset, crop.data.length), { raw: { width: crop.width, height: crop.height, channels: 1 } })
    .resize(crop.width * zoom, crop.height * zoom, { kernel: 'nearest' })
    .raw()
    .toBuffer({ resolveWithObject: true });
  const enlarged: GrayImage = { width: info.width, height: info.height, data: new Uint8Array(data.buffer, data.byteOffset, data.length) };
  const outlined = drawBoxes(enlarged, [{ boxes: [[(box[0] - left) * zoom, (box[1] - top) * zoom, box[2] * zoom, box[3] * zoom]], colour }], 2);
  return encodeRgbPng(outlined);
}

/**
 * Thumbnails of the cases to act on, decoding each image they come from once.
 * A missed object also gets the depth its nearest scan window reached in the
 * cascade (windowDepthNearBox, with the evaluation's scan options).
 * @param imagePaths the evaluation's images, indexed like the cases.
 * @throws RectboostError `bad-image` when an image can no longer be read.
 */
export async function caseThumbnails(
  cases: CasesToReview,
  imagePaths: readonly string[],
  detector: DetectorCascade,
  scan: ScanOptions,
): Promise<{ missed: CaseThumbnail[]; falseAlarms: CaseThumbnail[] }> {
  const images = new Map<number, GrayImage>();
  for (const index of new Set([...cases.missed, ...cases.falseAlarms].map((c) => c.image))) {
    images.set(index, await decodeGrayImageFile(imagePaths[index]!));
  }
  const missed: CaseThumbnail[] = [];
  for (const item of cases.missed) {
    const image = images.get(item.image)!;
    const depth = windowDepthNearBox(detector, image, item.box, scan);
    missed.push({
      file: imagePaths[item.image]!, box: item.box, thumbnail: pngDataUri(await boxThumbnailPng(image, item.box, TRUTH_COLOUR)),
      ...(depth === null ? {} : { stagesPassed: depth.stagesPassed, flat: depth.flat }),
    });
  }
  const falseAlarms: CaseThumbnail[] = [];
  for (const item of cases.falseAlarms) {
    const image = images.get(item.image)!;
    falseAlarms.push({ file: imagePaths[item.image]!, box: item.box, score: item.score, thumbnail: pngDataUri(await boxThumbnailPng(image, item.box, DETECTION_COLOUR)) });
  }
  return { missed, falseAlarms };
}

/** The feature sheet of a full model as a PNG data URI (see drawModelFeatureSheet). */
export async function featureSheetDataUri(model: CascadeModel): Promise<string> {
  const sheet: RgbImage = drawModelFeatureSheet(model, 3, 6, 6);
  return pngDataUri(await encodeRgbPng(sheet));
}

/** Renders an SVG document to PNG bytes through sharp (librsvg), at the SVG's own size. */
export async function svgToPng(svg: string): Promise<Buffer> {
  return sharp(Buffer.from(svg, 'utf8')).png().toBuffer();
}

/**
 * Writes the report page to `htmlPath` (atomically, when given) and, with
 * `plotsDirectory`, every chart of the page as `NAME.png` there, rendered from
 * the same SVG text.
 * @returns the files written, page first.
 */
export async function writeReportFiles(content: ReportContent, htmlPath: string | undefined, plotsDirectory?: string): Promise<string[]> {
  const written: string[] = [];
  if (htmlPath !== undefined) {
    await writeFileAtomic(htmlPath, renderReportPage(content));
    written.push(htmlPath);
  }
  if (plotsDirectory !== undefined) {
    const charts = reportCharts(content);
    for (const chart of [...charts.model, ...charts.detection, ...charts.patches]) {
      const path = join(plotsDirectory, `${chart.name}.png`);
      await writeFileAtomic(path, await svgToPng(chart.svg));
      written.push(path);
    }
  }
  return written;
}

/** What assembleReportContent needs: the cascade file and whichever evaluations were run. */
export interface ReportInputs {
  readonly title: string;
  readonly modelPath: string;
  readonly detector: DetectorCascade;
  readonly model?: CascadeModel;
  readonly writtenBy: string;
  readonly detection?: {
    readonly truthPath: string;
    readonly imagePaths: readonly string[];
    readonly entries: readonly ImageDetectionsAndTruth[];
    readonly evaluation: DetectionEvaluation;
    readonly speed?: ScanSummary;
    readonly scan: ScanOptions;
  };
  readonly patches?: {
    readonly positivesPath: string;
    readonly negativesPath: string;
    readonly evaluation: PatchEvaluation;
    /** The evaluated patches: packed samples, the windows themselves and their files, in the same order. */
    readonly positives: LabelledPatches;
    readonly negatives: LabelledPatches;
  };
}

/** Patches of one label as evaluated: samples for the cascade, windows for thumbnails, files for captions. */
export interface LabelledPatches {
  readonly samples: WindowSamples;
  readonly windows: readonly GrayImage[];
  readonly sources: readonly string[];
}

/** Thumbnails of patch-level cases: the whole window, outlined, captioned with its file and depth. */
async function patchThumbnails(cases: readonly PatchCase[], patches: LabelledPatches, colour: RgbColour, withScore: boolean): Promise<CaseThumbnail[]> {
  const thumbnails: CaseThumbnail[] = [];
  for (const item of cases) {
    const window = patches.windows[item.sample]!;
    const box: Box = [0, 0, window.width, window.height];
    thumbnails.push({
      file: patches.sources[item.sample] ?? `patch ${item.sample + 1}`, box, thumbnail: pngDataUri(await boxThumbnailPng(window, box, colour)),
      stagesPassed: item.stagesPassed, ...(withScore ? { score: item.score } : {}),
    });
  }
  return thumbnails;
}

/**
 * The content of a report page: picks the cases to act on with the
 * evaluation's own IoU threshold (findCasesToReview) or, for patches, with the
 * cascade's own decision (findPatchCases), makes their thumbnails, and draws
 * the feature sheet of a full model.
 */
export async function assembleReportContent(inputs: ReportInputs): Promise<ReportContent> {
  let detection: DetectionSection | undefined;
  if (inputs.detection !== undefined) {
    const d = inputs.detection;
    const cases = findCasesToReview(d.entries, d.evaluation.iouThreshold);
    const thumbnails = await caseThumbnails(cases, d.imagePaths, inputs.detector, d.scan);
    detection = {
      truthPath: d.truthPath, evaluation: d.evaluation, ...(d.speed === undefined ? {} : { speed: d.speed }),
      missed: thumbnails.missed, missedTotal: cases.missedTotal, falseAlarms: thumbnails.falseAlarms, falseAlarmTotal: cases.falseAlarmTotal,
    };
  }
  let patches: PatchSection | undefined;
  if (inputs.patches !== undefined) {
    const p = inputs.patches;
    const cases = findPatchCases(cascadeDepthScores(inputs.detector, p.positives.samples), cascadeDepthScores(inputs.detector, p.negatives.samples), inputs.detector.stages.length);
    patches = {
      positivesPath: p.positivesPath, negativesPath: p.negativesPath, positives: p.positives.samples.count, negatives: p.negatives.samples.count, evaluation: p.evaluation,
      missed: await patchThumbnails(cases.missed, p.positives, TRUTH_COLOUR, false), missedTotal: cases.missedTotal,
      falseAlarms: await patchThumbnails(cases.falseAlarms, p.negatives, DETECTION_COLOUR, true), falseAlarmTotal: cases.falseAlarmTotal,
    };
  }
  return {
    title: inputs.title,
    modelPath: inputs.modelPath,
    detector: inputs.detector,
    writtenBy: inputs.writtenBy,
    ...(inputs.model === undefined ? {} : { model: inputs.model, featureSheet: await featureSheetDataUri(inputs.model) }),
    ...(detection === undefined ? {} : { detection }),
    ...(patches === undefined ? {} : { patches }),
  };
}
