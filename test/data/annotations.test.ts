import { describe, expect, it } from 'vitest';
import { parseAnnotations } from '../../src/data/annotations.js';
import { isRectboostError } from '../../src/errors.js';

function problem(text: string): string {
  try {
    parseAnnotations(text, '/data/truth.jsonl');
  } catch (error) {
    expect(isRectboostError(error, 'bad-annotation')).toBe(true);
    return (error as Error).message;
  }
  throw new Error('expected a bad-annotation error');
}

describe('annotation files', () => {
  it('reads JSON Lines with paths relative to the file, skipping blank lines', () => {
    const entries = parseAnnotations('{"image": "scenes/p01.png", "boxes": [[1, 2, 3, 4]]}\n\n{"image": "p02.png", "boxes": []}\n', '/data/truth.jsonl');
    expect(entries.map((e) => e.annotated)).toEqual([
      { image: '/data/scenes/p01.png', boxes: [[1, 2, 3, 4]] },
      { image: '/data/p02.png', boxes: [] },
    ]);
    expect(entries.map((e) => e.where)).toEqual(['line 1', 'line 3']);
  });

  it('reads COCO-style JSON, grouping annotations by image id', () => {
    const coco = { images: [{ id: 1, file_name: 'a.png' }, { id: 2, file_name: 'b.png' }], annotations: [{ image_id: 2, bbox: [0, 0, 5, 6] }, { image_id: 2, bbox: [9, 9, 1, 1] }] };
    expect(parseAnnotations(JSON.stringify(coco), '/data/coco.json').map((e) => e.annotated)).toEqual([
      { image: '/data/a.png', boxes: [] },
      { image: '/data/b.png', boxes: [[0, 0, 5, 6], [9, 9, 1, 1]] },
    ]);
  });

  it('names file, line and box for a negative size', () => {
    expect(problem('{"image": "a.png", "boxes": [[0, 0, 5, 5], [0, 0, 5, -1]]}')).toBe('Annotation file /data/truth.jsonl, line 1, box 2 has width 5 and height -1; both must be positive.');
  });

  it('names the line of malformed JSON, of a missing image field, and of a short box', () => {
    expect(problem('{"image": "a.png", "boxes": []}\n{"image": "b.png", "boxes": [}')).toMatch(/truth\.jsonl, line 2 is not valid JSON/);
    expect(problem('{"boxes": []}')).toMatch(/line 1 needs "image"/);
    expect(problem('{"image": "a.png", "boxes": [[1, 2, 3]]}')).toMatch(/line 1, box 1 must be \[x, y, width, height\]/);
  });

  it('names the COCO entry that refers to an unknown image', () => {
    expect(problem(JSON.stringify({ images: [{ id: 1, file_name: 'a.png' }], annotations: [{ image_id: 3, bbox: [0, 0, 1, 1] }] }))).toMatch(/annotations\[0\] refers to image_id 3/);
  });
});
