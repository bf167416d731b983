import { formatRate } from '../cascade/build-cascade.js';
import type { CascadeModel } from '../cascade/cascade-model.js';
import type { DetectorCascade } from '../detect/detector-cascade.js';
import type { DetectionEvaluation, ScanSummary } from '../metrics/detection-evaluation.js';
import type { Box } from '../metrics/intersection-over-union.js';
import type { PatchEvaluation } from '../metrics/patch-evaluation.js';
import { detectionCharts, modelCharts, patchCharts, REPORT_COLOURS, stageRows, type NamedChart, type StageRow, type StagesToTabulate } from './report-charts.js';
import { escapeMarkup } from './svg-chart.js';

/** A thumbnail of one case to act on, already encoded (a `data:image/png;base64,…` URI). */
export interface CaseThumbnail {
  readonly file: string;
  readonly box: Box;
  readonly thumbnail: string;
  /** False alarms: the detection score. */
  readonly score?: number;
  /** Missed objects: stages the nearest scan window passed, and whether it was flat. */
  readonly stagesPassed?: number;
  readonly flat?: boolean;
}

/** Detection-level part of a report. */
export interface DetectionSection {
  readonly truthPath: string;
  readonly evaluation: DetectionEvaluation;
  readonly speed?: ScanSummary;
  readonly missed: readonly CaseThumbnail[];
  readonly missedTotal: number;
  readonly falseAlarms: readonly CaseThumbnail[];
  readonly falseAlarmTotal: number;
}

/** Patch-level part of a report. */
export interface PatchSection {
  readonly positivesPath: string;
  readonly negativesPath: string;
  readonly positives: number;
  readonly negatives: number;
  readonly evaluation: PatchEvaluation;
  /** Rejected positive patches and accepted negative ones, when the caller picked them. */
  readonly missed?: readonly CaseThumbnail[];
  readonly missedTotal?: number;
  readonly falseAlarms?: readonly CaseThumbnail[];
  readonly falseAlarmTotal?: number;
}

/** Everything one report page shows; all optional parts may be absent. */
export interface ReportContent {
  readonly title: string;
  readonly modelPath: string;
  /** Always present: a runtime export gives only this. */
  readonly detector: DetectorCascade;
  /** The full model, for the training records and provenance. */
  readonly model?: CascadeModel;
  /** The feature sheet over the mean positive, as a PNG data URI. */
  readonly featureSheet?: string;
  readonly detection?: DetectionSection;
  readonly patches?: PatchSection;
  /** Who wrote the page and when, e.g. "rectboost evaluate, 2026-12-02T06:00:00Z". */
  readonly writtenBy: string;
}

/** Id of the `<script type="application/json">` block that carries the page's figures as data. */
export const REPORT_DATA_ID = 'rectboost-report-data';

/** Every chart of a report, in page order (the same SVG text goes into the page and the PNG plots). */
export function reportCharts(content: ReportContent): { model: NamedChart[]; detection: NamedChart[]; patches: NamedChart[] } {
  return {
    model: modelCharts(stageRows(tabulated(content))),
    detection: content.detection ? detectionCharts(content.detection.evaluation, content.detection.speed) : [],
    patches: content.patches ? patchCharts(content.patches.evaluation) : [],
  };
}

/** What the stage table reads: the full model when there is one, else the detector's stages (a runtime export). */
function tabulated(content: ReportContent): StagesToTabulate {
  return content.model ?? { stages: content.detector.stages };
}

const percent = (value: number, digits = 1): string => `${(100 * value).toFixed(digits)}%`;

function table(head: readonly string[], rows: ReadonlyArray<readonly (string | number)[]>, className = ''): string {
  const cells = (row: readonly (string | number)[], tag: string): string => row.map((c) => `<${tag}>${escapeMarkup(String(c))}</${tag}>`).join('');
  const header = head.length > 0 ? `<thead><tr>${cells(head, 'th')}</tr></thead>` : '';
  return `<table class='${className}'>${header}<tbody>${rows.map((r) => `<tr>${cells(r, 'td')}</tr>`).join('')}</tbody></table>`;
}

