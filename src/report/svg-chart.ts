/**
 * Small SVG chart builders for the report: strings in, strings out, no I/O.
 * Every chart is a standalone `<svg>` element (its own white backdrop and
 * fonts) so that the same text serves the HTML page and, through sharp, the PNG
 * plots. Data values are kept on the elements (`data-point-count` on a curve,
 * `data-value` on a bar) so that a reader — or a test — can count what is drawn.
 */

/** How an axis maps values: `log` needs positive values (smaller ones are drawn at the axis minimum). */
export type AxisScale = 'linear' | 'log';

/** One curve of a line chart, drawn through its points in the order given. */
export interface ChartSeries {
  readonly label: string;
  readonly colour: string;
  readonly points: ReadonlyArray<readonly [x: number, y: number]>;
  /** Draw a dot at every point as well as the line (for short series). Default false; a one-point series always gets its dot. */
  readonly dots?: boolean;
}

/** A line chart: axes, curves and optional reference lines. */
export interface LineChartSpec {
  /** Stable name of the chart (the `data-chart` attribute and the PNG file name). */
  readonly name: string;
  readonly title: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly xScale?: AxisScale;
  readonly yScale?: AxisScale;
  /** Axis ranges; default: the data's range (decades for log axes). */
  readonly xDomain?: readonly [number, number];
  readonly yDomain?: readonly [number, number];
  readonly series: readonly ChartSeries[];
  /** Dashed vertical reference lines, e.g. the FPPI band of the log-average miss rate. */
  readonly verticalMarks?: ReadonlyArray<{ readonly x: number; readonly label: string }>;
  /** One line of text under the title (e.g. "AP 0.978"). */
  readonly note?: string;
}

/** A bar chart: one group of bars per category, one bar per series in each group. */
export interface BarChartSpec {
  readonly name: string;
  readonly title: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly yScale?: AxisScale;
  readonly categories: readonly string[];
  readonly series: ReadonlyArray<{ readonly label: string; readonly colour: string; readonly values: readonly number[] }>;
  readonly note?: string;
}

/** Outer size of every chart in SVG user units (pixels in the PNG plots). */
export const CHART_SIZE = { width: 560, height: 340 } as const;

const MARGIN = { left: 64, right: 18, top: 52, bottom: 50 } as const;
const FONT = "font-family='DejaVu Sans, Verdana, sans-serif'";
const INK = '#2b2d33';
const GRID = '#e4e1da';

/** Escapes text for SVG/HTML content and attribute values. */
export function escapeMarkup(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/** Fixed-precision coordinate text (2 decimals is well below a pixel). */
function coordinate(value: number): string {
  return (Math.round(value * 100) / 100).toString();
}

/** A value → pixel mapping along one axis, with its tick positions. */
interface Axis {
  readonly toPixel: (value: number) => number;
  readonly ticks: readonly number[];
}

/**
 * Tick values for an axis: for log axes every decade inside the domain; for
 * linear axes about five ticks at 1, 2 or 5 × 10^k steps (common practice for
 * readable axes).
 */
export function axisTicks(domain: readonly [number, number], scale: AxisScale): number[] {
  const [low, high] = domain;
  if (scale === 'log') {
    const ticks: number[] = [];
    for (let k = Math.ceil(Math.log10(low) - 1e-9); k <= Math.floor(Math.log10(high) + 1e-9); k++) ticks.push(10 ** k);
    return ticks;
  }
  const span = high - low;
  if (!(span > 0)) return [low];
  const rough = span / 5;
  const power = 10 ** Math.floor(Math.log10(rough));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= rough) ?? 10 * power;
  const ticks: number[] = [];
  for (let k = Math.ceil(low / step - 1e-9); k * step <= high + step * 1e-9; k++) ticks.push(Number((k * step).toPrecision(12)));
  return ticks;
}

/** Short tick label: plain decimals between 0.001 and 10^5, powers of ten as 1e-4 etc. outside. */
export function tickLabel(value: number): string {
  if (value === 0) return '0';
  const size = Math.abs(value);
  if (size >= 1e-3 && size < 1e5) return Number(value.toPrecision(6)).toString();
  return value.toExponential(0).replace('e+', 'e');
}

/** The data range of a set of values as an axis domain (decades for log; padded when empty or flat). */
export function dataDomain(values: readonly number[], scale: AxisScale): [number, number] {
  if (scale === 'log') {
    const positive = values.filter((v) => v > 0 && Number.isFinite(v));
    if (positive.length === 0) return [0.1, 1];
    const low = 10 ** Math.floor(Math.log10(Math.min(...positive)) + 1e-9);
    let high = 10 ** Math.ceil(Math.log10(Math.max(...positive)) - 1e-9);
    if (high <= low) high = low * 10;
    return [low, high];
  }
  const finite = values.filter((v) => Number.isFinite(v));
  if (finite.length === 0) return [0, 1];
  const low = Math.min(0, ...finite);
  const high = Math.max(...finite);
  return high > low ? [low, high] : [low, low + 1];
}

