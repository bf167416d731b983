import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { REPORT_DATA_ID } from '../../src/report/report-page.js';
import { CHART_SIZE } from '../../src/report/svg-chart.js';
import { launchChromium, shouldRunBrowserTests, type OpenedPage } from '../helpers/chromium.js';
import { runCli } from '../helpers/run-cli.js';

// Inputs: the committed demo cascade (8 stages, 40 weak classifiers, made by rectboost train on the
// shipped demo data) and the shipped demo test panels with their truth file.
const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const MODEL = join(ROOT, 'test/fixtures/demo-cascade.json');
const TRUTH = join(ROOT, 'demo-patches/scenes/truth.jsonl');
const STAGES = 8;
const folder = mkdtempSync(join(tmpdir(), 'rectboost-report-'));
const path = (name: string): string => join(folder, name);

interface EvaluateJson {
  averagePrecision: number;
  truthCount: number;
  detectionCount: number;
  truePositives: number;
  logAverageMissRate: number;
  detectionRateAtFalsePositives: Record<string, number>;
  precisionRecall: Array<{ score: number; precision: number; recall: number }>;
  missRateByFalsePositivesPerImage: Array<{ falsePositivesPerImage: number; missRate: number }>;
}

/** What the page shows, read in the browser. */
interface PageFacts {
  charts: Record<string, { curves: number[]; bars: number }>;
  thumbnails: number[];
  featureSheetWidth: number;
  data: {
    detection?: EvaluateJson & { missedTotal: number; falseAlarmTotal: number };
    patches?: { roc: { falsePositiveRate: number[] }; detectionRate: number; falsePositiveRate: number; missedTotal: number; falseAlarmTotal: number };
  };
  figures: Record<string, string>;
  text: string;
}

/**
 * Runs in the page (plain JavaScript: the project's TypeScript has no DOM types):
 * counts each chart's curve vertices and bars, reads the thumbnails' natural
 * widths, the figure cards, the embedded data block and the visible text.
 */
const PAGE_PROBE = `(dataId) => {
  const charts = {};
  for (const svg of document.querySelectorAll('svg.chart')) {
    charts[svg.getAttribute('data-chart')] = {
      curves: [...svg.querySelectorAll('polyline.series')].map((p) => (p.getAttribute('points') || '').split(' ').filter((v) => v !== '').length),
      bars: svg.querySelectorAll('rect.bar').length,
    };
  }
  const figures = {};
  for (const f of document.querySelectorAll('.figure')) figures[f.querySelector('.label').textContent] = f.querySelector('.value').textContent;
  const sheet = document.querySelector('img.sheet');
  return {
    charts,
    thumbnails: [...document.querySelectorAll('img.thumb')].map((img) => (img.complete ? img.naturalWidth : 0)),
    featureSheetWidth: sheet && sheet.complete ? sheet.naturalWidth : 0,
    data: JSON.parse(document.getElementById(dataId).textContent),
    figures,
    text: document.body.innerText,
  };
}`;

async function factsOf(opened: OpenedPage): Promise<PageFacts> {
  return (await opened.page.evaluate(`(${PAGE_PROBE})(${JSON.stringify(REPORT_DATA_ID)})`)) as PageFacts;
}

function cli(args: string[]): string {
  const result = runCli(args);
  expect(result.stderr).not.toMatch(/error|Error/);
  expect(result.status).toBe(0);
  return result.stdout;
}