function figure(label: string, value: string, hint = ''): string {
  return `<div class='figure'><div class='value'>${escapeMarkup(value)}</div><div class='label'>${escapeMarkup(label)}</div>${hint ? `<div class='hint'>${escapeMarkup(hint)}</div>` : ''}</div>`;
}

function chartGrid(charts: readonly NamedChart[]): string {
  return `<div class='charts'>${charts.map((c) => `<figure class='chart-frame'>${c.svg}</figure>`).join('')}</div>`;
}

function boxText(box: Box): string {
  return `[${box.map((v) => Number(v.toFixed(1))).join(', ')}]`;
}

function caseCard(item: CaseThumbnail, stageCount: number, kind: 'missed' | 'false-alarm'): string {
  let verdict: string;
  if (kind === 'false-alarm') verdict = `score ${item.score === undefined ? '—' : item.score.toFixed(3)}`;
  else if (item.stagesPassed === undefined) verdict = 'no scan window fits this image';
  else if (item.flat === true) verdict = 'flat window: skipped before stage 1';
  else if (item.stagesPassed >= stageCount) verdict = `passed all ${stageCount} stages; lost in merging or box fit`;
  else verdict = `rejected by stage ${item.stagesPassed + 1} of ${stageCount}`;
  const name = item.file.split(/[\\/]/).pop() ?? item.file;
  return (
    `<figure class='case ${kind}'><img class='thumb' alt='${escapeMarkup(`${name} ${boxText(item.box)}`)}' src='${item.thumbnail}'/>` +
    `<figcaption><span class='verdict'>${escapeMarkup(verdict)}</span><span class='file' title='${escapeMarkup(item.file)}'>${escapeMarkup(name)}</span>` +
    `<span class='box'>box ${escapeMarkup(boxText(item.box))}</span></figcaption></figure>`
  );
}

function caseGrid(items: readonly CaseThumbnail[], total: number, stageCount: number, kind: 'missed' | 'false-alarm', empty: string): string {
  if (total === 0) return `<p class='empty'>${escapeMarkup(empty)}</p>`;
  const shown = items.length < total ? `<p class='muted'>Showing ${items.length} of ${total}.</p>` : '';
  return `${shown}<div class='cases'>${items.map((item) => caseCard(item, stageCount, kind)).join('')}</div>`;
}

/** The per-stage table; the seconds column only when the model recorded times. */
function stageTable(rows: readonly StageRow[]): string {
  const optional = (value: number | undefined, format: (v: number) => string): string => (value === undefined ? '—' : format(value));
  const timed = rows.some((r) => r.seconds !== undefined);
  return table(
    ['stage', 'weak', 'threshold', 'detection', 'false pos.', 'cumulative f.p.', 'negatives', 'windows / negative', 'boosting ended', ...(timed ? ['seconds'] : [])],
    rows.map((r) => [
      r.stage, r.weakClassifiers, r.threshold.toPrecision(6),
      optional(r.detectionRate, (v) => percent(v, 2)), optional(r.falsePositiveRate, (v) => percent(v, 2)),
      optional(r.cumulativeFalsePositiveRate, formatRate), optional(r.negatives, String), optional(r.windowsPerNegative, (v) => v.toFixed(1)),
      r.stoppedBecause ?? '—', ...(timed ? [optional(r.seconds, (v) => v.toFixed(1))] : []),
    ]),
    'stages',
  );
}

function modelSection(content: ReportContent, charts: readonly NamedChart[]): string {
  const model = content.model;
  const rows = stageRows(tabulated(content));
  const options = model?.training?.options ?? {};
  const booster = typeof options['booster'] === 'string' ? options['booster'] : '—';
  const stopReason = model?.training?.stopReason;
  const weak = rows.reduce((n, r) => n + r.weakClassifiers, 0);
  return (
    `<section id='model'><h2>Model</h2>` +
    `<div class='figures'>` +
    figure('window', `${content.detector.windowWidth}×${content.detector.windowHeight}`) +
    figure('feature set', model?.featureSet ?? '—') +
    figure('booster', String(booster)) +
    figure('stages', String(rows.length)) +
    figure('weak classifiers', String(weak)) +
    `</div>` +
    (stopReason === undefined ? '' : `<p class='stop'><strong>Why training stopped:</strong> ${escapeMarkup(stopReason)}</p>`) +
    stageTable(rows) +
    chartGrid(charts) +
    `</section>`
  );
}

