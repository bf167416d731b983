#!/usr/bin/python3
"""The Python half of rectboost's peer benchmark (npm run bench -- --peers).

Runs the reference libraries on arrays that the Node half wrote as .npy files and
prints one JSON object on stdout (progress goes to stderr). Subcommands:

  versions                 interpreter and library versions, or which are missing
  haar ARGS                scikit-image haar_like_feature on uint8 patches: timing
                           (one process, then a process pool) and every value
  adaboost-round ARGS      fit time of scikit-learn AdaBoost (SAMME) with one depth-1
                           tree on a feature matrix, for C- and Fortran-ordered input
  adaboost-accuracy ARGS   train/test accuracy of the same AdaBoost after R rounds

Meant for Debian's /usr/bin/python3 with python3-skimage and python3-sklearn.
"""
import argparse
import json
import os
import platform
import sys
import time


def log(message):
    print(f'  [python] {message}', file=sys.stderr, flush=True)


def versions():
    found = {'python': platform.python_version(), 'executable': sys.executable}
    missing = []
    for module, key in (('numpy', 'numpy'), ('scipy', 'scipy'), ('skimage', 'scikit-image'), ('sklearn', 'scikit-learn')):
        try:
            found[key] = __import__(module).__version__
        except ImportError:
            missing.append(key)
    try:
        from threadpoolctl import threadpool_info
        found['threadpools'] = [
            {'api': pool.get('internal_api'), 'threads': pool.get('num_threads')} for pool in threadpool_info()
        ]
    except ImportError:
        found['threadpools'] = []
    found['missing'] = missing
    return found


# --- scikit-image feature computation ---------------------------------------------

FEATURE_TYPES = ['type-2-x', 'type-2-y', 'type-3-x', 'type-3-y', 'type-4']
_worker_coords = None


def _worker_start(width, height):
    # Each pool process builds the feature coordinates once, as a user would.
    global _worker_coords
    from skimage.feature import haar_like_feature_coord
    _worker_coords = haar_like_feature_coord(width, height, FEATURE_TYPES)


def _worker_features(patch):
    import numpy as np
    from skimage.feature import haar_like_feature
    from skimage.transform import integral_image
    coords, types = _worker_coords
    table = integral_image(patch.astype(np.float64))
    return haar_like_feature(table, 0, 0, patch.shape[1], patch.shape[0], feature_type=types, feature_coord=coords)


