"""Reference run: scikit-learn's AdaBoostClassifier(algorithm="SAMME") loop
driving a textbook minimum-weighted-error decision stump, on the Wisconsin
diagnostic breast-cancer data shipped with scikit-learn
(sklearn.datasets.load_breast_cancer; UCI; Street, Wolberg & Mangasarian 1993).

Usage: /usr/bin/python3 adaboost_stump_reference.py OUT_DIR ROUNDS
Writes OUT_DIR/data.json (the very numbers both sides train on) and
OUT_DIR/reference.json (per-round stump, error and estimator weight, and the
final decision function).

The stump's dictionary and tie-break match the TypeScript engine's exact mode:
features in column order, thresholds at midpoints of neighbouring distinct
values in ascending order, h(x) = s if x > t else -s, s = sign of the edge
(+1 on a zero edge), and a later candidate wins only if its |edge| is larger
by more than 1e-12.
"""
import json
import os
import sys

import numpy as np
from sklearn.base import BaseEstimator, ClassifierMixin
from sklearn.datasets import load_breast_cancer
from sklearn.ensemble import AdaBoostClassifier

TIE_TOLERANCE = 1e-12


def midpoint(a, b):
    m = (a + b) / 2.0
    return m if (a <= m < b) else a


class MinErrorStump(ClassifierMixin, BaseEstimator):
    """Brute force over features and midpoints: the stump with the smallest weighted error."""

    def fit(self, X, y, sample_weight=None):
        X = np.asarray(X, dtype=np.float64)
        self.classes_ = np.unique(y)
        ys = np.where(y == self.classes_[1], 1.0, -1.0)
        d = np.ones(len(ys)) if sample_weight is None else np.asarray(sample_weight, dtype=np.float64)
        W = d.sum()
        best = -1.0
        self.feature_, self.threshold_, self.polarity_ = None, None, 1
        for j in range(X.shape[1]):
            v = np.unique(X[:, j])
            if len(v) < 2:
                continue
            thresholds = np.array([midpoint(v[k], v[k + 1]) for k in range(len(v) - 1)])
            # right[k, i] = x_ij > t_k: every candidate stump evaluated on every row
            right = X[None, :, j] > thresholds[:, None]
            pred_plus = np.where(right, 1.0, -1.0)
            err_plus = ((pred_plus != ys[None, :]) * d[None, :]).sum(axis=1) / W
            raw = 1.0 - 2.0 * err_plus  # edge of polarity +1
            for k in range(len(thresholds)):
                a = abs(raw[k])
                if a > best + TIE_TOLERANCE:
                    best = a
                    self.feature_ = j
                    self.threshold_ = float(thresholds[k])
                    self.polarity_ = -1 if raw[k] < 0 else 1
        return self

    def predict(self, X):
        X = np.asarray(X, dtype=np.float64)
        h = np.where(X[:, self.feature_] > self.threshold_, self.polarity_, -self.polarity_)
        return np.where(h > 0, self.classes_[1], self.classes_[0])


def main():
    out_dir, rounds = sys.argv[1], int(sys.argv[2])
    data = load_breast_cancer()
    X, y = data.data.astype(np.float64), data.target
    with open(os.path.join(out_dir, "data.json"), "w") as fh:
        json.dump(
            {
                "features": [str(f) for f in data.feature_names],
                "columns": [X[:, j].tolist() for j in range(X.shape[1])],
                "target": y.tolist(),
            },
            fh,
        )
    clf = AdaBoostClassifier(estimator=MinErrorStump(), n_estimators=rounds, algorithm="SAMME", learning_rate=1.0)
    clf.fit(X, y)
    out = {
        "sklearn": __import__("sklearn").__version__,
        "rounds": [
            {
                "feature": int(e.feature_),
                "threshold": e.threshold_,
                "polarity": int(e.polarity_),
                "error": float(err),
                "weight": float(w),
            }
            for e, err, w in zip(clf.estimators_, clf.estimator_errors_, clf.estimator_weights_)
        ],
        "decision": clf.decision_function(X).tolist(),
    }
    with open(os.path.join(out_dir, "reference.json"), "w") as fh:
        json.dump(out, fh)


if __name__ == "__main__":
    main()
