import { RectboostError } from '../errors.js';
import { nodePlace } from '../detect/compiled-cascade.js';
import { cascadeUsesTiltedFeatures, isDetectorTree, type DetectorCascade, type DetectorStump, type DetectorWeakClassifier } from '../detect/detector-cascade.js';

/** The texts of runtime-c/ that every export shares: the header with @NAME@ placeholders and the detector code. */
export interface CDetectorTemplates {
  readonly header: string;
  readonly core: string;
}

/** Files of a C99 export, and its footprint. */
export interface CDetectorExport {
  /** rectboost_detector.h */
  readonly header: string;
  /** rectboost_detector.c: the cascade as static const tables, then the detector code. */
  readonly source: string;
  /** Bytes of the cascade tables (read-only data) in each build; the C function rbd_table_bytes() gives the same. */
  readonly tableBytes: { readonly float: number; readonly integer: number };
  /** Fractional bits of the integer build's feature values and split values (RBD_VALUE_BITS). */
  readonly valueBits: number;
}

/** Fractional bits of the integer build's votes and thresholds (RBD_VOTE_BITS in the header). */
export const C_VOTE_BITS = 24;
/** Largest window (pixels) the integer build scans: 255² · n ≤ 2³² − 1 (RBD_MAX_WINDOW_PIXELS). */
export const C_INTEGER_MAX_WINDOW_PIXELS = 66051;

/**
 * Writes a cascade as a self-contained C99 detector (runtime-c/ holds the
 * shared code; see rectboost_detector.h there for both builds and the API).
 *
 * Tables: stage ends and classifier ends (uint32), rectangles x, y, width,
 * height (uint16), and per build the numbers: the float build's doubles
 * exactly as in the cascade (shortest round-trip decimal literals); the
 * integer build's weight · width · height · 2^Q per rectangle, split values
 * · 2^Q and votes and thresholds · 2^24, rounded (Math.round).
 *
 * Q (valueBits) is the largest number of bits ≤ 24 for which no 64-bit product
 * of the integer build can overflow: with B the largest Σ |weight| · area of a
 * classifier, a feature value is at most 255 · B · 2^Q and is multiplied by
 * n · 2^7 ≤ 66,051 · 128; a split value times 2^7 · n · σ ≤ 2^7 · 66,051 · 127.5.
 * Decision trees are written as their heap-order split records (rbd_node_place says where
 * each sits in its tree, as compileCascadeAtScale's nodePlace), and the detector follows a
 * window's path through them.
 * Tilted rectangles (extended set): RBD_TILTED is 1 and rbd_rectangle_tilted marks them; the
 * detector then builds the rotated table after the upright one and scales them as
 * scaleRectangle does.
 * @throws RectboostError `bad-model` when no Q ≥ 4 fits (then the integer build would be too coarse).
 */