function detectionSection(section: DetectionSection, charts: readonly NamedChart[], stageCount: number): string {
  const e = section.evaluation;
  const at = e.detectionRateAtFalsePositives;
  return (
    `<section id='evaluation'><h2>Evaluation on annotated images</h2>` +
    `<p class='muted'>Truth: ${escapeMarkup(section.truthPath)} — ${e.imageCount} images, ${e.truthCount} objects, ${e.detectionCount} detections, ${e.truePositives} matched at IoU ≥ ${e.iouThreshold}.</p>` +
    `<div class='figures'>` +
    figure('average precision', e.averagePrecision.toFixed(4), 'VOC all-point') +
    figure('detection rate at 1 FP', percent(at['1'])) +
    figure('at 10 FP', percent(at['10'])) +
    figure('at 100 FP', percent(at['100'])) +
    figure('log-average miss rate', percent(e.logAverageMissRate), 'FPPI 0.01–1') +
    (section.speed ? figure('speed', `${(section.speed.windowsPerSecond / 1e6).toFixed(2)} M`, 'windows/s per thread') : '') +
    `</div>` +
    chartGrid(charts) +
    `</section>` +
    `<section id='cases'><h2>Cases to act on</h2>` +
    `<h3><span class='swatch truth'></span>Missed objects <span class='count'>${section.missedTotal}</span></h3>` +
    `<p class='muted'>Truth boxes no detection matched, with how far the scan window nearest to each got through the cascade. ` +
    `Early rejections call for more positives like these; rejections late in the cascade or after all stages point at the last stages' thresholds or at merging.</p>` +
    caseGrid(section.missed, section.missedTotal, stageCount, 'missed', 'No missed objects: every truth box was found.') +
    `<h3><span class='swatch alarm'></span>Highest-scoring false alarms <span class='count'>${section.falseAlarmTotal}</span></h3>` +
    `<p class='muted'>Detections that matched no truth box (duplicates included), highest score first. Backgrounds like these belong in the negative images.</p>` +
    caseGrid(section.falseAlarms, section.falseAlarmTotal, stageCount, 'false-alarm', 'No false alarms.') +
    `</section>`
  );
}

function patchSection(section: PatchSection, charts: readonly NamedChart[], stageCount: number): string {
  const e = section.evaluation;
  return (
    `<section id='patches'><h2>Evaluation on labelled patches</h2>` +
    `<p class='muted'>${section.positives} positive patches from ${escapeMarkup(section.positivesPath)}, ${section.negatives} negative patches from ${escapeMarkup(section.negativesPath)}.</p>` +
    `<div class='figures'>` +
    figure('detection rate', percent(e.detectionRate)) +
    figure('false-positive rate', percent(e.falsePositiveRate, 2)) +
    figure('ROC area', e.roc.area.toFixed(4)) +
    `</div>` +
    chartGrid(charts) +
    table(
      ['stage', 'positives reaching', 'positive pass', 'negatives reaching', 'negative pass'],
      e.stages.map((s) => [s.stage + 1, s.positivesReaching, percent(s.positivePassRate), s.negativesReaching, percent(s.negativePassRate)]),
      'stages',
    ) +
    (section.missed === undefined || section.falseAlarms === undefined
      ? ''
      : `<h3><span class='swatch truth'></span>Rejected positive patches <span class='count'>${section.missedTotal ?? section.missed.length}</span></h3>` +
        caseGrid(section.missed, section.missedTotal ?? section.missed.length, stageCount, 'missed', 'The cascade accepts every positive patch.') +
        `<h3><span class='swatch alarm'></span>Accepted negative patches <span class='count'>${section.falseAlarmTotal ?? section.falseAlarms.length}</span></h3>` +
        `<p class='muted'>Highest cascade depth score first (stages passed + a margin term in [0, 1)).</p>` +
        caseGrid(section.falseAlarms, section.falseAlarmTotal ?? section.falseAlarms.length, stageCount, 'false-alarm', 'The cascade rejects every negative patch.')) +
    `</section>`
  );
}

