#!/usr/bin/python3
"""Writes test/fixtures/numpy-npy-files.json: the exact bytes numpy.save writes.

Reference for rectboost's .npy writer (src/data/npy-writer.ts): a few small
arrays of each element type the writer supports, with the whole file numpy.save
produces, base64-encoded, and the NumPy version that produced them.

Run with Debian's python3 (apt-get install python3-numpy):
    /usr/bin/python3 scripts/make-npy-writer-fixture.py
"""
import base64
import io
import json
import os

import numpy as np

CASES = [
    ('float32 2x3', np.array([[0, 0.5, -1.25], [3e6, 1e-3, 146880]], dtype='<f4')),
    ('float64 vector of 3', np.array([0.1, -2.5, 1e300], dtype='<f8')),
    ('uint8 2x2x2', np.arange(8, dtype=np.uint8).reshape(2, 2, 2) * 31),
    ('uint8 empty 0x5', np.zeros((0, 5), dtype=np.uint8)),
    ('float32 scalar', np.array(7.5, dtype='<f4')),
]


def main():
    cases = []
    for label, array in CASES:
        buffer = io.BytesIO()
        np.save(buffer, array)
        cases.append({
            'label': label,
            'shape': list(array.shape),
            'dtype': array.dtype.str,
            'values': array.ravel().tolist(),
            'fileBase64': base64.b64encode(buffer.getvalue()).decode('ascii'),
        })
    fixture = {'generator': 'scripts/make-npy-writer-fixture.py', 'library': 'numpy', 'libraryVersion': np.__version__, 'cases': cases}
    out = os.path.join(os.path.dirname(__file__), '..', 'test', 'fixtures', 'numpy-npy-files.json')
    with open(out, 'w') as handle:
        json.dump(fixture, handle, indent=1)
        handle.write('\n')
    print(f'wrote {out}: {len(cases)} arrays, numpy {np.__version__}')


if __name__ == '__main__':
    main()
