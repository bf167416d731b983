import { RectboostError } from '../errors.js';
import { readFileBytes } from '../io/read-file-bytes.js';

/**
 * An array read from a NumPy .npy file, in C (row-major) order.
 * `dtype` is the file's own descriptor (e.g. '<f8', '<f4', '|u1'); `data` is a
 * Float64Array for float64 and float32 files (float32 values are widened, which is
 * exact) and a Uint8Array for uint8 files.
 */
export interface NpyArray {
  readonly shape: number[];
  readonly dtype: string;
  readonly data: Float64Array | Uint8Array;
}

/** The six bytes every .npy file starts with (NumPy NEP 1, "Format Version 1.0"). */
const NPY_MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59] as const;

/** Bytes per element of the element types we read, keyed by descriptor. */
const ITEM_SIZE: Readonly<Record<string, number>> = { '<f8': 8, '<f4': 4, '|u1': 1, '<u1': 1, '>u1': 1 };

/**
 * Parses the bytes of a NumPy .npy file (format versions 1.0, 2.0 and 3.0 as
 * documented in NumPy's NEP 1 and `numpy.lib.format`): the magic string
 * `\x93NUMPY`, a major and minor version byte, the header length (little-endian
 * uint16 in 1.0, uint32 in 2.0 and 3.0), an ASCII (3.0: UTF-8) Python dict literal
 * with keys 'descr', 'fortran_order' and 'shape', then the raw elements.
 *
 * Reads little-endian float64 ('<f8'), float32 ('<f4') and uint8 ('|u1') arrays in
 * C order. The input is not modified; the result owns fresh memory.
 * `label` names the source in error messages (default "the .npy data").
 * @throws RectboostError `bad-data` when the magic, version, header, element type,
 *   memory order or data length is not as described above.
 * @example const { shape, data } = readNpy(new Uint8Array(readFileSync('lfw_subset.npy')));
 */
export function readNpy(bytes: Uint8Array, label = 'the .npy data'): NpyArray {
  const fail = (what: string): never => {
    throw new RectboostError('bad-data', `${label} is not a NumPy .npy array rectboost can read: ${what}.`);
  };
  if (bytes.length < 10) fail(`expected at least 10 bytes of header, received ${bytes.length} bytes`);
  for (let i = 0; i < NPY_MAGIC.length; i++) {
    if (bytes[i] !== NPY_MAGIC[i]) fail('expected the magic string \\x93NUMPY at the start of the file; it is missing');
  }
  const major = bytes[6]!;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let headerStart: number;
  let headerLength: number;
  if (major === 1) {
    headerStart = 10;
    headerLength = view.getUint16(8, true);
  } else if (major === 2 || major === 3) {
    if (bytes.length < 12) fail(`expected at least 12 bytes of header for version ${major}, received ${bytes.length} bytes`);
    headerStart = 12;
    headerLength = view.getUint32(8, true);
  } else {
    return fail(`expected format version 1, 2 or 3, received version ${major}.${bytes[7]}`);
  }
  const dataStart = headerStart + headerLength;
  if (dataStart > bytes.length) {
    fail(`the header claims ${headerLength} bytes but the file ends after ${bytes.length - headerStart}; the file is truncated`);
  }
  const headerText = new TextDecoder(major === 3 ? 'utf-8' : 'latin1').decode(bytes.subarray(headerStart, dataStart));
  let header: Map<string, HeaderValue>;
  try {
    header = parseHeaderDict(headerText);
  } catch (error) {
    return fail(`its header dict could not be parsed (${(error as Error).message})`);
  }
  const descr = header.get('descr');
  const fortranOrder = header.get('fortran_order');
  const shape = header.get('shape');
  if (typeof descr !== 'string') return fail("expected a string 'descr' in the header");
  if (typeof fortranOrder !== 'boolean') return fail("expected True or False for 'fortran_order' in the header");
  if (!Array.isArray(shape)) return fail("expected a tuple of integers for 'shape' in the header");
  const itemSize = ITEM_SIZE[descr];
  if (itemSize === undefined) {
    return fail(`expected element type '<f8', '<f4' or '|u1' (little-endian float64, float32 or uint8), received '${descr}'; convert it with numpy's astype first`);
  }
  if (fortranOrder) fail("expected C order (fortran_order: False), received Fortran order; save a C-contiguous copy (numpy.ascontiguousarray)");
  let count = 1;
  for (const side of shape) count *= side;
  const expectedBytes = count * itemSize;
  const received = bytes.length - dataStart;
  if (received !== expectedBytes) {
    fail(`shape (${shape.join(', ')}) of '${descr}' needs ${expectedBytes} data bytes, the file holds ${received}${received < expectedBytes ? '; the file is truncated' : ''}`);
  }
  const body = bytes.subarray(dataStart);
  let data: Float64Array | Uint8Array;
  if (itemSize === 1) {
    data = body.slice();
  } else {
    // DataView reads work at any byte offset; the header need not leave the data 8-byte aligned.
    const values = new Float64Array(count);
    const bodyView = new DataView(body.buffer, body.byteOffset, body.byteLength);
    if (itemSize === 8) for (let i = 0; i < count; i++) values[i] = bodyView.getFloat64(i * 8, true);
    else for (let i = 0; i < count; i++) values[i] = bodyView.getFloat32(i * 4, true);
    data = values;
  }
  return { shape: [...shape], dtype: descr, data };
}