function provenanceSection(content: ReportContent): string {
  const training = content.model?.training;
  let body = `<p class='muted'>Model file: ${escapeMarkup(content.modelPath)}. ${escapeMarkup(content.writtenBy)}.</p>`;
  if (content.featureSheet !== undefined) {
    body +=
      `<h3>Features over the mean positive</h3><p class='muted'>First weak classifiers of the first stages; orange cells add, blue cells subtract.</p>` +
      `<img class='sheet' alt='feature sheet' src='${content.featureSheet}'/>`;
  }
  if (training === undefined) return `<section id='provenance'><h2>Provenance</h2>${body}<p class='empty'>This file carries no training record (a runtime export).</p></section>`;
  const data = training.data;
  body += `<h3>Training</h3>` + table([], [
    ['tool', training.tool],
    ['seed', training.seed],
    ['positives', `${data.positives} (${data.validationPositives} held out for stage thresholds)`],
    ['background images', data.backgroundImages],
    ['positives SHA-256', data.positivesHash],
    ['backgrounds SHA-256', data.backgroundsHash],
    ...(training.timing ? [['created', training.timing.createdAt] as const, ['training time', `${training.timing.totalSeconds.toFixed(1)} s`] as const] : [['times', 'not recorded in the model'] as const]),
  ], 'pairs');
  body += `<h3>Options</h3>` + table(['option', 'value'], Object.entries(training.options).map(([k, v]) => [k, v === null ? '—' : String(v)]), 'pairs');
  return `<section id='provenance'><h2>Provenance</h2>${body}</section>`;
}

/** The figures of the page as data, for machines (and tests): the same numbers the charts and tables show. */
export function reportData(content: ReportContent): unknown {
  return {
    format: 'rectboost-report-data',
    version: 1,
    model: content.modelPath,
    stages: stageRows(tabulated(content)),
    ...(content.detection ? { detection: { ...content.detection.evaluation, missedTotal: content.detection.missedTotal, falseAlarmTotal: content.detection.falseAlarmTotal } } : {}),
    ...(content.patches
      ? {
          patches: {
            ...content.patches.evaluation,
            roc: { falsePositiveRate: Array.from(content.patches.evaluation.roc.falsePositiveRate), truePositiveRate: Array.from(content.patches.evaluation.roc.truePositiveRate), area: content.patches.evaluation.roc.area },
            ...(content.patches.missedTotal === undefined ? {} : { missedTotal: content.patches.missedTotal }),
            ...(content.patches.falseAlarmTotal === undefined ? {} : { falseAlarmTotal: content.patches.falseAlarmTotal }),
          },
        }
      : {}),
  };
}

