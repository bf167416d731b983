import type { Command } from 'commander';
import { MERGE_METHODS, type MergeOptions } from '../detect/merge-detections.js';
import type { ScanOptions } from '../detect/scan-image.js';
import { parseChoice, parseInteger, parseNumber } from './parse-options.js';

/** Raw option strings shared by detect and evaluate. */
export interface ScanOptionText {
  scaleStep: string;
  shift: string;
  smallest?: string;
  largest?: string;
  merge: string;
  overlap: string;
  minSupport: string;
  concurrency: string;
  workers?: string;
  quiet?: boolean;
}

/** Adds the scan and merge options of DESIGN §2 to a command. */
export function addScanOptions(command: Command): Command {
  return command
    .option('--scale-step <ratio>', 'ratio between successive window sizes', '1.25')
    .option('--shift <pixels>', 'window shift in model-window pixels (times the scale)', '1')
    .option('--smallest <pixels>', 'smallest window side to scan')
    .option('--largest <pixels>', 'largest window side to scan')
    .option('--merge <method>', 'how raw hits become detections: nms, mean or none', 'nms')
    .option('--overlap <iou>', 'IoU above which hits overlap when merging', '0.3')
    .option('--min-support <count>', 'keep detections backed by at least this many raw hits', '1')
    .option('--concurrency <count>', 'images decoded at once', '4')
    .option('--workers <count>', 'scan threads (default: all cores; 0 = no threads)')
    .option('--quiet', 'no progress line on stderr');
}

/** Parses the shared options; usage errors name the option. */
export function parseScanOptions(text: ScanOptionText): { scan: ScanOptions; merge: MergeOptions; concurrency: number; workers?: number } {
  const scan: ScanOptions = {
    scaleStep: parseNumber('--scale-step', text.scaleStep, 1.0001, 4),
    shift: parseNumber('--shift', text.shift, 0.01, 64),
    ...(text.smallest === undefined ? {} : { smallestSide: parseInteger('--smallest', text.smallest, 1, 1 << 26) }),
    ...(text.largest === undefined ? {} : { largestSide: parseInteger('--largest', text.largest, 1, 1 << 26) }),
  };
  const merge: MergeOptions = {
    method: parseChoice('--merge', text.merge, MERGE_METHODS),
    overlap: parseNumber('--overlap', text.overlap, 0, 1),
    minSupport: parseInteger('--min-support', text.minSupport, 1, 1_000_000),
  };
  return {
    scan,
    merge,
    concurrency: parseInteger('--concurrency', text.concurrency, 1, 256),
    ...(text.workers === undefined ? {} : { workers: parseInteger('--workers', text.workers, 0, 256) }),
  };
}
