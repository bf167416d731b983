import { gunzipSync } from 'node:zlib';
import { RectboostError } from '../errors.js';
import { readFileBytes } from '../io/read-file-bytes.js';

/** An unsigned-byte array read from an IDX file, row-major (last dimension fastest). */
export interface IdxArray {
  readonly shape: number[];
  readonly data: Uint8Array;
}

/** IDX element-type code for unsigned bytes, the only type MNIST and Fashion-MNIST use. */
const IDX_UNSIGNED_BYTE = 0x08;

/**
 * Parses IDX bytes, the format of the MNIST files (LeCun, Bottou, Bengio & Haffner;
 * described on the MNIST database page) that Fashion-MNIST (Xiao, Rasul & Vollgraf 2017)
 * reuses: two zero bytes, an element-type byte, a dimension-count byte, one big-endian
 * uint32 size per dimension, then the elements. Gzip-compressed input (starting with
 * 0x1f 0x8b) is inflated first. Only unsigned-byte elements (type 0x08) are read.
 * The input is not modified; the result owns fresh memory.
 * `label` names the source in error messages (default "the IDX data").
 * @throws RectboostError `bad-data` when the gzip stream is corrupt, the magic or
 *   element type is wrong, or the data length does not match the sizes.
 * @example const { shape, data } = readIdx(readFileSync('t10k-labels-idx1-ubyte.gz'));
 */
export function readIdx(bytes: Uint8Array, label = 'the IDX data'): IdxArray {
  const fail = (what: string): never => {
    throw new RectboostError('bad-data', `${label} is not an IDX array rectboost can read: ${what}.`);
  };
  let raw = bytes;
  if (bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b) {
    try {
      const inflated = gunzipSync(bytes);
      raw = new Uint8Array(inflated.buffer, inflated.byteOffset, inflated.length);
    } catch (error) {
      return fail(`its gzip stream is corrupt or truncated (${(error as Error).message}); download the file again`);
    }
  }
  if (raw.length < 4) fail(`expected a 4-byte magic number, received ${raw.length} bytes`);
  if (raw[0] !== 0 || raw[1] !== 0) {
    fail(`expected the magic number to start with two zero bytes, received 0x${hex(raw[0]!)} 0x${hex(raw[1]!)}`);
  }
  if (raw[2] !== IDX_UNSIGNED_BYTE) fail(`expected element type 0x08 (unsigned byte), received 0x${hex(raw[2]!)}`);
  const dimensions = raw[3]!;
  if (dimensions < 1) fail('expected at least one dimension, received 0');
  const dataStart = 4 + 4 * dimensions;
  if (raw.length < dataStart) fail(`expected ${dimensions} sizes after the magic number, the data ends after ${raw.length} bytes; the file is truncated`);
  const view = new DataView(raw.buffer, raw.byteOffset, raw.byteLength);
  const shape: number[] = [];
  let count = 1;
  for (let d = 0; d < dimensions; d++) {
    const side = view.getUint32(4 + 4 * d, false);
    shape.push(side);
    count *= side;
  }
  const received = raw.length - dataStart;
  if (received !== count) {
    fail(`sizes ${shape.join(' × ')} need ${count} data bytes, the file holds ${received}${received < count ? '; the file is truncated' : ''}`);
  }
  // When we inflated, `raw` is already ours; otherwise copy so the caller's bytes stay theirs.
  const data = raw === bytes ? raw.slice(dataStart) : raw.subarray(dataStart);
  return { shape, data };
}

/**
 * Reads an IDX file from disk, gzip-compressed (.gz) or raw (see readIdx).
 * @throws RectboostError `bad-data` naming the file when it is missing,
 *   unreadable or not a readable unsigned-byte IDX array.
 * @example const labels = await readIdxFile('reference-data/fashion-mnist/t10k-labels-idx1-ubyte.gz');
 */
export async function readIdxFile(path: string): Promise<IdxArray> {
  const bytes = await readFileBytes(path, 'bad-data', 'IDX file');
  return readIdx(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.length), `IDX file ${path}`);
}

function hex(value: number): string {
  return value.toString(16).padStart(2, '0');
}