export function exportCDetector(cascade: DetectorCascade, templates: CDetectorTemplates, label: string): CDetectorExport {
  // A stump is one record; a tree its heap-order splits, as compileCascadeAtScale lays them out.
  const stages = cascade.stages.map((stage) => ({ threshold: stage.threshold, votes: stage.weakClassifiers.length, weakClassifiers: nodeRecords(stage.weakClassifiers) }));
  const classifiers = stages.flatMap((stage) => stage.weakClassifiers);
  const rectangles = classifiers.flatMap((weak) => weak.rectangles);
  const stageEnds: number[] = [];
  const classifierEnds: number[] = [];
  let classifierCount = 0;
  let rectangleCount = 0;
  for (const stage of stages) {
    for (const weak of stage.weakClassifiers) {
      rectangleCount += weak.rectangles.length;
      classifierEnds.push(rectangleCount);
    }
    classifierCount += stage.weakClassifiers.length;
    stageEnds.push(classifierCount);
  }
  const valueBits = integerValueBits(stages, label);
  const scaleValue = 2 ** valueBits;
  const scaleVote = 2 ** C_VOTE_BITS;
  const lines: string[] = [];
  // C99 has no empty arrays: an empty table holds one unused zero.
  const table = (type: string, name: string, values: readonly string[], perLine = 6, row = ''): void => {
    const padded = values.length === 0 ? [row === '' ? '0' : '{0, 0, 0, 0}'] : values;
    lines.push(`static const ${type} ${name}[${padded.length}]${row} = {`);
    for (let i = 0; i < padded.length; i += perLine) lines.push(`  ${padded.slice(i, i + perLine).join(', ')},`);
    lines.push('};');
  };
  lines.push(`/* rectboost_detector.c, written by rectboost export from ${label}: the cascade as tables, then the detector. */`);
  lines.push('#include "rectboost_detector.h"', '');
  table('uint32_t', 'rbd_stage_end', stageEnds.map(String), 12);
  table('uint32_t', 'rbd_classifier_end', classifierEnds.map(String), 12);
  table('uint32_t', 'rbd_node_place', classifiers.map((w) => String(w.place)), 12);
  table('uint16_t', 'rbd_rectangle', rectangles.map((r) => `{${r.x}, ${r.y}, ${r.width}, ${r.height}}`), 4, '[4]');
  const tilted = cascadeUsesTiltedFeatures(cascade);
  lines.push(`#define RBD_TILTED ${tilted ? 1 : 0}`);
  if (tilted) table('uint8_t', 'rbd_rectangle_tilted', rectangles.map((r) => (r.tilted === true ? '1' : '0')), 24);
  const tiltedBytes = tilted ? ' + sizeof rbd_rectangle_tilted' : '';
  lines.push('#ifdef RBD_INTEGER', `#define RBD_VALUE_BITS ${valueBits}`);
  table('int64_t', 'rbd_rectangle_weight_area', rectangles.map((r) => cInteger(r.weight * r.width * r.height * scaleValue)));
  // Each vote is rounded by at most half a unit, so a stage of m votes sums to within m/2 units of
  // the exact sum: lowering the threshold by m/2 units keeps every window whose exact sum reaches
  // it, including the many exact ties (training sets thresholds at a positive's own sum of votes).
  table('int64_t', 'rbd_threshold', stages.map((s) => `${Math.floor(s.threshold * scaleVote - s.votes / 2)}LL`));
  // The score counts each margin from the threshold itself (rounded), not from the lowered one, so
  // the integer build's scores stay within the votes' rounding of the float build's.
  table('int64_t', 'rbd_score_threshold', stages.map((s) => cInteger(s.threshold * scaleVote)));
  table('int64_t', 'rbd_split', classifiers.map((w) => cInteger(w.splitValue * scaleValue)));
  table('int64_t', 'rbd_below', classifiers.map((w) => cInteger(w.belowOutput * scaleVote)));
  table('int64_t', 'rbd_above', classifiers.map((w) => cInteger(w.aboveOutput * scaleVote)));
  lines.push('#define RBD_TABLE_BYTES (sizeof rbd_stage_end + sizeof rbd_classifier_end + sizeof rbd_node_place + sizeof rbd_rectangle + sizeof rbd_rectangle_weight_area \\');
  lines.push(`  + sizeof rbd_threshold + sizeof rbd_score_threshold + sizeof rbd_split + sizeof rbd_below + sizeof rbd_above${tiltedBytes})`);
  lines.push('#else');
  table('double', 'rbd_rectangle_weight', rectangles.map((r) => cDouble(r.weight)));
  table('double', 'rbd_threshold', stages.map((s) => cDouble(s.threshold)));
  table('double', 'rbd_split', classifiers.map((w) => cDouble(w.splitValue)));
  table('double', 'rbd_below', classifiers.map((w) => cDouble(w.belowOutput)));
  table('double', 'rbd_above', classifiers.map((w) => cDouble(w.aboveOutput)));
  lines.push('#define RBD_TABLE_BYTES (sizeof rbd_stage_end + sizeof rbd_classifier_end + sizeof rbd_node_place + sizeof rbd_rectangle + sizeof rbd_rectangle_weight \\');
  lines.push(`  + sizeof rbd_threshold + sizeof rbd_split + sizeof rbd_below + sizeof rbd_above${tiltedBytes})`);
  lines.push('#endif', '');
  const header = templates.header
    .replaceAll('@SOURCE@', label.replaceAll('*/', '* /'))
    .replaceAll('@WINDOW_WIDTH@', String(cascade.windowWidth))
    .replaceAll('@WINDOW_HEIGHT@', String(cascade.windowHeight))
    .replaceAll('@STAGE_COUNT@', String(stages.length))
    .replaceAll('@CLASSIFIER_COUNT@', String(classifiers.length))
    .replaceAll('@RECTANGLE_COUNT@', String(rectangles.length));
  const counts = { stages: Math.max(1, stages.length), classifiers: Math.max(1, classifiers.length), rectangles: Math.max(1, rectangles.length) };
  const numbers = 4 * counts.stages + 4 * counts.classifiers + 4 * counts.classifiers + 8 * counts.rectangles + 8 * counts.rectangles + 8 * counts.stages + 3 * 8 * counts.classifiers
    + (tilted ? counts.rectangles : 0);
  return {
    header,
    source: `${lines.join('\n')}\n${templates.core}`,
    // Both builds keep one 8-byte number per rectangle, stage and classifier field (double or int64);
    // the integer build a second threshold per stage, the one its scores count from.
    tableBytes: { float: numbers, integer: numbers + 8 * counts.stages },
    valueBits,
  };
}

