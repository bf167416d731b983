import { describe, expect, it } from 'vitest';
import { readNpyFloat64 } from '../../src/data/npy-reader.js';

/** A version-1.0 .npy file built by hand from NumPy's format description (numpy/lib/format.py). */
function npyBytes(header: string, values: number[]): Uint8Array {
  const prefix = 10;
  let text = header;
  while ((prefix + text.length + 1) % 64 !== 0) text += ' '; // NumPy pads the header to 64 bytes
  text += '\n';
  const bytes = new Uint8Array(prefix + text.length + 8 * values.length);
  bytes.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
  new DataView(bytes.buffer).setUint16(8, text.length, true);
  for (let i = 0; i < text.length; i++) bytes[prefix + i] = text.charCodeAt(i);
  const view = new DataView(bytes.buffer);
  values.forEach((value, i) => view.setFloat64(prefix + text.length + 8 * i, value, true));
  return bytes;
}

describe('.npy reader', () => {
  it('reads shape and little-endian float64 values in C order', () => {
    const bytes = npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), }", [0, 0.5, 1, -2, 3.25, 1e-3]);
    const array = readNpyFloat64(bytes, 'hand.npy');
    expect(array.shape).toEqual([2, 3]);
    expect(Array.from(array.data)).toEqual([0, 0.5, 1, -2, 3.25, 1e-3]);
  });

  it('refuses other dtypes with a message naming the file', () => {
    const bytes = npyBytes("{'descr': '<i4', 'fortran_order': False, 'shape': (1,), }", [0]);
    expect(() => readNpyFloat64(bytes, 'ints.npy')).toThrow(/ints\.npy.*dtype is <i4/);
  });

  it('refuses bytes that are not a .npy file', () => {
    expect(() => readNpyFloat64(new TextEncoder().encode('hello world, no magic'), 'text.npy')).toThrow(/magic/);
  });
});