describe.skipIf(!shouldRunBrowserTests())('the HTML report in headless chromium', () => {
  let browser: Awaited<ReturnType<typeof launchChromium>>;
  const opened = new Map<string, { page: OpenedPage; facts: PageFacts }>();
  let evaluation: EvaluateJson;

  beforeAll(async () => {
    // 1. Default scan and NMS merging: some rivets missed, many false alarms.
    cli(['report', MODEL, '--truth', TRUTH, '--out', path('nms.html'), '--plots', path('plots'), '--quiet']);
    cli(['evaluate', MODEL, '--truth', TRUTH, '--json', path('nms.json'), '--quiet']);
    evaluation = JSON.parse(readFileSync(path('nms.json'), 'utf8')) as EvaluateJson;
    // 2. Mean merging as in the demo: every rivet found (141 of 141, README walkthrough).
    cli(['report', MODEL, '--truth', TRUTH, '--merge', 'mean', '--overlap', '0.5', '--min-support', '3', '--out', path('all-found.html'), '--quiet']);
    // 3. No window side above 10 pixels fits a 24×24 model: no scale is scanned, so no detections.
    cli(['report', MODEL, '--truth', TRUTH, '--largest', '10', '--out', path('none.html'), '--quiet']);
    // 4. A one-stage model (the demo cascade's first stage), model only.
    const model = JSON.parse(readFileSync(MODEL, 'utf8')) as { stages: unknown[] };
    writeFileSync(path('one-stage.json'), JSON.stringify({ ...model, stages: model.stages.slice(0, 1) }));
    cli(['report', path('one-stage.json'), '--out', path('one-stage.html')]);
    // 5. Patch mode: 30 rivet patches and 2 panel windows labelled as rivets, against 30 panel windows and
    //    3 rivet patches labelled as panels, so that there are rejected positives and accepted negatives.
    mkdirSync(path('rivets'));
    mkdirSync(path('panels'));
    const rivet = (k: number): string => join(ROOT, `demo-patches/positives/rivet-${String(k).padStart(4, '0')}.png`);
    for (let k = 1; k <= 30; k++) copyFileSync(rivet(k), path(`rivets/r${k}.png`));
    for (let k = 31; k <= 33; k++) copyFileSync(rivet(k), path(`panels/mislabelled-r${k}.png`));
    for (let k = 0; k < 32; k++) {
      const panel = join(ROOT, `demo-patches/backgrounds/panel-0${1 + (k % 2)}.png`);
      const target = k < 30 ? path(`panels/n${k}.png`) : path(`rivets/mislabelled-n${k}.png`);
      await sharp(panel).extract({ left: 10 + 37 * (k % 8), top: 10 + 50 * Math.floor(k / 8), width: 24, height: 24 }).png().toFile(target);
    }
    cli(['report', MODEL, '--positives', path('rivets'), '--negatives', path('panels'), '--out', path('patches.html')]);

    browser = await launchChromium();
    for (const name of ['nms', 'all-found', 'none', 'one-stage', 'patches']) {
      const page = await browser.open(path(`${name}.html`));
      opened.set(name, { page, facts: await factsOf(page) });
    }
  }, 120_000);

  afterAll(async () => {
    await browser?.close();
  });

  it('every page renders with no console error and makes no network request', () => {
    for (const [name, { page }] of opened) {
      expect({ name, errors: page.errors, requests: page.requests }).toEqual({ name, errors: [], requests: [] });
    }
  });

  it('would notice a request or an error: the same page with one outside image reference fails both checks', async () => {
    // Guards the check above: the page's content security policy blocks the fetch and says so on the console.
    const html = readFileSync(path('nms.html'), 'utf8').replace('</main>', "<img src='http://192.0.2.1/x.png'></main>");
    writeFileSync(path('tampered.html'), html);
    const tampered = await browser.open(path('tampered.html'));
    expect(tampered.errors.length + tampered.requests.length).toBeGreaterThan(0);
  });

  it('draws every chart of a detection report with one vertex per curve point and one bar per stage', () => {
    const { charts } = opened.get('nms')!.facts;
    expect(Object.keys(charts).sort()).toEqual(['false-positive-rates', 'mining-effort', 'miss-rate', 'precision-recall', 'rejected-by-stage', 'weak-classifiers']);
    expect(charts['precision-recall']!.curves).toEqual([evaluation.precisionRecall.length]);
    expect(charts['miss-rate']!.curves).toEqual([evaluation.missRateByFalsePositivesPerImage.length]);
    expect(charts['false-positive-rates']!.curves).toEqual([STAGES, STAGES]);
    for (const bars of ['weak-classifiers', 'mining-effort', 'rejected-by-stage']) expect(charts[bars]!.bars).toBe(STAGES);
  });

  it('shows the curve numbers of evaluate --json for the same run', () => {
    const { data, figures } = opened.get('nms')!.facts;
    const detection = data.detection!;
    expect(detection.precisionRecall).toEqual(evaluation.precisionRecall);
    expect(detection.missRateByFalsePositivesPerImage).toEqual(evaluation.missRateByFalsePositivesPerImage);
    expect(detection.averagePrecision).toBe(evaluation.averagePrecision);
    expect(detection.detectionRateAtFalsePositives).toEqual(evaluation.detectionRateAtFalsePositives);
    expect(detection.logAverageMissRate).toBe(evaluation.logAverageMissRate);
    expect(figures['average precision']).toBe(evaluation.averagePrecision.toFixed(4));
    expect(figures['detection rate at 1 FP']).toBe(`${(100 * evaluation.detectionRateAtFalsePositives['1']!).toFixed(1)}%`);
  });

  it('shows decoded thumbnails of the missed objects and the top false alarms, each with its file, box and verdict', () => {
    const { facts } = opened.get('nms')!;
    const missed = facts.data.detection!.missedTotal;
    const falseAlarms = facts.data.detection!.falseAlarmTotal;
    // Missed = truth − matched and false alarms = detections − matched, as evaluate counts them.
    expect(missed).toBe(evaluation.truthCount - evaluation.truePositives);
    expect(falseAlarms).toBe(evaluation.detectionCount - evaluation.truePositives);
    expect(missed).toBeGreaterThan(0);
    expect(facts.thumbnails).toHaveLength(Math.min(24, missed) + Math.min(24, falseAlarms));
    expect(facts.thumbnails.every((width) => width > 0)).toBe(true);
    expect(facts.featureSheetWidth).toBeGreaterThan(0);
    expect(facts.text).toMatch(/(rejected by stage \d of 8|passed all 8 stages)/);
    expect(facts.text).toMatch(/p0\d\.png\s+box \[/);
  });

  it('renders an evaluation with no misses, one with no detections, and a one-stage model', () => {
    const allFound = opened.get('all-found')!.facts;
    expect(allFound.data.detection!.missedTotal).toBe(0);
    expect(allFound.text).toContain('No missed objects');
    const none = opened.get('none')!.facts;
    expect(none.data.detection!.detectionCount).toBe(0);
    expect(none.charts['precision-recall']!.curves).toEqual([0]);
    // The miss-rate curve keeps its "nothing detected" point (FPPI 0, miss rate 1).
    expect(none.charts['miss-rate']!.curves).toEqual([1]);
    expect(none.text).toContain('No false alarms');
    expect(none.text).toContain('no scan window fits this image');
    expect(none.thumbnails.every((width) => width > 0)).toBe(true);
    const one = opened.get('one-stage')!.facts;
    expect(one.charts['weak-classifiers']!.bars).toBe(1);
    expect(one.charts['false-positive-rates']!.curves).toEqual([1, 1]);
    expect(one.data.detection).toBeUndefined();
  });

  it('draws the ROC curve and per-stage pass rates of a patch evaluation, and shows its rejected positives and accepted negatives', () => {
    const { charts, data, thumbnails, text } = opened.get('patches')!.facts;
    const patches = data.patches!;
    expect(charts['roc']!.curves).toEqual([patches.roc.falsePositiveRate.length]);
    // Two bars (positives, negatives) per stage.
    expect(charts['stage-pass-rates']!.bars).toBe(2 * STAGES);
    // Case counts follow from the cascade's own rates: 32 positives and 33 negatives were evaluated.
    expect(patches.missedTotal).toBe(Math.round(32 * (1 - patches.detectionRate)));
    expect(patches.falseAlarmTotal).toBe(Math.round(33 * patches.falsePositiveRate));
    expect(patches.missedTotal + patches.falseAlarmTotal).toBeGreaterThan(0);
    expect(thumbnails).toHaveLength(patches.missedTotal + patches.falseAlarmTotal);
    expect(thumbnails.every((width) => width > 0)).toBe(true);
    expect(text).toMatch(/mislabelled-/);
  });

  it('writes the same charts as PNG plots at the SVG size', async () => {
    for (const name of Object.keys(opened.get('nms')!.facts.charts)) {
      const info = await sharp(path(`plots/${name}.png`)).metadata();
      expect([info.format, info.width, info.height]).toEqual(['png', CHART_SIZE.width, CHART_SIZE.height]);
    }
  });

  it('takes a full-page screenshot', async () => {
    const shot = path('report.png');
    await opened.get('nms')!.page.page.screenshot({ path: shot, fullPage: true });
    const info = await sharp(shot).metadata();
    expect(info.width).toBe(1400);
    expect(info.height).toBeGreaterThan(1000);
  });
});