/**
 * Bytes of work memory that rbd_work_bytes(width, height, hitCapacity) asks for
 * (x86-64 and other targets with 8-byte doubles and int64): two integral tables
 * of (width + 1)(height + 1) entries (8 bytes each in the float build, 4 in the
 * integer build), the corners of one scale, and per raw hit its box and score,
 * five index arrays and one detection.
 */
export function cWorkBytes(cascade: DetectorCascade, build: 'float' | 'integer', width: number, height: number, hitCapacity: number): number {
  const align = (bytes: number): number => Math.ceil(bytes / 8) * 8;
  const records = cascade.stages.flatMap((stage) => nodeRecords(stage.weakClassifiers));
  const rectangles = Math.max(1, records.reduce((n, record) => n + record.rectangles.length, 0));
  const classifiers = Math.max(1, records.length);
  const entry = build === 'float' ? 8 : 4;
  const entries = (width + 1) * (height + 1);
  // With tilted features: the rotated table after the upright one, and two rows of ray sums.
  const tilted = cascadeUsesTiltedFeatures(cascade);
  const tables = align((tilted ? 2 : 1) * entries * entry) + align(entries * entry) + (tilted ? 2 * align((width + 1) * entry) : 0);
  // rbd_hit: four int32 and an 8-byte score; rbd_detection: four 8-byte box values, an 8-byte score, int32 support (padded to 48).
  const perHit = 24 + 5 * 4 + 48;
  return tables + align(4 * 4 * rectangles) + align(8 * 4 * rectangles) + align(4 * classifiers) + hitCapacity * perHit + 64;
}

/** One record of the C tables: a stump, or one split of a tree (its place as nodePlace gives it). */
interface CNodeRecord {
  readonly rectangles: DetectorStump['rectangles'];
  readonly splitValue: number;
  readonly belowOutput: number;
  readonly aboveOutput: number;
  readonly place: number;
}

/** The records of one stage: one per stump, 2^d − 1 per tree of depth d (bottom splits carry the leaves). */
function nodeRecords(weakClassifiers: readonly DetectorWeakClassifier[]): CNodeRecord[] {
  return weakClassifiers.flatMap((weak): CNodeRecord[] => {
    if (!isDetectorTree(weak)) return [{ ...weak, place: nodePlace(0, 1) }];
    const count = weak.splits.length;
    const bottom = count >>> 1;
    return weak.splits.map((split, k) => ({
      rectangles: split.rectangles,
      splitValue: split.splitValue,
      belowOutput: k >= bottom ? weak.leaves[2 * (k - bottom)]! : 0,
      aboveOutput: k >= bottom ? weak.leaves[2 * (k - bottom) + 1]! : 0,
      place: nodePlace(k, count),
    }));
  });
}

function integerValueBits(stages: ReadonlyArray<{ readonly weakClassifiers: readonly CNodeRecord[] }>, label: string): number {
  let largestSum = 1;
  let largestSplit = 1;
  for (const stage of stages) {
    for (const weak of stage.weakClassifiers) {
      // A tilted rectangle covers 2 · width · height pixels.
      largestSum = Math.max(largestSum, weak.rectangles.reduce((n, r) => n + Math.abs(r.weight) * r.width * r.height * (r.tilted === true ? 2 : 1), 0) + weak.rectangles.length);
      largestSplit = Math.max(largestSplit, Math.abs(weak.splitValue));
    }
  }
  // Factor 2 of room below 2^63 on both sides.
  const countTimes = C_INTEGER_MAX_WINDOW_PIXELS * 128;
  const fromValues = Math.floor(Math.log2(2 ** 62 / (255 * largestSum * countTimes)));
  const fromSplits = Math.floor(Math.log2(2 ** 62 / (largestSplit * countTimes * 128)));
  const bits = Math.min(24, fromValues, fromSplits);
  if (bits < 4) {
    throw new RectboostError('bad-model', `Cascade ${label} has feature weights or split values too large for the integer C build (it would keep only ${bits} fractional bits); use the float build.`);
  }
  return bits;
}

/** A double as a C literal that reads back to the same value (JavaScript's shortest round-trip form). */
export function cDouble(value: number): string {
  if (Object.is(value, -0)) return '-0.0';
  const text = String(value);
  return /[.e]/.test(text) ? text : `${text}.0`;
}

function cInteger(value: number): string {
  return `${Math.round(value)}LL`;
}
