import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { binEdge, quantizeBetween, quantizeResponses } from '../../src/boost/response-bins.js';

/** Brute-force twin of the bin definition: bin(v) = #{b in 1..255 : v ≥ binEdge(minimum, binWidth, b)}. */
function countEdgesReached(value: number, minimum: number, binWidth: number): number {
  let count = 0;
  for (let b = 1; b < 256; b++) if (value >= binEdge(minimum, binWidth, b)) count++;
  return count;
}

function expectDefinitionHolds(values: Float64Array): void {
  const bins = new Uint8Array(values.length + 3);
  const { minimum, binWidth } = quantizeResponses(values, values.length, bins, 3);
  for (let s = 0; s < values.length; s++) {
    expect(bins[3 + s]).toBe(binWidth > 0 ? countEdgesReached(values[s]!, minimum, binWidth) : 0);
  }
}

describe('response quantization', () => {
  it('puts every value in the bin the edge definition gives, for random rows', () => {
    const random = seedrandom('bins');
    for (let trial = 0; trial < 20; trial++) {
      const values = new Float64Array(300);
      const scale = 10 ** (random() * 8 - 4);
      for (let s = 0; s < values.length; s++) values[s] = (random() - 0.5) * scale;
      expectDefinitionHolds(values);
    }
  });

  it('puts values lying exactly on edges, and just beside them, in the right bins', () => {
    // Edges computed the way the model does, then nudged by one unit in the last place
    // either way: the spots where a rounded estimate of the bin goes wrong.
    const minimum = -1.37, maximum = 2.91;
    const binWidth = (maximum - minimum) / 256;
    const values: number[] = [minimum, maximum];
    for (let b = 1; b < 256; b++) {
      const edge = binEdge(minimum, binWidth, b);
      values.push(edge, edge - Math.abs(edge) * 2 ** -52, edge + Math.abs(edge) * 2 ** -52);
    }
    expectDefinitionHolds(Float64Array.from(values));
  });

  it('stays exact for a narrow range far from zero, where edges are coarse', () => {
    // Range 1e-9 around 1e6: the edges are only a few units in the last place apart.
    const values = new Float64Array(200);
    for (let s = 0; s < values.length; s++) values[s] = 1e6 + (s % 37) * 2.7e-11;
    expectDefinitionHolds(values);
  });

  it('gives the same bins whether the range is found by the caller or by the quantizer', () => {
    const random = seedrandom('between');
    const values = Float64Array.from({ length: 500 }, () => random() * 3 - 1);
    const viaResponses = new Uint8Array(500);
    const viaBetween = new Uint8Array(500);
    const { binWidth } = quantizeResponses(values, 500, viaResponses, 0);
    expect(quantizeBetween(values, 500, Math.min(...values), Math.max(...values), viaBetween, 0)).toBe(binWidth);
    expect(viaBetween).toEqual(viaResponses);
  });

  it('sends every value of a constant row to bin 0 with bin width 0', () => {
    const bins = new Uint8Array(4).fill(9);
    expect(quantizeResponses(new Float64Array(4).fill(0.25), 4, bins, 0)).toEqual({ minimum: 0.25, binWidth: 0 });
    expect([...bins]).toEqual([0, 0, 0, 0]);
  });
});