function makeAxis(domain: readonly [number, number], scale: AxisScale, from: number, to: number): Axis {
  const [low, high] = domain;
  const ticks = axisTicks(domain, scale);
  if (scale === 'log') {
    const a = Math.log10(low);
    const b = Math.log10(high);
    return { ticks, toPixel: (v) => from + ((Math.log10(Math.min(Math.max(v, low), high)) - a) / (b - a)) * (to - from) };
  }
  return { ticks, toPixel: (v) => from + ((Math.min(Math.max(v, low), high) - low) / (high - low)) * (to - from) };
}

/** The frame shared by both chart kinds: backdrop, title, note, axis labels. */
function chartFrame(name: string, title: string, note: string | undefined, xLabel: string, yLabel: string, body: string, legend: string): string {
  const { width, height } = CHART_SIZE;
  const plotMiddleY = (MARGIN.top + height - MARGIN.bottom) / 2;
  return (
    `<svg xmlns='http://www.w3.org/2000/svg' class='chart' data-chart='${escapeMarkup(name)}' width='${width}' height='${height}' viewBox='0 0 ${width} ${height}' role='img' aria-label='${escapeMarkup(title)}'>` +
    `<title>${escapeMarkup(title)}</title>` +
    `<rect width='${width}' height='${height}' fill='#ffffff'/>` +
    `<text x='${MARGIN.left}' y='20' ${FONT} font-size='14' font-weight='bold' fill='${INK}'>${escapeMarkup(title)}</text>` +
    (note === undefined ? '' : `<text x='${MARGIN.left}' y='37' ${FONT} font-size='11' fill='#5d6068'>${escapeMarkup(note)}</text>`) +
    body +
    `<text x='${(MARGIN.left + width - MARGIN.right) / 2}' y='${height - 10}' ${FONT} font-size='11' fill='${INK}' text-anchor='middle'>${escapeMarkup(xLabel)}</text>` +
    `<text transform='translate(14 ${plotMiddleY}) rotate(-90)' ${FONT} font-size='11' fill='${INK}' text-anchor='middle'>${escapeMarkup(yLabel)}</text>` +
    legend +
    `</svg>`
  );
}

/** A one-row legend at the bottom right, beside the x-axis label (only for two or more series). */
function legendBlock(entries: ReadonlyArray<{ label: string; colour: string }>): string {
  if (entries.length < 2) return '';
  // Width estimate at 10.5 px DejaVu Sans: about 6.2 px a character (common practice for layout without measuring).
  const widths = entries.map((e) => 16 + 6.2 * e.label.length + 12);
  let x = CHART_SIZE.width - MARGIN.right - widths.reduce((a, b) => a + b, 0);
  const y = CHART_SIZE.height - 10;
  return entries
    .map((entry, i) => {
      const item =
        `<rect x='${coordinate(x)}' y='${y - 9}' width='10' height='10' rx='2' fill='${entry.colour}'/>` +
        `<text x='${coordinate(x + 14)}' y='${y}' ${FONT} font-size='10.5' fill='${INK}'>${escapeMarkup(entry.label)}</text>`;
      x += widths[i]!;
      return item;
    })
    .join('');
}

function gridAndTicks(x: Axis | null, y: Axis): string {
  const { width, height } = CHART_SIZE;
  const left = MARGIN.left;
  const right = width - MARGIN.right;
  const top = MARGIN.top;
  const bottom = height - MARGIN.bottom;
  let out = '';
  for (const t of y.ticks) {
    const py = coordinate(y.toPixel(t));
    out += `<line x1='${left}' x2='${right}' y1='${py}' y2='${py}' stroke='${GRID}' stroke-width='1'/>`;
    out += `<text x='${left - 6}' y='${py}' dy='3.5' ${FONT} font-size='10' fill='#5d6068' text-anchor='end'>${tickLabel(t)}</text>`;
  }
  if (x) {
    for (const t of x.ticks) {
      const px = coordinate(x.toPixel(t));
      out += `<line x1='${px}' x2='${px}' y1='${top}' y2='${bottom}' stroke='${GRID}' stroke-width='1'/>`;
      out += `<text x='${px}' y='${bottom + 15}' ${FONT} font-size='10' fill='#5d6068' text-anchor='middle'>${tickLabel(t)}</text>`;
    }
  }
  out += `<rect x='${left}' y='${top}' width='${right - left}' height='${bottom - top}' fill='none' stroke='#b9b5ab' stroke-width='1'/>`;
  return out;
}

/**
 * A line chart as an SVG string. Each series becomes one `<polyline class='series'>`
 * with exactly one vertex per data point (values outside the domain are drawn
 * on its edge; on a log axis that includes 0) and `data-point-count`.
 * @example lineChart({ name: 'roc', title: 'ROC', xLabel: 'FPR', yLabel: 'TPR', series: [{ label: 'cascade', colour: '#0f6e74', points: [[0, 0], [1, 1]] }] })
 */
