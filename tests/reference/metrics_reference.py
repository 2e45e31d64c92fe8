"""Reference metrics from scikit-learn (and pandas for the per-day alert budget)
on score arrays written by the TypeScript tests.

Usage: /usr/bin/python3 metrics_reference.py IN.json OUT.json
IN.json: {"labels": [+1/-1...], "scores": [...], "probabilities": [...],
          "platt_margins": [...], "platt_labels": [...],
          "days": [...], "amounts": [...], "budget": k}
"""
import json
import sys

import numpy as np
import pandas as pd
from sklearn.calibration import _sigmoid_calibration, calibration_curve
from sklearn.metrics import average_precision_score, brier_score_loss, roc_auc_score


def main():
    with open(sys.argv[1]) as fh:
        d = json.load(fh)
    y = (np.asarray(d["labels"]) > 0).astype(int)
    s = np.asarray(d["scores"], dtype=np.float64)
    p = np.asarray(d["probabilities"], dtype=np.float64)
    out = {
        "roc_auc": float(roc_auc_score(y, s)),
        "average_precision": float(average_precision_score(y, s)),
        "brier": float(brier_score_loss(y, p)),
    }
    F = np.asarray(d["platt_margins"], dtype=np.float64)
    yp = (np.asarray(d["platt_labels"]) > 0).astype(int)
    A, B = _sigmoid_calibration(F, yp)
    out["platt_A"], out["platt_B"] = float(A), float(B)
    prob_true, prob_pred = calibration_curve(y, p, n_bins=10, strategy="uniform")
    out["calibration_true"], out["calibration_pred"] = prob_true.tolist(), prob_pred.tolist()
    df = pd.DataFrame({"day": d["days"], "score": s, "y": y, "amount": d["amounts"], "row": np.arange(len(y))})
    alerted = df.sort_values(["day", "score", "row"], ascending=[True, False, True]).groupby("day").head(d["budget"])
    out["budget_alerts"] = int(len(alerted))
    out["budget_precision"] = float(alerted["y"].mean())
    out["budget_recall"] = float(alerted["y"].sum() / df["y"].sum())
    out["budget_amount_recall"] = float((alerted["amount"] * alerted["y"]).sum() / (df["amount"] * df["y"]).sum())
    with open(sys.argv[2], "w") as fh:
        json.dump(out, fh)


if __name__ == "__main__":
    main()