def haar(args):
    import multiprocessing

    import numpy as np
    from skimage.feature import haar_like_feature, haar_like_feature_coord
    from skimage.transform import integral_image

    patches = np.load(args.patches)
    count, height, width = patches.shape
    assert patches.dtype == np.uint8

    start = time.perf_counter()
    coords, types = haar_like_feature_coord(width, height, FEATURE_TYPES)
    coord_seconds = time.perf_counter() - start
    log(f'{len(types)} feature coordinates in {coord_seconds:.2f} s; computing {count} patches in one process')

    values = np.empty((count, len(types)), dtype=np.float64)
    start = time.perf_counter()
    for index in range(count):
        table = integral_image(patches[index].astype(np.float64))
        values[index] = haar_like_feature(table, 0, 0, width, height, feature_type=types, feature_coord=coords)
    one_process_seconds = time.perf_counter() - start

    pool_seconds = None
    if args.processes > 1:
        log(f'again with a pool of {args.processes} processes')
        with multiprocessing.get_context('fork').Pool(args.processes, _worker_start, (width, height)) as pool:
            pool.map(_worker_features, [patches[0]] * args.processes)  # start-up and warm-up, not timed
            start = time.perf_counter()
            pooled = pool.map(_worker_features, list(patches), chunksize=max(1, count // (4 * args.processes)))
            pool_seconds = time.perf_counter() - start
        if not all(np.array_equal(a, b) for a, b in zip(pooled, values)):
            raise SystemExit('scikit-image gave different values in the process pool')

    # skimage's values are integer sums of 8-bit pixels (|v| <= 255 * 576 at 24x24 < 2^24),
    # so float32 keeps them exactly.
    assert np.all(np.abs(values) < 2 ** 24) and np.all(values == np.round(values))
    np.save(args.values_out, values.astype(np.float32))
    # Each feature's kind and first rectangle as x, y, width, height (skimage gives
    # inclusive (row, column) corners).
    kind_of = {name: index for index, name in enumerate(FEATURE_TYPES)}
    described = np.empty((len(types), 5), dtype=np.float32)
    for index, (rects, kind) in enumerate(zip(coords, types)):
        (r0, c0), (r1, c1) = rects[0]
        described[index] = (kind_of[str(kind)], c0, r0, c1 - c0 + 1, r1 - r0 + 1)
    np.save(args.coords_out, described)
    return {
        'patches': int(count),
        'features': int(len(types)),
        'coordinateSeconds': coord_seconds,
        'oneProcessSeconds': one_process_seconds,
        'poolProcesses': args.processes,
        'poolSeconds': pool_seconds,
    }


# --- scikit-learn AdaBoost ---------------------------------------------------------

def _adaboost(rounds):
    from sklearn.ensemble import AdaBoostClassifier
    from sklearn.tree import DecisionTreeClassifier
    # Depth-1 trees (stumps) and SAMME, the discrete multi-class AdaBoost of Zhu et al.
    # 2009, which for two classes is Freund & Schapire's AdaBoost.M1.
    return AdaBoostClassifier(DecisionTreeClassifier(max_depth=1), n_estimators=rounds, algorithm='SAMME', random_state=0)


def adaboost_round(args):
    import numpy as np
    by_feature = np.load(args.matrix, mmap_mode=None)  # features x samples, float32
    labels = np.load(args.labels).astype(np.int64)
    assert by_feature.dtype == np.float32 and by_feature.shape[1] == labels.shape[0]
    layouts = {
        # scikit-learn's documented input: (n_samples, n_features), float32 for trees.
        'C': lambda: np.ascontiguousarray(by_feature.T),
        # The same matrix column-major: a tree reads one feature column at a time.
        'F': lambda: by_feature.T,
    }
    results = []
    for name in args.layouts.split(','):
        samples_by_feature = layouts[name]()
        assert samples_by_feature.dtype == np.float32
        times = []
        for repeat in range(args.repeats):
            log(f'AdaBoost fit with one stump, {name}-ordered {samples_by_feature.shape[0]} x {samples_by_feature.shape[1]}, repeat {repeat + 1}/{args.repeats}')
            model = _adaboost(1)
            start = time.perf_counter()
            model.fit(samples_by_feature, labels)
            times.append(time.perf_counter() - start)
        tree = model.estimators_[0].tree_
        results.append({
            'layout': name,
            'seconds': times,
            'feature': int(tree.feature[0]),
            'threshold': float(tree.threshold[0]),
            'weightedError': float(model.estimator_errors_[0]),
        })
        del samples_by_feature
    return {'samples': int(by_feature.shape[1]), 'features': int(by_feature.shape[0]), 'fits': results}


def adaboost_accuracy(args):
    import numpy as np
    from sklearn.metrics import roc_auc_score
    train = np.load(args.train).T  # stored features x samples; .T is Fortran-ordered samples x features
    test = np.load(args.test).T
    train_labels = np.load(args.train_labels).astype(np.int64)
    test_labels = np.load(args.test_labels).astype(np.int64)
    rounds = [int(r) for r in args.rounds.split(',')]
    log(f'AdaBoost fit with up to {max(rounds)} stumps on {train.shape[0]} x {train.shape[1]}')
    model = _adaboost(max(rounds))
    start = time.perf_counter()
    model.fit(train, train_labels)
    fit_seconds = time.perf_counter() - start
    by_rounds = {}
    for index, (predicted, scores) in enumerate(zip(model.staged_predict(test), model.staged_decision_function(test))):
        used = index + 1
        if used in rounds:
            by_rounds[str(used)] = {
                'accuracy': float(np.mean(predicted == test_labels)),
                'areaUnderRoc': float(roc_auc_score(test_labels, scores)),
            }
    return {'fitSeconds': fit_seconds, 'estimatorsFitted': len(model.estimators_), 'byRounds': by_rounds}


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    commands = parser.add_subparsers(dest='command', required=True)
    commands.add_parser('versions')
    haar_parser = commands.add_parser('haar')
    haar_parser.add_argument('--patches', required=True)
    haar_parser.add_argument('--values-out', required=True)
    haar_parser.add_argument('--coords-out', required=True)
    haar_parser.add_argument('--processes', type=int, default=os.cpu_count() or 1)
    round_parser = commands.add_parser('adaboost-round')
    round_parser.add_argument('--matrix', required=True)
    round_parser.add_argument('--labels', required=True)
    round_parser.add_argument('--layouts', default='C,F')
    round_parser.add_argument('--repeats', type=int, default=1)
    accuracy_parser = commands.add_parser('adaboost-accuracy')
    for name in ('--train', '--train-labels', '--test', '--test-labels', '--rounds'):
        accuracy_parser.add_argument(name, required=True)
    args = parser.parse_args()
    handlers = {'versions': lambda: versions(), 'haar': lambda: haar(args),
                'adaboost-round': lambda: adaboost_round(args), 'adaboost-accuracy': lambda: adaboost_accuracy(args)}
    print(json.dumps(handlers[args.command]()))


if __name__ == '__main__':
    main()
