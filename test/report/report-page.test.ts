import { readFileSync } from 'node:fs';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { parseCascadeModel } from '../../src/cascade/model-json.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { createGrayImage } from '../../src/image/gray-image.js';
import { DETECTION_COLOUR } from '../../src/io/draw-boxes.js';
import { boxThumbnailPng } from '../../src/io/report-files.js';
import { evaluateDetections } from '../../src/metrics/detection-evaluation.js';
import { renderReportPage, REPORT_DATA_ID, type ReportContent } from '../../src/report/report-page.js';

const MODEL_PATH = new URL('../fixtures/demo-cascade.json', import.meta.url);
const model = parseCascadeModel(readFileSync(MODEL_PATH, 'utf8'), 'demo-cascade.json');

function page(extra: Partial<ReportContent> = {}): string {
  return renderReportPage({ title: 'T', modelPath: 'm.json', detector: detectorCascadeFromModel(model), model, writtenBy: 'test', ...extra });
}

describe('renderReportPage', () => {
  it('is one offline document: a policy forbidding every fetch, images only as data URIs, no executable script', () => {
    const evaluation = evaluateDetections([{ truth: [[0, 0, 10, 10]], detections: [{ box: [0, 0, 10, 10], score: 1 }] }]);
    const html = page({
      detection: { truthPath: 't.jsonl', evaluation, missed: [], missedTotal: 0, falseAlarms: [], falseAlarmTotal: 0 },
      featureSheet: 'data:image/png;base64,AAAA',
    });
    expect(html).toContain(`<meta http-equiv='Content-Security-Policy' content="default-src 'none'; img-src data:; style-src 'unsafe-inline'">`);
    const sources = [...html.matchAll(/\ssrc='([^']*)'/g)].map((m) => m[1]!);
    expect(sources.length).toBeGreaterThan(0);
    expect(sources.every((s) => s.startsWith('data:'))).toBe(true);
    // The only URL-like text is the SVG namespace name, which is never fetched.
    expect([...new Set(html.match(/https?:\/\/[^'"\s<]*/g))]).toEqual(['http://www.w3.org/2000/svg']);
    expect([...html.matchAll(/<script([^>]*)>/g)].map((m) => m[1])).toEqual([` type='application/json' id='${REPORT_DATA_ID}'`]);
  });

  it('keeps "<" out of the data block so a file name cannot end the script element', () => {
    const html = page({ modelPath: 'odd</script><b>.json' });
    const block = html.slice(html.indexOf(`id='${REPORT_DATA_ID}'>`));
    expect(block.indexOf('</script>')).toBe(block.lastIndexOf('</script>'));
    expect(JSON.parse(block.slice(block.indexOf('>') + 1, block.indexOf('</script>'))).model).toBe('odd</script><b>.json');
  });

  it('shows a runtime export (no training records) with its stage table and one chart', () => {
    const html = renderReportPage({ title: 'T', modelPath: 'r.json', detector: detectorCascadeFromModel(model), writtenBy: 'test' });
    expect(html.match(/<svg /g)).toHaveLength(1);
    expect(html).toContain('no training record');
  });
});

describe('boxThumbnailPng', () => {
  it('crops the box with half its size around it, enlarges by a whole factor and outlines the box', async () => {
    const image = createGrayImage(40, 40, new Uint8Array(1600).fill(100));
    // Box [10, 10, 10, 10]: margin 5 → crop [5, 5, 20, 20]; zoom round(128 / 20) = 6 → 120 × 120;
    // the outline starts at (10 − 5) · 6 = 30 and the inside at 30 + 2 (2-pixel outline) shows the image.
    const { data, info } = await sharp(await boxThumbnailPng(image, [10, 10, 10, 10], DETECTION_COLOUR)).raw().toBuffer({ resolveWithObject: true });
    expect([info.width, info.height]).toEqual([120, 120]);
    const pixel = (x: number, y: number): number[] => Array.from(data.subarray((y * 120 + x) * info.channels, (y * 120 + x) * info.channels + 3));
    expect(pixel(30, 45)).toEqual([...DETECTION_COLOUR]);
    expect(pixel(45, 45)).toEqual([100, 100, 100]);
    expect(pixel(5, 5)).toEqual([100, 100, 100]);
  });
});
