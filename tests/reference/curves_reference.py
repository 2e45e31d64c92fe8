"""Reference ROC and precision-recall curve points from scikit-learn on score
arrays written by the TypeScript tests.

Usage: /usr/bin/python3 curves_reference.py IN.json OUT.json
IN.json: {"labels": [+1/-1...], "scores": [...]}
"""
import json
import sys

import numpy as np
from sklearn.metrics import precision_recall_curve, roc_curve


def main():
    with open(sys.argv[1]) as fh:
        d = json.load(fh)
    y = (np.asarray(d["labels"]) > 0).astype(int)
    s = np.asarray(d["scores"], dtype=np.float64)
    fpr, tpr, _ = roc_curve(y, s, drop_intermediate=False)
    precision, recall, _ = precision_recall_curve(y, s)
    # sklearn lists PR points by ascending threshold with a final (recall 0, precision 1) point; drop it and reverse.
    out = {
        "roc": [[float(a), float(b)] for a, b in zip(fpr, tpr)],
        "pr": [[float(r), float(p)] for r, p in zip(recall[:-1][::-1], precision[:-1][::-1])],
    }
    with open(sys.argv[2], "w") as fh:
        json.dump(out, fh)


if __name__ == "__main__":
    main()
