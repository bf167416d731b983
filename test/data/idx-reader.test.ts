import { readFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { isRectboostError } from '../../src/errors.js';
import { loadFashionMnist } from '../../src/data/fashion-mnist.js';
import { readIdx, readIdxFile } from '../../src/data/idx-reader.js';
import { REFERENCE_DATA, describeWithReferenceData } from './reference-files.js';
import { errorOf } from '../helpers/error-of.js';

// Values made by scripts/make-dataset-fixture.py with gzip + numpy.frombuffer (numpy version recorded).
interface FashionFixture {
  split: 'train' | 'test';
  shape: number[];
  labelCounts: number[];
  firstLabels: number[];
  byteSumOfAll: number;
  byteSumOfItem: Record<string, number>;
  pixels?: Array<{ item: number; row: number; column: number; byte: number }>;
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/dataset-reference.json', import.meta.url), 'utf8')) as {
  numpyVersion: string;
  fashionMnist: FashionFixture[];
};

/** IDX bytes by the MNIST page's description: 0, 0, type, dimension count, big-endian sizes, data. */
function idxBytes(type: number, sizes: number[], body: number[]): Uint8Array {
  const out = new Uint8Array(4 + 4 * sizes.length + body.length);
  out.set([0, 0, type, sizes.length]);
  const view = new DataView(out.buffer);
  sizes.forEach((size, d) => view.setUint32(4 + 4 * d, size, false));
  out.set(body, 4 + 4 * sizes.length);
  return out;
}

describe('readIdx on hand-made files', () => {
  it('reads sizes big-endian and the bytes in order', () => {
    // A size of 258 = 0x00000102 reads as 0x02010000 if taken little-endian, so it pins the byte order.
    const array = readIdx(idxBytes(0x08, [2, 3], [1, 2, 3, 4, 5, 6]));
    expect(array.shape).toEqual([2, 3]);
    expect(Array.from(array.data)).toEqual([1, 2, 3, 4, 5, 6]);
    const long = readIdx(idxBytes(0x08, [258], Array.from({ length: 258 }, (_, i) => i % 256)));
    expect(long.shape).toEqual([258]);
  });

  it('inflates gzip input to the same array', () => {
    const raw = idxBytes(0x08, [4], [9, 8, 7, 6]);
    expect(readIdx(gzipSync(raw))).toEqual(readIdx(raw));
  });

  it('refuses a wrong magic number and a non-byte element type', () => {
    const wrongMagic = idxBytes(0x08, [1], [0]);
    wrongMagic[0] = 7;
    expect((errorOf(() => readIdx(wrongMagic, 'x.idx')) as Error).message).toMatch(/x\.idx.*two zero bytes/);
    const floats = idxBytes(0x0d, [1], [0, 0, 0, 0]);
    const error = errorOf(() => readIdx(floats));
    expect(isRectboostError(error, 'bad-data')).toBe(true);
    expect((error as Error).message).toMatch(/element type 0x08.*received 0x0d/);
  });

  it('refuses truncated headers, data and gzip streams', () => {
    const full = idxBytes(0x08, [2, 2], [1, 2, 3, 4]);
    for (const cut of [full.subarray(0, 3), full.subarray(0, 9), full.subarray(0, 14)]) {
      expect(isRectboostError(errorOf(() => readIdx(cut)), 'bad-data')).toBe(true);
    }
    const zipped = gzipSync(full);
    expect((errorOf(() => readIdx(zipped.subarray(0, zipped.length - 6))) as Error).message).toMatch(/gzip stream is corrupt/);
  });

  it('names the file when it is missing', async () => {
    await expect(readIdxFile('/no/such/folder/labels.gz')).rejects.toThrow(/labels\.gz cannot be read/);
  });

  it('says which file is missing from a Fashion-MNIST folder', async () => {
    await expect(loadFashionMnist('/no/such/folder', 'test')).rejects.toThrow(/t10k-images-idx3-ubyte\(\.gz\) is missing/);
  });
});

for (const expected of fixture.fashionMnist) {
  const file = `fashion-mnist/${expected.split === 'train' ? 'train' : 't10k'}-images-idx3-ubyte.gz`;
  describeWithReferenceData(`Fashion-MNIST ${expected.split} split against numpy ${fixture.numpyVersion}`, [file], () => {
    it(`holds ${expected.shape[0]} images of 28×28 and matching labels`, async () => {
      const { images, labels } = await loadFashionMnist(`${REFERENCE_DATA}fashion-mnist`, expected.split);
      // Published sizes (Xiao, Rasul & Vollgraf 2017, §2): 60,000 training and 10,000 test items of 28×28.
      expect(images.length).toBe(expected.split === 'train' ? 60_000 : 10_000);
      expect([images.length, images[0]!.height, images[0]!.width]).toEqual(expected.shape);
      expect(labels.length).toBe(images.length);
      // Balanced classes, 6,000 per class in train and 1,000 in test: Xiao, Rasul & Vollgraf 2017
      // (10 classes over 60,000 / 10,000 items; the even split is recalled from the paper, from memory)
      // and checked independently against numpy's count in the fixture on the next line.
      const counts = new Array<number>(10).fill(0);
      for (const label of labels) counts[label]!++;
      expect(counts).toEqual(new Array<number>(10).fill(expected.split === 'train' ? 6_000 : 1_000));
      expect(counts).toEqual(expected.labelCounts);
      expect(Array.from(labels.subarray(0, 20))).toEqual(expected.firstLabels);
    });

    it('holds the same pixel bytes as numpy', async () => {
      const { images } = await loadFashionMnist(`${REFERENCE_DATA}fashion-mnist`, expected.split);
      let total = 0;
      for (const image of images) for (const value of image.data) total += value;
      expect(total).toBe(expected.byteSumOfAll);
      for (const [item, sum] of Object.entries(expected.byteSumOfItem)) {
        expect(images[Number(item)]!.data.reduce((a, b) => a + b, 0)).toBe(sum);
      }
      for (const { item, row, column, byte } of expected.pixels ?? []) {
        expect(images[item]!.data[row * 28 + column]).toBe(byte);
      }
    });
  });
}
