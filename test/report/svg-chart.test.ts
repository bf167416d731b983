import { describe, expect, it } from 'vitest';
import { axisTicks, barChart, CHART_SIZE, escapeMarkup, lineChart, tickLabel } from '../../src/report/svg-chart.js';

/** Vertices of every curve of a chart, as [x, y] pixel pairs. */
function curves(svg: string): Array<Array<[number, number]>> {
  return [...svg.matchAll(/<polyline class='series'[^>]* points='([^']*)'/g)].map((m) =>
    m[1]!.split(' ').filter((p) => p !== '').map((p) => p.split(',').map(Number) as [number, number]));
}

describe('axis ticks', () => {
  it('steps a linear axis by 1, 2 or 5 × 10^k, about five steps', () => {
    // Span 1 / 5 = 0.2, itself a 2 × 10^-1 step.
    expect(axisTicks([0, 1], 'linear')).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    // Span 7 / 5 = 1.4 → next step up in {1, 2, 5} × 10^0 is 2.
    expect(axisTicks([0, 7], 'linear')).toEqual([0, 2, 4, 6]);
  });

  it('puts one tick on every decade of a log axis', () => {
    expect(axisTicks([1e-3, 10], 'log')).toEqual([1e-3, 1e-2, 1e-1, 1, 10]);
  });

  it('labels ticks briefly', () => {
    expect([tickLabel(0), tickLabel(0.25), tickLabel(1e-4), tickLabel(1e6), tickLabel(100)]).toEqual(['0', '0.25', '1e-4', '1e6', '100']);
  });
});

describe('lineChart', () => {
  const svg = lineChart({
    name: 'test', title: 'A <title> & more', xLabel: 'x', yLabel: 'y', xDomain: [0, 1], yDomain: [0, 1],
    series: [
      { label: 'one', colour: '#000', points: [[0, 0], [0.5, 0.5], [1, 1]] },
      { label: 'two', colour: '#111', points: [[0, 1]] },
    ],
  });

  it('draws one polyline per series with one vertex per point', () => {
    expect(curves(svg).map((c) => c.length)).toEqual([3, 1]);
    expect(svg).toContain("data-point-count='3'");
  });

  it('maps the domain corners to the plot corners', () => {
    // Plot area: x from the left margin 64 to width − 18 = 542; y from height − 50 = 290 (bottom) up to 52 (top).
    const [first, middle, last] = curves(svg)[0]!;
    expect(first).toEqual([64, CHART_SIZE.height - 50]);
    expect(middle).toEqual([(64 + 542) / 2, (290 + 52) / 2]);
    expect(last).toEqual([CHART_SIZE.width - 18, 52]);
  });

  it('draws values below a log axis minimum (such as 0) on its edge', () => {
    const log = lineChart({ name: 'log', title: 't', xLabel: 'x', yLabel: 'y', xScale: 'log', yScale: 'log', xDomain: [0.01, 10], yDomain: [0.01, 1], series: [{ label: 's', colour: '#000', points: [[0, 1], [0.1, 0.1], [10, 0]] }] });
    const [a, b, c] = curves(log)[0]!;
    expect(a).toEqual([64, 52]);
    // log10(0.1) is one third of the way from −2 to 1 on x, and half way from −2 to 0 on y.
    // (Coordinates are written to 2 decimals.)
    expect(b![0]).toBeCloseTo(64 + (542 - 64) / 3, 2);
    expect(b![1]).toBeCloseTo((290 + 52) / 2, 2);
    expect(c).toEqual([542, 290]);
  });

  it('marks a lone point with a dot, since a one-vertex line is invisible', () => {
    // Series 'two' has one point; series 'one' (three points, dots off) has none.
    expect(svg.match(/<circle /g)).toHaveLength(1);
  });

  it('escapes text', () => {
    expect(svg).toContain('A &lt;title&gt; &amp; more');
    expect(svg).not.toContain('<title> &');
    expect(escapeMarkup(`'"`)).toBe('&#39;&quot;');
  });

  it('draws an empty series as an empty polyline', () => {
    const empty = lineChart({ name: 'e', title: 't', xLabel: 'x', yLabel: 'y', series: [{ label: 's', colour: '#000', points: [] }] });
    expect(curves(empty)).toEqual([[]]);
  });
});

describe('barChart', () => {
  it('draws one bar per category and series, carrying its value', () => {
    const svg = barChart({
      name: 'b', title: 't', xLabel: 'stage', yLabel: 'n', categories: ['1', '2', '3'],
      series: [{ label: 'p', colour: '#000', values: [1, 2, 3] }, { label: 'q', colour: '#111', values: [3, 2, 1] }],
    });
    const values = [...svg.matchAll(/<rect class='bar'[^>]* data-value='([^']*)'/g)].map((m) => Number(m[1]));
    expect(values).toEqual([1, 3, 2, 2, 3, 1]);
  });

  it('gives a bar at the smallest value of a log axis a visible height', () => {
    // Values 1 and 1000: the axis starts a decade below 1, at 0.1, so the bar of 1 spans one of four decades.
    const svg = barChart({ name: 'b', title: 't', xLabel: 's', yLabel: 'n', yScale: 'log', categories: ['1', '2'], series: [{ label: 'p', colour: '#000', values: [1, 1000] }] });
    const heights = [...svg.matchAll(/<rect class='bar'[^>]* height='([^']*)'/g)].map((m) => Number(m[1]));
    expect(heights[0]).toBeCloseTo((290 - 52) / 4, 1);
    expect(heights[1]).toBeCloseTo(290 - 52, 1);
  });
});
