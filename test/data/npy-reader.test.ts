import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { isRectboostError } from '../../src/errors.js';
import { loadLfwSubset } from '../../src/data/lfw-subset.js';
import { readNpy, readNpyFile } from '../../src/data/npy-reader.js';
import { REFERENCE_DATA, describeWithReferenceData } from './reference-files.js';
import { errorOf } from '../helpers/error-of.js';

// Values made by scripts/make-dataset-fixture.py with numpy.load (version recorded in the file).
interface DatasetFixture {
  numpyVersion: string;
  lfwSubset: {
    shape: number[];
    dtype: string;
    pixels: Array<{ item: number; row: number; column: number; value: number; byte: number }>;
    sumOfAll: number;
    byteSumOfFaces: number;
    byteSumOfNonFaces: number;
    byteSumOfItem: Record<string, number>;
  };
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/dataset-reference.json', import.meta.url), 'utf8')) as DatasetFixture;

/**
 * Builds .npy bytes by hand following NEP 1: magic, version, header length, header dict
 * padded with spaces to a multiple of 64 bytes (16 in old NumPy) and ended by '\n'.
 */
function npyBytes(header: string, body: Uint8Array, major = 1): Uint8Array {
  const prefix = major === 1 ? 10 : 12;
  let text = header;
  while ((prefix + text.length + 1) % 64 !== 0) text += ' ';
  text += '\n';
  const out = new Uint8Array(prefix + text.length + body.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, major, 0]);
  const view = new DataView(out.buffer);
  if (major === 1) view.setUint16(8, text.length, true);
  else view.setUint32(8, text.length, true);
  out.set(new TextEncoder().encode(text), prefix);
  out.set(body, prefix + text.length);
  return out;
}

function float64Body(values: number[]): Uint8Array {
  return new Uint8Array(new Float64Array(values).buffer);
}

describe('readNpy on hand-made files', () => {
  it('reads a version 1.0 float64 array in C order', () => {
    // Values chosen to need all 64 bits (1/3) and a negative number.
    const values = [1 / 3, -2.5, 0, 1e300, 7, 8];
    const array = readNpy(npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), }", float64Body(values)));
    expect(array.shape).toEqual([2, 3]);
    expect(array.dtype).toBe('<f8');
    expect(Array.from(array.data)).toEqual(values);
  });

  it('reads a version 2.0 header and a one-element shape tuple', () => {
    const array = readNpy(npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (2,), }", float64Body([4, 5]), 2));
    expect(array.shape).toEqual([2]);
    expect(Array.from(array.data)).toEqual([4, 5]);
  });

  it('widens float32 exactly and keeps uint8 as bytes', () => {
    // 0.1 is not a float32; Math.fround gives the float32 nearest it, which widening must keep.
    const float32 = readNpy(npyBytes("{'descr': '<f4', 'fortran_order': False, 'shape': (2,), }", new Uint8Array(new Float32Array([0.1, -3]).buffer)));
    expect(Array.from(float32.data)).toEqual([Math.fround(0.1), -3]);
    const bytes = readNpy(npyBytes("{'descr': '|u1', 'fortran_order': False, 'shape': (1, 3), }", new Uint8Array([0, 128, 255])));
    expect(bytes.data).toBeInstanceOf(Uint8Array);
    expect(Array.from(bytes.data)).toEqual([0, 128, 255]);
  });

  it('does not change the bytes it was given', () => {
    const input = npyBytes("{'descr': '|u1', 'fortran_order': False, 'shape': (2,), }", new Uint8Array([9, 10]));
    const copy = input.slice();
    const array = readNpy(input);
    (array.data as Uint8Array)[0] = 99;
    expect(input).toEqual(copy);
  });

  it('refuses a wrong magic string with a bad-data error that says what was expected', () => {
    const bytes = npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", float64Body([1]));
    bytes[1] = 0x58;
    const error = errorOf(() => readNpy(bytes, 'test.npy'));
    expect(isRectboostError(error, 'bad-data')).toBe(true);
    expect((error as Error).message).toMatch(/test\.npy.*magic string \\x93NUMPY/);
  });

  it('refuses a header cut short', () => {
    const bytes = npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", float64Body([1]));
    const error = errorOf(() => readNpy(bytes.subarray(0, 40)));
    expect(isRectboostError(error, 'bad-data')).toBe(true);
    expect((error as Error).message).toMatch(/truncated/);
    expect(isRectboostError(errorOf(() => readNpy(bytes.subarray(0, 7))), 'bad-data')).toBe(true);
  });

  it('refuses data shorter than the shape needs', () => {
    const bytes = npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (3,), }", float64Body([1, 2]));
    const error = errorOf(() => readNpy(bytes));
    expect(isRectboostError(error, 'bad-data')).toBe(true);
    expect((error as Error).message).toMatch(/needs 24 data bytes, the file holds 16/);
  });

  it('refuses big-endian, other element types, Fortran order and unknown versions', () => {
    const body = float64Body([1]);
    for (const header of [
      "{'descr': '>f8', 'fortran_order': False, 'shape': (1,), }",
      "{'descr': '<i8', 'fortran_order': False, 'shape': (1,), }",
      "{'descr': '<f8', 'fortran_order': True, 'shape': (1,), }",
      "{'descr': '<f8', 'fortran_order': False, 'shape': (1,), ",
    ]) {
      expect(isRectboostError(errorOf(() => readNpy(npyBytes(header, body))), 'bad-data')).toBe(true);
    }
    const version9 = npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", body);
    version9[6] = 9;
    expect((errorOf(() => readNpy(version9)) as Error).message).toMatch(/version 1, 2 or 3, received version 9/);
  });

  it('names the file when it is missing', async () => {
    await expect(readNpyFile('/no/such/folder/x.npy')).rejects.toThrow(/x\.npy cannot be read/);
  });
});