export function lineChart(spec: LineChartSpec): string {
  const xScale = spec.xScale ?? 'linear';
  const yScale = spec.yScale ?? 'linear';
  const xs = spec.series.flatMap((s) => s.points.map((p) => p[0]));
  const ys = spec.series.flatMap((s) => s.points.map((p) => p[1]));
  const xDomain = spec.xDomain ?? dataDomain(xs, xScale);
  const yDomain = spec.yDomain ?? dataDomain(ys, yScale);
  const x = makeAxis(xDomain, xScale, MARGIN.left, CHART_SIZE.width - MARGIN.right);
  const y = makeAxis(yDomain, yScale, CHART_SIZE.height - MARGIN.bottom, MARGIN.top);
  let body = gridAndTicks(x, y);
  for (const mark of spec.verticalMarks ?? []) {
    const px = coordinate(x.toPixel(mark.x));
    body += `<line x1='${px}' x2='${px}' y1='${MARGIN.top}' y2='${CHART_SIZE.height - MARGIN.bottom}' stroke='#8a8578' stroke-width='1' stroke-dasharray='4 3'/>`;
    body += `<text x='${px}' y='${MARGIN.top - 4}' ${FONT} font-size='9.5' fill='#6b675e' text-anchor='middle'>${escapeMarkup(mark.label)}</text>`;
  }
  for (const series of spec.series) {
    const vertices = series.points.map((p) => `${coordinate(x.toPixel(p[0]))},${coordinate(y.toPixel(p[1]))}`);
    body +=
      `<polyline class='series' data-series='${escapeMarkup(series.label)}' data-point-count='${series.points.length}' points='${vertices.join(' ')}' ` +
      `fill='none' stroke='${series.colour}' stroke-width='2.2' stroke-linejoin='round' stroke-linecap='round'/>`;
    // A lone point draws no line, so it always gets its dot.
    if (series.dots === true || series.points.length === 1) {
      for (const v of vertices) {
        const [cx, cy] = v.split(',');
        body += `<circle cx='${cx}' cy='${cy}' r='3' fill='#ffffff' stroke='${series.colour}' stroke-width='1.8'/>`;
      }
    }
  }
  return chartFrame(spec.name, spec.title, spec.note, spec.xLabel, spec.yLabel, body, legendBlock(spec.series));
}

/**
 * A grouped bar chart as an SVG string: one `<rect class='bar'>` per category
 * and series, with `data-value`. On a log axis bars rise from the axis minimum;
 * zero or negative values get no visible height but keep their element.
 * @example barChart({ name: 'weak', title: 'Weak classifiers', xLabel: 'stage', yLabel: 'count', categories: ['1', '2'], series: [{ label: 'weak', colour: '#0f6e74', values: [3, 5] }] })
 */
export function barChart(spec: BarChartSpec): string {
  const yScale = spec.yScale ?? 'linear';
  const values = spec.series.flatMap((s) => s.values);
  const yDomain = dataDomain(values, yScale);
  // A bar whose value is the log axis minimum would have no height: start one decade lower.
  if (yScale === 'log' && values.some((v) => v > 0 && v <= yDomain[0])) yDomain[0] /= 10;
  const y = makeAxis(yDomain, yScale, CHART_SIZE.height - MARGIN.bottom, MARGIN.top);
  const left = MARGIN.left;
  const right = CHART_SIZE.width - MARGIN.right;
  const bottom = CHART_SIZE.height - MARGIN.bottom;
  const groups = Math.max(1, spec.categories.length);
  const slot = (right - left) / groups;
  const barWidth = Math.min(40, (slot * 0.78) / Math.max(1, spec.series.length));
  const labelEvery = Math.max(1, Math.ceil(groups / 20));
  let body = gridAndTicks(null, y);
  spec.categories.forEach((category, c) => {
    const groupLeft = left + c * slot + (slot - barWidth * spec.series.length) / 2;
    spec.series.forEach((series, s) => {
      const value = series.values[c] ?? 0;
      const top = yScale === 'log' && !(value > 0) ? bottom : y.toPixel(value);
      body +=
        `<rect class='bar' data-series='${escapeMarkup(series.label)}' data-value='${value}' x='${coordinate(groupLeft + s * barWidth)}' y='${coordinate(top)}' ` +
        `width='${coordinate(Math.max(1, barWidth - 2))}' height='${coordinate(Math.max(0, bottom - top))}' rx='1.5' fill='${series.colour}'><title>${escapeMarkup(`${category}: ${tickLabel(value)}`)}</title></rect>`;
    });
    if (c % labelEvery === 0) {
      body += `<text x='${coordinate(left + (c + 0.5) * slot)}' y='${bottom + 15}' ${FONT} font-size='10' fill='#5d6068' text-anchor='middle'>${escapeMarkup(category)}</text>`;
    }
  });
  return chartFrame(spec.name, spec.title, spec.note, spec.xLabel, spec.yLabel, body, legendBlock(spec.series));
}
