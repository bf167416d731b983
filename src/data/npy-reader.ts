import { RectboostError } from '../errors.js';

/** An n-dimensional float64 array read from a .npy file, C order. */
export interface NpyFloat64Array {
  readonly shape: readonly number[];
  readonly data: Float64Array;
}

/**
 * Reads a NumPy .npy file (format versions 1.0–3.0) holding little-endian
 * float64 values ('<f8') in C order — enough for reference data such as
 * scikit-image's lfw_subset.npy. Deliberately small: other dtypes, Fortran order
 * and pickled objects are refused rather than guessed at.
 * Layout (NumPy's format.py docs, "The .npy format"): magic "\x93NUMPY", major and
 * minor version bytes, header length (uint16 LE for v1, uint32 LE for v2/3), then
 * a Python dict literal with 'descr', 'fortran_order' and 'shape', then the data.
 * `where` names the source in error messages.
 * @throws RectboostError `bad-data` when the bytes are not such a file.
 * @example readNpyFloat64(readFileSync('lfw_subset.npy'), 'lfw_subset.npy').shape // [200, 25, 25]
 */
export function readNpyFloat64(bytes: Uint8Array, where: string): NpyFloat64Array {
  const fail = (what: string): RectboostError =>
    new RectboostError('bad-data', `${where} must be a .npy file of little-endian float64 in C order; ${what}.`);
  const magic = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];
  if (bytes.length < 10 || magic.some((value, i) => bytes[i] !== value)) throw fail('its first bytes are not the .npy magic string');
  const major = bytes[6]!;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const headerStart = major === 1 ? 10 : 12;
  if (major < 1 || major > 3 || bytes.length < headerStart) throw fail(`it has format version ${major}`);
  const headerLength = major === 1 ? view.getUint16(8, true) : view.getUint32(8, true);
  const dataStart = headerStart + headerLength;
  if (dataStart > bytes.length) throw fail('its header runs past the end of the file');
  const header = new TextDecoder('latin1').decode(bytes.subarray(headerStart, dataStart));
  const descr = /'descr'\s*:\s*'([^']*)'/.exec(header)?.[1];
  if (descr !== '<f8') throw fail(`its dtype is ${descr ?? 'missing'}`);
  if (!/'fortran_order'\s*:\s*False/.test(header)) throw fail('it is in Fortran order');
  const shapeText = /'shape'\s*:\s*\(([^)]*)\)/.exec(header)?.[1];
  if (shapeText === undefined) throw fail('its header has no shape');
  const shape = shapeText.split(',').map((part) => part.trim()).filter((part) => part.length > 0).map(Number);
  if (shape.some((side) => !Number.isInteger(side) || side < 0)) throw fail(`its shape (${shapeText}) is not a list of sizes`);
  const count = shape.reduce((product, side) => product * side, 1);
  if (bytes.length - dataStart < count * 8) throw fail(`it holds ${bytes.length - dataStart} data bytes, fewer than the ${count * 8} its shape needs`);
  const data = new Float64Array(count);
  for (let i = 0; i < count; i++) data[i] = view.getFloat64(dataStart + 8 * i, true);
  return { shape, data };
}
