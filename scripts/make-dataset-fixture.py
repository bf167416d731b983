#!/usr/bin/python3
"""Writes test/fixtures/dataset-reference.json: reference values read by NumPy.

rectboost reads two open data sets with its own readers (src/data/npy-reader.ts and
src/data/idx-reader.ts). This script loads the same files with NumPy's own code --
numpy.load for lfw_subset.npy (scikit-image's data folder) and gzip + numpy.frombuffer
for the Fashion-MNIST IDX files (Xiao, Rasul & Vollgraf 2017), skipping the header
whose length the IDX description fixes (16 bytes for images, 8 for labels) -- and
records shapes, a few pixel values and sums, with NumPy's version, so the tests can
compare without Python.

Run with Debian's python3 from the repository root, after scripts/fetch-reference-data.sh:
    /usr/bin/python3 scripts/make-dataset-fixture.py
"""
import gzip
import json
import os
import platform

import numpy as np

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..')
DATA = os.path.join(ROOT, 'reference-data')
OUT = os.path.join(ROOT, 'test', 'fixtures', 'dataset-reference.json')

# (item, row, column) positions sampled for pixel checks: corners, centre and a few others.
POSITIONS = [(0, 0, 0), (0, 12, 12), (7, 3, 20), (99, 24, 24), (100, 0, 0), (150, 10, 5), (199, 24, 0)]
FASHION_POSITIONS = [(0, 0, 0), (0, 14, 14), (1, 10, 7), (123, 20, 3), (9999, 27, 27), (4567, 13, 16)]


def lfw():
    array = np.load(os.path.join(DATA, 'lfw_subset.npy'))
    as_bytes = np.clip(np.round(array * 255), 0, 255).astype(np.uint8)
    return {
        'file': 'lfw_subset.npy',
        'shape': list(array.shape),
        'dtype': array.dtype.str,
        # repr() of a Python float is the shortest text that round-trips the float64 exactly.
        'pixels': [{'item': i, 'row': r, 'column': c, 'value': float(array[i, r, c]), 'byte': int(as_bytes[i, r, c])}
                   for i, r, c in POSITIONS],
        'sumOfAll': float(array.sum(dtype=np.float64)),
        'byteSumOfFaces': int(as_bytes[:100].sum(dtype=np.int64)),
        'byteSumOfNonFaces': int(as_bytes[100:].sum(dtype=np.int64)),
        'byteSumOfItem': {str(i): int(as_bytes[i].sum(dtype=np.int64)) for i in (0, 1, 99, 100, 199)},
    }


def idx(path, header_bytes):
    with gzip.open(path, 'rb') as handle:
        return np.frombuffer(handle.read(), dtype=np.uint8, offset=header_bytes)


def fashion(split):
    prefix = 'train' if split == 'train' else 't10k'
    folder = os.path.join(DATA, 'fashion-mnist')
    labels = idx(os.path.join(folder, f'{prefix}-labels-idx1-ubyte.gz'), 8)
    images = idx(os.path.join(folder, f'{prefix}-images-idx3-ubyte.gz'), 16).reshape(len(labels), 28, 28)
    entry = {
        'split': split,
        'shape': list(images.shape),
        'labelCounts': [int(n) for n in np.bincount(labels, minlength=10)],
        'firstLabels': [int(v) for v in labels[:20]],
        'byteSumOfAll': int(images.sum(dtype=np.int64)),
        'byteSumOfItem': {str(i): int(images[i].sum(dtype=np.int64)) for i in (0, 1, len(labels) - 1)},
    }
    if split == 'test':
        entry['pixels'] = [{'item': i, 'row': r, 'column': c, 'byte': int(images[i, r, c])} for i, r, c in FASHION_POSITIONS]
    return entry


def main():
    fixture = {
        'tool': 'numpy',
        'numpyVersion': np.__version__,
        'pythonVersion': platform.python_version(),
        'madeBy': 'scripts/make-dataset-fixture.py',
        'lfwSubset': lfw(),
        'fashionMnist': [fashion('train'), fashion('test')],
    }
    with open(OUT, 'w') as handle:
        json.dump(fixture, handle, indent=1)
        handle.write('\n')
    print(f'wrote {OUT} with numpy {np.__version__}')


if __name__ == '__main__':
    main()
