#!/usr/bin/python3
"""Writes test/fixtures/skimage-haar-features.json from scikit-image.

Reference values for rectboost's Haar-like feature tests: feature counts for
several window sizes (haar_like_feature_coord) and every feature value of one
window size on a few real patches (haar_like_feature). The patches are cut
from sample images that Debian's python3-skimage package ships, and the
fixture records their pixels, so the test needs no Python.

Run with Debian's python3 (apt-get install python3-skimage):
    /usr/bin/python3 scripts/make-feature-fixture.py
"""
import json
import os

import numpy as np
import skimage
from skimage import io
from skimage.feature import haar_like_feature, haar_like_feature_coord
from skimage.transform import integral_image

TYPES = ['type-2-x', 'type-2-y', 'type-3-x', 'type-3-y', 'type-4']
DATA = os.path.join(os.path.dirname(skimage.__file__), 'data')
WINDOW_WIDTH, WINDOW_HEIGHT = 14, 10


def patches():
    camera = io.imread(os.path.join(DATA, 'camera.png'))
    coins = io.imread(os.path.join(DATA, 'coins.png'))
    faces = np.load(os.path.join(DATA, 'lfw_subset.npy'))
    face = np.round(faces[0] * 255).astype(np.uint8)
    return [
        ('camera.png at x=220, y=90', camera[90:90 + WINDOW_HEIGHT, 220:220 + WINDOW_WIDTH]),
        ('coins.png at x=40, y=60', coins[60:60 + WINDOW_HEIGHT, 40:40 + WINDOW_WIDTH]),
        ('lfw_subset.npy face 0 at x=5, y=8', face[8:8 + WINDOW_HEIGHT, 5:5 + WINDOW_WIDTH]),
    ]


def main():
    counts = []
    for width, height in [(24, 24), (19, 19), (20, 12), (7, 5), (3, 9), (1, 1)]:
        per_type = {t: int(len(haar_like_feature_coord(width, height, t)[0])) for t in TYPES}
        counts.append({'width': width, 'height': height, 'perType': per_type})

    coords, types = haar_like_feature_coord(WINDOW_WIDTH, WINDOW_HEIGHT)
    features = []
    for rects, t in zip(coords, types):
        # Each rectangle as [x, y, width, height] from skimage's inclusive (row, col) corners.
        features.append({
            'type': str(t),
            'rects': [[int(c0), int(r0), int(c1 - c0 + 1), int(r1 - r0 + 1)] for (r0, c0), (r1, c1) in rects],
        })

    samples = []
    for label, patch in patches():
        patch = np.ascontiguousarray(patch, dtype=np.uint8)
        assert patch.shape == (WINDOW_HEIGHT, WINDOW_WIDTH)
        values = haar_like_feature(integral_image(patch.astype(np.float64)), 0, 0,
                                   WINDOW_WIDTH, WINDOW_HEIGHT, feature_type=types, feature_coord=coords)
        samples.append({
            'source': label,
            'pixels': patch.ravel().tolist(),
            'values': [int(round(v)) for v in values],
        })

    fixture = {
        'generator': 'scripts/make-feature-fixture.py',
        'library': 'scikit-image',
        'libraryVersion': skimage.__version__,
        'counts': counts,
        'windowWidth': WINDOW_WIDTH,
        'windowHeight': WINDOW_HEIGHT,
        'features': features,
        'samples': samples,
    }
    out = os.path.join(os.path.dirname(__file__), '..', 'test', 'fixtures', 'skimage-haar-features.json')
    with open(out, 'w') as handle:
        json.dump(fixture, handle, separators=(',', ':'))
        handle.write('\n')
    print(f'wrote {out}: {len(features)} features, {len(samples)} patches, scikit-image {skimage.__version__}')


if __name__ == '__main__':
    main()
