import { stat } from 'node:fs/promises';
import { dirname, isAbsolute, resolve } from 'node:path';
import { RectboostError } from '../errors.js';
import { readFileBytes } from '../io/read-file-bytes.js';
import type { Box } from '../metrics/intersection-over-union.js';

/** Boxes of one annotated image; `image` is resolved against the annotation file's folder. */
export interface AnnotatedImage {
  readonly image: string;
  readonly boxes: readonly Box[];
}

/**
 * Reads an annotation file in either of two layouts (DESIGN §3):
 *
 * - JSON Lines, one image per line: `{"image": "scenes/p01.png", "boxes": [[x, y, width, height], ...]}`
 *   (blank lines skipped; an optional `"version": 1` is accepted);
 * - COCO-style JSON, one object with `images: [{id, file_name}]` and
 *   `annotations: [{image_id, bbox: [x, y, width, height]}]` (Lin et al. 2014, the
 *   COCO data format); every listed image appears, with no boxes if it has none.
 *
 * Image paths are relative to the annotation file. Boxes need finite x, y ≥ 0 and
 * width, height > 0. Every image must exist.
 * @throws RectboostError `bad-annotation` naming the file, the line (JSON Lines) or
 *   entry (COCO), and the problem; `bad-annotation` when the file cannot be read.
 * @example const truth = await loadAnnotations('scenes/truth.jsonl');
 */
export async function loadAnnotations(path: string): Promise<AnnotatedImage[]> {
  const text = (await readFileBytes(path, 'bad-annotation', 'Annotation file')).toString('utf8');
  const entries = parseAnnotations(text, path);
  await Promise.all(
    entries.map(async (entry) => {
      try {
        const info = await stat(entry.annotated.image);
        if (!info.isFile()) throw new Error('not a file');
      } catch {
        throw new RectboostError('bad-annotation', `${entry.where} of ${path} names image ${entry.annotated.image}, which does not exist; fix the path (it is relative to the annotation file).`);
      }
    }),
  );
  return entries.map((entry) => entry.annotated);
}

/**
 * Parses annotation text (see loadAnnotations) without touching the disk;
 * `path` names the file in errors and anchors relative image paths.
 * @throws RectboostError `bad-annotation`.
 */
export function parseAnnotations(text: string, path: string): Array<{ annotated: AnnotatedImage; where: string }> {
  const folder = dirname(path);
  const trimmed = text.trimStart();
  if (trimmed.startsWith('{')) {
    let whole: unknown;
    try {
      whole = JSON.parse(text);
    } catch {
      whole = undefined; // not one JSON document: read as JSON Lines
    }
    if (typeof whole === 'object' && whole !== null && Array.isArray((whole as Record<string, unknown>)['images'])) {
      return parseCoco(whole as Record<string, unknown>, path, folder);
    }
  }
  const entries: Array<{ annotated: AnnotatedImage; where: string }> = [];
  text.split('\n').forEach((rawLine, index) => {
    const line = rawLine.trim();
    if (line === '') return;
    const where = `line ${index + 1}`;
    let value: unknown;
    try {
      value = JSON.parse(line);
    } catch {
      throw bad(path, where, 'is not valid JSON; each line must be {"image": "...", "boxes": [[x, y, width, height], ...]}');
    }
    if (typeof value !== 'object' || value === null || Array.isArray(value)) throw bad(path, where, 'must be a JSON object with "image" and "boxes"');
    const record = value as Record<string, unknown>;
    if (typeof record['image'] !== 'string' || record['image'] === '') throw bad(path, where, 'needs "image", a non-empty path string');
    if (!Array.isArray(record['boxes'])) throw bad(path, where, 'needs "boxes", an array of [x, y, width, height]');
    const boxes = record['boxes'].map((box, b) => checkBox(box, path, `${where}, box ${b + 1}`));
    entries.push({ annotated: { image: anchor(folder, record['image']), boxes }, where });
  });
  return entries;
}

function parseCoco(coco: Record<string, unknown>, path: string, folder: string): Array<{ annotated: AnnotatedImage; where: string }> {
  const byId = new Map<unknown, { image: string; boxes: Box[]; where: string }>();
  (coco['images'] as unknown[]).forEach((value, index) => {
    const where = `images[${index}]`;
    const image = value as Record<string, unknown> | null;
    if (typeof image !== 'object' || image === null || typeof image['file_name'] !== 'string' || (typeof image['id'] !== 'number' && typeof image['id'] !== 'string')) {
      throw bad(path, where, 'needs "id" (number or string) and "file_name" (string)');
    }
    if (byId.has(image['id'])) throw bad(path, where, `repeats image id ${JSON.stringify(image['id'])}`);
    byId.set(image['id'], { image: anchor(folder, image['file_name']), boxes: [], where });
  });
  const annotations = coco['annotations'] ?? [];
  if (!Array.isArray(annotations)) throw bad(path, 'annotations', 'must be an array');
  annotations.forEach((value, index) => {
    const where = `annotations[${index}]`;
    const annotation = value as Record<string, unknown> | null;
    if (typeof annotation !== 'object' || annotation === null) throw bad(path, where, 'must be an object with "image_id" and "bbox"');
    const target = byId.get(annotation['image_id']);
    if (!target) throw bad(path, where, `refers to image_id ${JSON.stringify(annotation['image_id'])}, which is not in "images"`);
    target.boxes.push(checkBox(annotation['bbox'], path, `${where}.bbox`));
  });
  return [...byId.values()].map(({ image, boxes, where }) => ({ annotated: { image, boxes }, where }));
}

function checkBox(value: unknown, path: string, where: string): Box {
  if (!Array.isArray(value) || value.length !== 4 || !value.every((v) => typeof v === 'number' && Number.isFinite(v))) {
    throw bad(path, where, `must be [x, y, width, height] with four finite numbers; received ${JSON.stringify(value)}`);
  }
  const [x, y, width, height] = value as [number, number, number, number];
  if (width <= 0 || height <= 0) throw bad(path, where, `has width ${width} and height ${height}; both must be positive`);
  if (x < 0 || y < 0) throw bad(path, where, `starts at (${x}, ${y}); x and y must not be negative`);
  return [x, y, width, height];
}

function anchor(folder: string, image: string): string {
  return isAbsolute(image) ? image : resolve(folder, image);
}

function bad(path: string, where: string, problem: string): RectboostError {
  return new RectboostError('bad-annotation', `Annotation file ${path}, ${where} ${problem}.`);
}
