import type { StageTrainingRecord, TrainingProvenance } from '../cascade/cascade-model.js';
import type { DetectionEvaluation, ScanSummary } from '../metrics/detection-evaluation.js';
import { LOG_AVERAGE_REFERENCE_POINTS } from '../metrics/miss-rate.js';
import type { PatchEvaluation } from '../metrics/patch-evaluation.js';
import { barChart, lineChart } from './svg-chart.js';

/** The report's palette (ours): deep teal, coral, ochre, plum. */
export const REPORT_COLOURS = { teal: '#0f6e74', coral: '#e0573a', ochre: '#c2930a', plum: '#75488a' } as const;

/** A chart of the report: its stable name (PNG file name) and SVG text. */
export interface NamedChart {
  readonly name: string;
  readonly svg: string;
}

/** Rows of the per-stage table, from a model's training records (cumulative rate = product of stage rates). */
export interface StageRow {
  readonly stage: number;
  readonly weakClassifiers: number;
  readonly threshold: number;
  readonly detectionRate?: number;
  readonly falsePositiveRate?: number;
  readonly cumulativeFalsePositiveRate?: number;
  readonly negatives?: number;
  readonly windowsPerNegative?: number;
  readonly stoppedBecause?: string;
  readonly seconds?: number;
}

/** The parts of a model (or of a runtime export's detector) the stage table reads. */
export interface StagesToTabulate {
  readonly stages: ReadonlyArray<{ readonly threshold: number; readonly weakClassifiers: { readonly length: number }; readonly training?: StageTrainingRecord }>;
  readonly training?: TrainingProvenance;
}

/** One StageRow per stage; training figures only where the model recorded them. */
export function stageRows(model: StagesToTabulate): StageRow[] {
  let cumulative = 1;
  return model.stages.map((stage, k) => {
    const record = stage.training;
    if (record) cumulative *= record.falsePositiveRate;
    const seconds = model.training?.timing?.stageSeconds[k];
    return {
      stage: k + 1,
      weakClassifiers: stage.weakClassifiers.length,
      threshold: stage.threshold,
      ...(record === undefined
        ? {}
        : {
            detectionRate: record.detectionRate,
            falsePositiveRate: record.falsePositiveRate,
            cumulativeFalsePositiveRate: cumulative,
            negatives: record.negatives,
            windowsPerNegative: record.negatives > 0 ? record.windowsScanned / record.negatives : 0,
            stoppedBecause: record.stoppedBecause,
          }),
      ...(seconds === undefined ? {} : { seconds }),
    };
  });
}

/**
 * The model charts: weak classifiers per stage; stage and cumulative
 * false-positive rates (log scale); background windows looked at per negative
 * mined, whose growth shows how hard mining got (log scale). The last two only
 * when the model carries training records.
 */
export function modelCharts(rows: readonly StageRow[]): NamedChart[] {
  const categories = rows.map((r) => String(r.stage));
  const charts: NamedChart[] = [
    {
      name: 'weak-classifiers',
      svg: barChart({
        name: 'weak-classifiers', title: 'Weak classifiers per stage', xLabel: 'stage', yLabel: 'weak classifiers', categories,
        series: [{ label: 'weak classifiers', colour: REPORT_COLOURS.teal, values: rows.map((r) => r.weakClassifiers) }],
        note: `${rows.reduce((n, r) => n + r.weakClassifiers, 0)} in total over ${rows.length} stage${rows.length === 1 ? '' : 's'}`,
      }),
    },
  ];
  const trained = rows.filter((r) => r.falsePositiveRate !== undefined);
  if (trained.length > 0) {
    const last = rows.length;
    charts.push({
      name: 'false-positive-rates',
      svg: lineChart({
        name: 'false-positive-rates', title: 'False-positive rate by stage', xLabel: 'stage', yLabel: 'false-positive rate', yScale: 'log',
        xDomain: last > 1 ? [1, last] : [0.5, 1.5],
        series: [
          { label: 'this stage', colour: REPORT_COLOURS.ochre, dots: true, points: trained.map((r) => [r.stage, r.falsePositiveRate!] as const) },
          { label: 'cumulative', colour: REPORT_COLOURS.coral, dots: true, points: trained.map((r) => [r.stage, r.cumulativeFalsePositiveRate!] as const) },
        ],
        note: 'measured on each stage\u2019s training negatives; cumulative = product over stages',
      }),
    });
    charts.push({
      name: 'mining-effort',
      svg: barChart({
        name: 'mining-effort', title: 'Background windows looked at per negative mined', xLabel: 'stage', yLabel: 'windows per negative', yScale: 'log',
        categories: trained.map((r) => String(r.stage)),
        series: [{ label: 'windows per negative', colour: REPORT_COLOURS.plum, values: trained.map((r) => r.windowsPerNegative!) }],
        note: 'its inverse is the cascade\u2019s false-positive rate on the backgrounds before the stage',
      }),
    });
  }
  return charts;
}

