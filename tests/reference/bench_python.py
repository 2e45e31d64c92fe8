"""Benchmark child for XGBoost and scikit-learn (run by tests/bench/train.ts).

Usage: /usr/bin/python3 bench_python.py {xgboost|sklearn} DIR ROUNDS THREADS TRAIN_ROWS
Reads DIR/meta.json and raw little-endian binaries written by the TypeScript side:
X_train.f64 / X_test.f64 (column-major, NaN = missing, categoricals as integer codes),
y_train.i8 / y_test.i8 (0/1). Prints one JSON line of figures.

XGBoost: tree_method="hist", max_depth=1 (stumps), binary:logistic, nthread=THREADS.
scikit-learn: AdaBoostClassifier(algorithm="SAMME") over depth-1 trees; its trees take
no NaN in 1.2, so missing values are set to -1 for it (not timed).
"""
import json
import os
import sys
import time

import numpy as np


def status_kb(field):
    with open("/proc/self/status") as fh:
        for line in fh:
            if line.startswith(field + ":"):
                return int(line.split()[1])
    return 0


def reset_peak():
    """Resets VmHWM to the current RSS (Linux clear_refs 5), so the peak measures training only."""
    try:
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")
    except OSError:
        pass
    return status_kb("VmRSS")


def peak_mb(base):
    return (status_kb("VmHWM") - base) / 1024


def load(d, split, n, total, F):
    """The first n rows of a column-major file holding `total` rows per column."""
    path = os.path.join(d, f"X_{split}.f64")
    X = np.empty((n, F), dtype=np.float64)
    for j in range(F):
        X[:, j] = np.fromfile(path, dtype="<f8", count=n, offset=8 * j * total)
    y = np.fromfile(os.path.join(d, f"y_{split}.i8"), dtype=np.int8, count=n).astype(np.float64)
    return X, y


def main():
    which, d, rounds, threads, train_rows = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4]), int(sys.argv[5])
    meta = json.load(open(os.path.join(d, "meta.json")))
    F = meta["features"]
    X, y = load(d, "train", train_rows, meta["train_rows"], F)
    Xt, yt = load(d, "test", meta["test_rows"], meta["test_rows"], F)
    from sklearn.metrics import roc_auc_score

    out = {"which": which, "rows": int(X.shape[0]), "rounds": rounds, "threads": threads}
    if which == "xgboost":
        import xgboost as xgb

        t0 = time.perf_counter()
        dtrain = xgb.DMatrix(X, label=y, nthread=threads)
        out["prepare_s"] = time.perf_counter() - t0
        class Stamps(xgb.callback.TrainingCallback):
            def __init__(self):
                self.t = []

            def after_iteration(self, model, epoch, evals_log):
                self.t.append(time.perf_counter())
                return False

        stamps = Stamps()
        base = reset_peak()
        params = {"tree_method": "hist", "max_depth": 1, "objective": "binary:logistic", "nthread": threads, "max_bin": 256}
        t0 = time.perf_counter()
        booster = xgb.train(params, dtrain, num_boost_round=rounds, callbacks=[stamps])
        out["fit_s"] = time.perf_counter() - t0
        # steady-state round time (the first round also builds the quantile sketch)
        out["ms_per_round"] = 1000 * (stamps.t[-1] - stamps.t[0]) / max(1, len(stamps.t) - 1)
        out["peak_mb"] = peak_mb(base)
        dtest = xgb.DMatrix(Xt, nthread=threads)
        t0 = time.perf_counter()
        p = booster.predict(dtest)
        out["score_rows_per_s"] = len(yt) / (time.perf_counter() - t0)
        out["auc"] = float(roc_auc_score(yt, p))
    else:
        from sklearn.ensemble import AdaBoostClassifier
        from sklearn.tree import DecisionTreeClassifier

        X = np.where(np.isnan(X), -1.0, X)
        Xt = np.where(np.isnan(Xt), -1.0, Xt)
        base = reset_peak()
        clf = AdaBoostClassifier(estimator=DecisionTreeClassifier(max_depth=1), n_estimators=rounds, algorithm="SAMME")
        t0 = time.perf_counter()
        clf.fit(X, y)
        out["fit_s"] = time.perf_counter() - t0
        out["rounds"] = len(clf.estimators_)
        out["peak_mb"] = peak_mb(base)
        t0 = time.perf_counter()
        s = clf.decision_function(Xt)
        out["score_rows_per_s"] = len(yt) / (time.perf_counter() - t0)
        out["auc"] = float(roc_auc_score(yt, s))
    if "ms_per_round" not in out:
        out["ms_per_round"] = 1000 * out["fit_s"] / max(1, out["rounds"])
    print(json.dumps(out))


if __name__ == "__main__":
    main()
