import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readNpy } from '../../src/data/npy-reader.js';
import { encodeNpy, encodeNpyHeader, writeNpyFile, type NpyData } from '../../src/data/npy-writer.js';

// Whole files written by numpy.save, made by scripts/make-npy-writer-fixture.py
// (Debian python3-numpy; the version is recorded in the fixture).
interface NpyFixture {
  libraryVersion: string;
  cases: Array<{ label: string; shape: number[]; dtype: string; values: number[]; fileBase64: string }>;
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/numpy-npy-files.json', import.meta.url), 'utf8')) as NpyFixture;

function typedArrayOf(dtype: string, values: number[]): NpyData {
  if (dtype === '<f4') return Float32Array.from(values);
  if (dtype === '<f8') return Float64Array.from(values);
  return Uint8Array.from(values);
}

describe(`.npy writer against numpy ${fixture.libraryVersion}`, () => {
  for (const testCase of fixture.cases) {
    it(`writes the same bytes as numpy.save for ${testCase.label}`, () => {
      const expected = new Uint8Array(Buffer.from(testCase.fileBase64, 'base64'));
      expect(encodeNpy(testCase.shape, typedArrayOf(testCase.dtype, testCase.values))).toEqual(expected);
    });
  }

  it('streams to a file that reads back with the same bytes as encodeNpy', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'rectboost-npy-'));
    try {
      const data = Float32Array.from({ length: 24 }, (_, i) => i * 0.25 - 3);
      const path = join(folder, 'values.npy');
      await writeNpyFile(path, [2, 3, 4], data);
      const bytes = new Uint8Array(readFileSync(path));
      expect(bytes).toEqual(encodeNpy([2, 3, 4], data));
      // readNpy is checked against numpy.load in npy-reader.test.ts.
      const read = readNpy(bytes);
      expect(read.shape).toEqual([2, 3, 4]);
      expect(read.dtype).toBe('<f4');
      expect(Array.from(read.data)).toEqual(Array.from(data));
    } finally {
      rmSync(folder, { recursive: true, force: true });
    }
  });

  it('ends every header on a 64-byte boundary with a newline (NEP 1; numpy ≥ 1.14 pads to 64)', () => {
    for (const shape of [[], [1], [162336, 1000], [7, 7, 7, 7, 7, 7, 7, 7, 7, 7, 7, 7, 7, 7, 7, 7, 7]]) {
      const header = encodeNpyHeader('<f4', shape);
      expect(header.length % 64).toBe(0);
      expect(header[header.length - 1]).toBe(0x0a);
      // Bytes 8–9 hold the dict's length, little-endian: the whole header minus the 10-byte prefix.
      expect(header[8]! + 256 * header[9]!).toBe(header.length - 10);
    }
  });

  it('refuses data whose length does not match the shape, naming both', () => {
    expect(() => encodeNpy([2, 3], new Float32Array(5))).toThrow(/shape \(2, 3\) holds 6 elements; received 5/);
  });

  it('refuses a shape entry that is not a non-negative integer', () => {
    expect(() => encodeNpyHeader('|u1', [2, -1])).toThrow(/non-negative integers/);
    expect(() => encodeNpyHeader('|u1', [1.5])).toThrow(/non-negative integers/);
  });

  it('reports an unwritable path as bad-data naming the file', async () => {
    await expect(writeNpyFile('/nonexistent-folder/x.npy', [1], new Uint8Array(1))).rejects.toThrow(/\/nonexistent-folder\/x\.npy cannot be written/);
  });
});