/**
 * Detection-level charts: precision against recall (AP in the note), miss rate
 * against false positives per image on log–log axes with the FPPI band of the
 * log-average miss rate marked, and — with scan figures — the share of windows
 * each stage rejected.
 */
export function detectionCharts(evaluation: DetectionEvaluation, speed?: ScanSummary): NamedChart[] {
  const charts: NamedChart[] = [
    {
      name: 'precision-recall',
      svg: lineChart({
        name: 'precision-recall', title: 'Precision against recall', xLabel: 'recall', yLabel: 'precision', xDomain: [0, 1], yDomain: [0, 1.0001],
        series: [{ label: 'cascade', colour: REPORT_COLOURS.teal, points: evaluation.precisionRecall.map((p) => [p.recall, p.precision] as const) }],
        note: `average precision ${evaluation.averagePrecision.toFixed(4)} (VOC all-point), IoU \u2265 ${evaluation.iouThreshold}`,
      }),
    },
  ];
  const curve = evaluation.missRateByFalsePositivesPerImage;
  const fppi = curve.map((p) => p.falsePositivesPerImage).filter((v) => v > 0);
  const misses = curve.map((p) => p.missRate).filter((v) => v > 0);
  const decadeBelow = (v: number): number => 10 ** Math.floor(Math.log10(v) + 1e-9);
  const decadeAbove = (v: number): number => 10 ** Math.ceil(Math.log10(v) - 1e-9);
  const first = LOG_AVERAGE_REFERENCE_POINTS[0]!;
  const lastReference = LOG_AVERAGE_REFERENCE_POINTS[LOG_AVERAGE_REFERENCE_POINTS.length - 1]!;
  charts.push({
    name: 'miss-rate',
    svg: lineChart({
      name: 'miss-rate', title: 'Miss rate against false positives per image', xLabel: 'false positives per image (log)', yLabel: 'miss rate (log)',
      xScale: 'log', yScale: 'log',
      xDomain: [decadeBelow(Math.min(first / 10, ...fppi)), decadeAbove(Math.max(lastReference * 10, ...fppi))],
      yDomain: [decadeBelow(Math.min(0.01, ...misses)), 1],
      series: [{ label: 'cascade', colour: REPORT_COLOURS.coral, points: curve.map((p) => [p.falsePositivesPerImage, p.missRate] as const) }],
      verticalMarks: [{ x: first, label: String(first) }, { x: lastReference, label: String(lastReference) }],
      note: `log-average miss rate ${(100 * evaluation.logAverageMissRate).toFixed(1)}% over FPPI ${first}\u2013${lastReference} (dashed); 0 is drawn at the axis edge`,
    }),
  });
  if (speed !== undefined && speed.rejectedAtStageShare.length > 0) {
    charts.push({
      name: 'rejected-by-stage',
      svg: barChart({
        name: 'rejected-by-stage', title: 'Scanned windows rejected at each stage', xLabel: 'stage', yLabel: 'share of windows', yScale: 'log',
        categories: speed.rejectedAtStageShare.map((_, k) => String(k + 1)),
        series: [{ label: 'rejected', colour: REPORT_COLOURS.plum, values: [...speed.rejectedAtStageShare] }],
        note: `${speed.windowsScanned.toLocaleString('en-US')} windows, ${speed.meanFeaturesPerWindow.toFixed(2)} features a window, ${(100 * speed.acceptedShare).toPrecision(2)}% accepted`,
      }),
    });
  }
  return charts;
}

/** Patch-level charts: ROC over the cascade depth score and per-stage pass rates of positives and negatives. */
export function patchCharts(evaluation: PatchEvaluation): NamedChart[] {
  const roc = evaluation.roc;
  return [
    {
      name: 'roc',
      svg: lineChart({
        name: 'roc', title: 'ROC over the cascade depth score', xLabel: 'false-positive rate', yLabel: 'detection rate', xDomain: [0, 1], yDomain: [0, 1.0001],
        series: [{ label: 'cascade', colour: REPORT_COLOURS.teal, points: Array.from(roc.falsePositiveRate, (f, i) => [f, roc.truePositiveRate[i]!] as const) }],
        note: `area ${roc.area.toFixed(4)}; the cascade itself: detection ${(100 * evaluation.detectionRate).toFixed(1)}%, false positives ${(100 * evaluation.falsePositiveRate).toFixed(2)}%`,
      }),
    },
    {
      name: 'stage-pass-rates',
      svg: barChart({
        name: 'stage-pass-rates', title: 'Pass rate at each stage, of the patches reaching it', xLabel: 'stage', yLabel: 'pass rate',
        categories: evaluation.stages.map((s) => String(s.stage + 1)),
        series: [
          { label: 'positives', colour: REPORT_COLOURS.teal, values: evaluation.stages.map((s) => s.positivePassRate) },
          { label: 'negatives', colour: REPORT_COLOURS.coral, values: evaluation.stages.map((s) => s.negativePassRate) },
        ],
      }),
    },
  ];
}