describeWithReferenceData(`lfw_subset.npy against numpy ${fixture.numpyVersion}`, ['lfw_subset.npy'], () => {
  const path = `${REFERENCE_DATA}lfw_subset.npy`;

  it('has the shape and element type numpy reports (200 × 25 × 25 float64)', async () => {
    const array = await readNpyFile(path);
    expect(array.shape).toEqual(fixture.lfwSubset.shape);
    expect(array.dtype).toBe(fixture.lfwSubset.dtype);
  });

  it('reads the same float64 values as numpy.load, bit for bit', async () => {
    const array = await readNpyFile(path);
    for (const { item, row, column, value } of fixture.lfwSubset.pixels) {
      expect(array.data[item * 625 + row * 25 + column]).toBe(value);
    }
    // numpy sums pairwise, we sum in order: equal to ~1e-12 relative, not bit for bit.
    let sum = 0;
    for (const value of array.data) sum += value;
    expect(sum).toBeCloseTo(fixture.lfwSubset.sumOfAll, 6);
  });

  it('splits into 100 faces and 100 non-faces of 25×25 bytes that match numpy rounding', async () => {
    const { faces, nonFaces } = await loadLfwSubset(path);
    // 100 + 100: scikit-image's documentation of skimage.data.lfw_subset.
    expect(faces).toHaveLength(100);
    expect(nonFaces).toHaveLength(100);
    const all = [...faces, ...nonFaces];
    for (const image of all) expect([image.width, image.height, image.data.length]).toEqual([25, 25, 625]);
    for (const { item, row, column, byte } of fixture.lfwSubset.pixels) {
      expect(all[item]!.data[row * 25 + column]).toBe(byte);
    }
    const byteSum = (images: typeof faces): number => images.reduce((total, image) => total + image.data.reduce((a, b) => a + b, 0), 0);
    expect(byteSum(faces)).toBe(fixture.lfwSubset.byteSumOfFaces);
    expect(byteSum(nonFaces)).toBe(fixture.lfwSubset.byteSumOfNonFaces);
    for (const [item, sum] of Object.entries(fixture.lfwSubset.byteSumOfItem)) {
      expect(byteSum([all[Number(item)]!])).toBe(sum);
    }
  });
});