/**
 * Reads a .npy file from disk (see readNpy for what is accepted).
 * @throws RectboostError `bad-data` naming the file when it is missing,
 *   unreadable or not a readable .npy array.
 * @example const faces = await readNpyFile('reference-data/lfw_subset.npy');
 */
export async function readNpyFile(path: string): Promise<NpyArray> {
  const bytes = await readFileBytes(path, 'bad-data', 'NumPy file');
  return readNpy(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.length), `NumPy file ${path}`);
}

type HeaderValue = string | boolean | number[];

/**
 * Parses the small subset of Python literal syntax that numpy.lib.format writes:
 * `{'key': value, ...}` where a value is a quoted string, True/False, or a tuple of
 * non-negative integers (a one-element tuple keeps its trailing comma). The header is
 * padded with spaces and ends in a newline.
 */
function parseHeaderDict(text: string): Map<string, HeaderValue> {
  let at = 0;
  const skipSpace = (): void => {
    while (at < text.length && /\s/.test(text[at]!)) at++;
  };
  const expect = (character: string): void => {
    skipSpace();
    if (text[at] !== character) throw new Error(`expected '${character}' at character ${at}`);
    at++;
  };
  const readString = (): string => {
    skipSpace();
    const quote = text[at];
    if (quote !== "'" && quote !== '"') throw new Error(`expected a quoted string at character ${at}`);
    const end = text.indexOf(quote, at + 1);
    if (end < 0) throw new Error('unterminated string');
    const value = text.slice(at + 1, end);
    at = end + 1;
    return value;
  };
  const readValue = (): HeaderValue => {
    skipSpace();
    const next = text[at];
    if (next === "'" || next === '"') return readString();
    if (text.startsWith('True', at)) {
      at += 4;
      return true;
    }
    if (text.startsWith('False', at)) {
      at += 5;
      return false;
    }
    if (next === '(') {
      at++;
      const sides: number[] = [];
      for (;;) {
        skipSpace();
        if (text[at] === ')') {
          at++;
          return sides;
        }
        const match = /^\d+/.exec(text.slice(at));
        if (match === null) throw new Error(`expected an integer in the shape at character ${at}`);
        sides.push(Number(match[0]));
        at += match[0].length;
        skipSpace();
        if (text[at] === ',') at++;
        else if (text[at] !== ')') throw new Error(`expected ',' or ')' in the shape at character ${at}`);
      }
    }
    throw new Error(`unexpected value at character ${at}`);
  };
  const entries = new Map<string, HeaderValue>();
  expect('{');
  for (;;) {
    skipSpace();
    if (text[at] === '}') {
      at++;
      break;
    }
    const key = readString();
    expect(':');
    entries.set(key, readValue());
    skipSpace();
    if (text[at] === ',') at++;
    else if (text[at] !== '}') throw new Error(`expected ',' or '}' at character ${at}`);
  }
  skipSpace();
  if (at !== text.length) throw new Error(`unexpected text after the dict at character ${at}`);
  return entries;
}