const STYLE = `
:root{--ink:#22252b;--muted:#5d6068;--paper:#f4f1ea;--card:#fffdf9;--rule:#ddd8cc;--teal:${REPORT_COLOURS.teal};--coral:${REPORT_COLOURS.coral};--truth:#1f9e7a;--alarm:#e6a200}
*{box-sizing:border-box}body{margin:0;background:var(--paper);color:var(--ink);font:14px/1.45 "DejaVu Sans",Verdana,sans-serif}
header{background:#1d3b40;color:#f4f1ea;padding:18px 32px 14px}header h1{margin:0;font-size:22px;letter-spacing:.2px}header p{margin:4px 0 0;color:#bcd3d0;font-size:12.5px}
nav{display:flex;gap:18px;padding:8px 32px;background:#24494f;font-size:12.5px}nav a{color:#e8efe9;text-decoration:none}nav a:hover{text-decoration:underline}
main{max-width:1300px;margin:0 auto;padding:8px 24px 40px}section{background:var(--card);border:1px solid var(--rule);border-radius:8px;margin:18px 0;padding:14px 20px 18px}
h2{margin:2px 0 10px;font-size:17px;color:#1d3b40;border-bottom:2px solid var(--teal);display:inline-block;padding-bottom:2px}h3{font-size:14.5px;margin:18px 0 4px;display:flex;align-items:center;gap:8px}
.figures{display:flex;flex-wrap:wrap;gap:10px;margin:6px 0 12px}.figure{background:#eef3f1;border-radius:6px;padding:8px 14px;min-width:120px}
.figure .value{font-size:19px;font-weight:bold;color:#12474c}.figure .label{font-size:11.5px;color:var(--muted)}.figure .hint{font-size:10.5px;color:#8a8d93}
.charts{display:flex;flex-wrap:wrap;gap:14px 18px;margin-top:10px}.chart-frame{margin:0;border:1px solid var(--rule);border-radius:6px;overflow:hidden;line-height:0}
table{border-collapse:collapse;font-size:12.5px;margin:8px 0}th,td{padding:3px 10px;border-bottom:1px solid #ebe7dd;text-align:right;white-space:nowrap}th{background:#f0ece2;font-weight:bold}
table.pairs td,table.pairs th{text-align:left}table.pairs td:first-child{color:var(--muted)}table.pairs td{font-family:"DejaVu Sans Mono",monospace;font-size:12px;white-space:normal;word-break:break-all}
.stop{background:#fbf3e2;border-left:4px solid var(--alarm);padding:6px 10px;margin:8px 0}.muted{color:var(--muted);font-size:12.5px;margin:4px 0}.empty{color:#2d6b3e;font-style:italic}
.cases{display:flex;flex-wrap:wrap;gap:10px;margin-top:8px}.case{margin:0;width:150px;background:#faf8f3;border:1px solid var(--rule);border-radius:6px;padding:6px}
.case.missed{border-top:4px solid var(--truth)}.case.false-alarm{border-top:4px solid var(--alarm)}.thumb{display:block;width:136px;height:136px;object-fit:contain;image-rendering:pixelated;background:#222}
figcaption{display:flex;flex-direction:column;font-size:11px;margin-top:4px;gap:1px}.verdict{font-weight:bold}.file{color:#33363c;overflow:hidden;text-overflow:ellipsis;white-space:nowrap}.box{color:var(--muted);font-family:"DejaVu Sans Mono",monospace;font-size:10.5px}
.swatch{display:inline-block;width:12px;height:12px;border-radius:2px}.swatch.truth{background:var(--truth)}.swatch.alarm{background:var(--alarm)}.count{background:#e7e2d6;border-radius:10px;padding:0 8px;font-size:12px}
.sheet{image-rendering:pixelated;max-width:100%;border-radius:4px;margin-top:6px}footer{text-align:center;color:#8a8d93;font-size:11.5px}
`;

/**
 * The whole report as one self-contained HTML document: inline CSS, inline SVG
 * charts, thumbnails and the feature sheet as data URIs, and a content security
 * policy that forbids every network request, so the file opens offline.
 * Sections: model (stages, charts, stop reason), detection or patch evaluation
 * (curves, figures), the cases to act on, features and provenance.
 * @example writeFileAtomic('report.html', renderReportPage(content))
 */
export function renderReportPage(content: ReportContent): string {
  const charts = reportCharts(content);
  const stageCount = content.detector.stages.length;
  const links = [['model', 'Model'], ...(content.detection ? [['evaluation', 'Evaluation'], ['cases', 'Cases to act on']] : []), ...(content.patches ? [['patches', 'Patches']] : []), ['provenance', 'Provenance']];
  const data = JSON.stringify(reportData(content)).replace(/</g, '\\u003c');
  return (
    `<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'>` +
    `<meta http-equiv='Content-Security-Policy' content="default-src 'none'; img-src data:; style-src 'unsafe-inline'">` +
    `<meta name='viewport' content='width=device-width, initial-scale=1'><title>${escapeMarkup(content.title)}</title><style>${STYLE}</style></head><body>` +
    `<header><h1>${escapeMarkup(content.title)}</h1><p>${escapeMarkup(content.modelPath)} · ${content.detector.windowWidth}×${content.detector.windowHeight} window · ${stageCount} stage${stageCount === 1 ? '' : 's'}</p></header>` +
    `<nav>${links.map(([id, label]) => `<a href='#${id}'>${label}</a>`).join('')}</nav><main>` +
    modelSection(content, charts.model) +
    (content.detection ? detectionSection(content.detection, charts.detection, stageCount) : '') +
    (content.patches ? patchSection(content.patches, charts.patches, stageCount) : '') +
    provenanceSection(content) +
    `<footer>${escapeMarkup(content.writtenBy)}</footer></main>` +
    `<script type='application/json' id='${REPORT_DATA_ID}'>${data}</script></body></html>\n`
  );
}
