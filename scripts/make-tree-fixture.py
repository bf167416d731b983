#!/usr/bin/python3
"""Writes test/fixtures/sklearn-trees.json from scikit-learn.

Reference for rectboost's small trees as weak classifiers (weak depth 2): the first two
boosting rounds of
  - Gentle AdaBoost: DecisionTreeRegressor(max_depth=2) fitted on targets y in {-1, +1}
    with sample_weight (the weighted least-squares regression tree; the round's weak
    classifier is the tree's prediction, the weights then become w * exp(-y f(x))), and
  - Discrete AdaBoost: DecisionTreeClassifier(max_depth=2) (Gini criterion) with
    sample_weight, its leaves voting +-1 with alpha = 1/2 ln((1 - e)/e) from the tree's
    weighted error e, the weights then w * exp(-y alpha h(x)),
on a small problem with integer feature values 0..255 (rectboost's 8-bit binning is then
exact) and no two samples sharing a value of a feature. The first round's weights are
random (not uniform), so sample_weight matters.

For each fitted tree the fixture records the root feature, every sample's leaf (apply)
and prediction (predict), so a test can compare features, partitions of the samples and
leaf outputs. sklearn breaks ties between equally good splits by a random feature order;
rectboost by feature index and lowest bin. The script therefore keeps only a data seed
for which, at every split node of every recorded tree, sklearn's split is the unique best
under the node's own weighted criterion by a margin, checked here by brute force over
every feature and every threshold between distinct values.

Run with Debian's python3 (apt-get install python3-sklearn):
    /usr/bin/python3 scripts/make-tree-fixture.py
"""
import json
import os

import numpy as np
import sklearn
from sklearn.tree import DecisionTreeClassifier, DecisionTreeRegressor

SAMPLES, FEATURES = 70, 8
MARGIN = 1e-6


def make_data(seed):
    rng = np.random.RandomState(seed)
    x = np.stack([rng.choice(256, SAMPLES, replace=False) for _ in range(FEATURES)], axis=1)
    # An exclusive-or of two features plus noise: a depth-2 tree helps, a stump does not alone.
    a = x[:, 1] > 128
    b = x[:, 4] > 110
    score = np.where(a ^ b, 1.0, -1.0) + (x[:, 6] - 128) / 200.0 + rng.normal(0, 0.6, SAMPLES)
    y = np.where(score > 0, 1, -1)
    order = np.argsort(-y, kind="stable")  # positives first, as rectboost stores samples
    weights = rng.uniform(0.2, 1.0, SAMPLES)
    return x[order], y[order], weights[order] / weights[order].sum()


def node_cost(y, w, kind):
    """The weighted criterion of one node, scaled by its weight (argmin-equivalent to sklearn's)."""
    total = w.sum()
    if total <= 0:
        return 0.0
    if kind == "regression":
        mean = (w * y).sum() / total
        return float((w * (y - mean) ** 2).sum())
    p = w[y == 1].sum() / total
    return float(total * (1 - p * p - (1 - p) * (1 - p)))


def check_unique_splits(tree, x, y, w, kind):
    """At every split node: sklearn's split is the unique brute-force best by MARGIN."""
    t = tree.tree_
    reach = tree.decision_path(x).toarray().astype(bool)
    for node in range(t.node_count):
        if t.children_left[node] == -1:
            continue
        inside = reach[:, node]
        xs, ys, ws = x[inside], y[inside], w[inside]
        costs = []
        for f in range(x.shape[1]):
            values = np.unique(xs[:, f])
            for lo, hi in zip(values[:-1], values[1:]):
                below = xs[:, f] <= (lo + hi) / 2
                costs.append((node_cost(ys[below], ws[below], kind) + node_cost(ys[~below], ws[~below], kind), f, (lo + hi) / 2))
        costs.sort()
        best = costs[0]
        if len(costs) > 1 and costs[1][0] - best[0] < MARGIN:
            return False
        if best[1] != t.feature[node] or abs(best[2] - t.threshold[node]) > 1e-9:
            return False
    return True


def fit_rounds(x, y, w, kind):
    rounds = []
    for _ in range(2):
        if kind == "regression":
            tree = DecisionTreeRegressor(max_depth=2, random_state=0).fit(x, y, sample_weight=w)
            outputs = tree.predict(x)
            error = float((w * (y - outputs) ** 2).sum())
            alpha = 1.0
        else:
            tree = DecisionTreeClassifier(max_depth=2, random_state=0).fit(x, y, sample_weight=w)
            votes = tree.predict(x)
            error = float(w[votes != y].sum() / w.sum())
            alpha = 0.5 * np.log((1 - error) / error)
            outputs = alpha * votes
        if tree.get_depth() != 2 or not check_unique_splits(tree, x, y, w, kind):
            return None
        rounds.append({
            "weights": w.tolist(),
            "rootFeature": int(tree.tree_.feature[0]),
            "leaves": tree.apply(x).astype(int).tolist(),
            "predictions": tree.predict(x).astype(float).tolist(),
            "weightedError": error,
            "alpha": float(alpha),
        })
        w = w * np.exp(-y * outputs)
        w = w / w.sum()
    return rounds


def main():
    for seed in range(2000):
        x, y, w = make_data(seed)
        if min((y == 1).sum(), (y == -1).sum()) < 20:
            continue
        regression = fit_rounds(x, y, w, "regression")
        classification = fit_rounds(x, y, w, "classification")
        if regression is not None and classification is not None:
            break
    else:
        raise SystemExit("no seed met the no-ties / unique-best-split conditions")
    out = os.path.join(os.path.dirname(__file__), "..", "test", "fixtures", "sklearn-trees.json")
    with open(out, "w") as handle:
        json.dump({
            "tool": "scikit-learn DecisionTreeRegressor(max_depth=2) and DecisionTreeClassifier(max_depth=2), random_state=0, with sample_weight",
            "libraryVersion": sklearn.__version__,
            "numpyVersion": np.__version__,
            "generator": "scripts/make-tree-fixture.py",
            "dataSeed": seed,
            "positiveCount": int((y == 1).sum()),
            "values": x.T.astype(int).tolist(),
            "labels": y.astype(int).tolist(),
            "gentle": regression,
            "discrete": classification,
        }, handle, indent=1)
        handle.write("\n")
    print(f"wrote {out}: seed {seed}, sklearn {sklearn.__version__}, numpy {np.__version__}")


if __name__ == "__main__":
    main()
