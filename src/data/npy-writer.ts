import { open } from 'node:fs/promises';
import { checkThat } from '../check.js';
import { RectboostError } from '../errors.js';

/** Element types writeNpyFile can store: little-endian float64, float32, and bytes. */
export type NpyElementType = '<f8' | '<f4' | '|u1';

/** The typed array that holds each element type. */
export type NpyData = Float64Array | Float32Array | Uint8Array;

const BYTES_PER_ELEMENT: Readonly<Record<NpyElementType, number>> = { '<f8': 8, '<f4': 4, '|u1': 1 };

/** Header blocks end on this boundary so the data starts aligned (NumPy pads to 64 since 1.14). */
const HEADER_ALIGNMENT = 64;

/**
 * The header of a version-1.0 .npy file for a C-order array (NumPy NEP 1,
 * "Format Version 1.0"): the magic `\x93NUMPY`, version bytes 1 and 0, the header
 * length as little-endian uint16, then the dict literal
 * `{'descr': …, 'fortran_order': False, 'shape': (…), }` padded with spaces and
 * ended by '\n' so that magic + length + dict is a multiple of 64 bytes — byte for
 * byte what numpy.save writes (checked against NumPy in test/data/npy-writer.test.ts).
 * Shape entries are non-negative integers; a one-element shape keeps Python's
 * trailing comma, `(3,)`, and a scalar is `()`.
 * @throws RectboostError `invalid-option` for a shape entry that is not a
 *   non-negative safe integer, or a header longer than 65,535 bytes.
 * @example encodeNpyHeader('<f4', [2, 3]).length // 128
 */
export function encodeNpyHeader(elementType: NpyElementType, shape: readonly number[]): Uint8Array {
  for (const side of shape) {
    checkThat(Number.isSafeInteger(side) && side >= 0, `A .npy shape holds non-negative integers; received (${shape.join(', ')}).`);
  }
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let dict = `{'descr': '${elementType}', 'fortran_order': False, 'shape': ${shapeText}, }`;
  const prefixLength = 10;
  const padding = (HEADER_ALIGNMENT - ((prefixLength + dict.length + 1) % HEADER_ALIGNMENT)) % HEADER_ALIGNMENT;
  dict += ' '.repeat(padding) + '\n';
  checkThat(dict.length <= 0xffff, `A version-1.0 .npy header holds at most 65,535 bytes; this shape needs ${dict.length}.`);
  const header = new Uint8Array(prefixLength + dict.length);
  header.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
  header[8] = dict.length & 0xff;
  header[9] = dict.length >> 8;
  for (let i = 0; i < dict.length; i++) header[prefixLength + i] = dict.charCodeAt(i);
  return header;
}

/** The .npy element type that stores this typed array. */
function elementTypeOf(data: NpyData): NpyElementType {
  if (data instanceof Float64Array) return '<f8';
  if (data instanceof Float32Array) return '<f4';
  return '|u1';
}

/**
 * The bytes of a whole .npy file: header (encodeNpyHeader) then the elements in C
 * order, little-endian. The element type follows the array: Float64Array → '<f8',
 * Float32Array → '<f4', Uint8Array → '|u1'. The caller's array is not modified.
 * @throws RectboostError `invalid-option` when data.length is not the product of
 *   the shape, or the platform is big-endian.
 * @example encodeNpy([2, 2], Uint8Array.of(1, 2, 3, 4))
 */
export function encodeNpy(shape: readonly number[], data: NpyData): Uint8Array {
  const elementType = checkNpyArguments(shape, data);
  const header = encodeNpyHeader(elementType, shape);
  const bytes = new Uint8Array(header.length + data.byteLength);
  bytes.set(header);
  bytes.set(new Uint8Array(data.buffer, data.byteOffset, data.byteLength), header.length);
  return bytes;
}

/**
 * Writes `data` with `shape` to a .npy file that numpy.load reads (see encodeNpy),
 * streaming the elements straight from the caller's array so that arrays of
 * hundreds of megabytes are not copied. Not atomic: meant for scratch files that a
 * reference library reads back (e.g. the peer benchmark).
 * @throws RectboostError `invalid-option` as encodeNpy; `bad-data` naming the file
 *   when it cannot be written.
 * @example await writeNpyFile('/tmp/x.npy', [200, 24, 24], pixels)
 */
export async function writeNpyFile(path: string, shape: readonly number[], data: NpyData): Promise<void> {
  const elementType = checkNpyArguments(shape, data);
  const header = encodeNpyHeader(elementType, shape);
  try {
    const handle = await open(path, 'w');
    try {
      await handle.write(header);
      const body = new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
      // Chunks keep each write call well below the 2 GiB that one call may carry.
      const chunk = 1 << 28;
      for (let at = 0; at < body.length; at += chunk) await handle.write(body.subarray(at, Math.min(body.length, at + chunk)));
    } finally {
      await handle.close();
    }
  } catch (error) {
    throw new RectboostError('bad-data', `NumPy file ${path} cannot be written (${(error as NodeJS.ErrnoException).code ?? 'unknown error'}); check the folder exists and is writable.`, { cause: error });
  }
}

function checkNpyArguments(shape: readonly number[], data: NpyData): NpyElementType {
  const elementType = elementTypeOf(data);
  checkThat(new Uint8Array(Uint16Array.of(1).buffer)[0] === 1, 'Writing .npy files needs a little-endian platform; this one is big-endian.');
  const count = shape.reduce((product, side) => product * side, 1);
  checkThat(count === data.length, `A .npy array of shape (${shape.join(', ')}) holds ${count} elements; received ${data.length}.`);
  checkThat(data.BYTES_PER_ELEMENT === BYTES_PER_ELEMENT[elementType], 'Unsupported typed array for .npy writing.');
  return elementType;
}
