#!/usr/bin/python3
"""Writes ranking_golden.json: reference ROC areas, average precisions and
curve points for score's tests, made with a general-purpose library.

Library: scikit-learn 1.2.1 with numpy 1.24.2, as packaged by Debian 12
(apt-get install python3-sklearn). Functions: sklearn.metrics.roc_auc_score,
average_precision_score, roc_curve(drop_intermediate=False) and
precision_recall_curve.

Run from the repository root:  /usr/bin/python3 score/testdata/ranking_golden.py
The Go tests read only the JSON file; they never run Python.
"""
import csv
import json

import numpy as np
import sklearn
from sklearn.metrics import (average_precision_score, precision_recall_curve,
                             roc_auc_score, roc_curve)

assert sklearn.__version__ == "1.2.1", sklearn.__version__
assert np.__version__ == "1.24.2", np.__version__

out = {
    "library": "scikit-learn %s, numpy %s (Debian 12 python3-sklearn)" % (sklearn.__version__, np.__version__),
    "script": "score/testdata/ranking_golden.py",
}

# The hand-worked example of TestRankingWorkedExample (ranking_test.go).
hand_scores = [0.9, 0.8, 0.8, 0.6, 0.6, 0.6, 0.3, 0.3]
hand_pos = [1, 1, 0, 1, 0, 0, 0, 1]
out["hand"] = {
    "scores": hand_scores,
    "positive": hand_pos,
    "roc_auc": roc_auc_score(hand_pos, hand_scores),
    "average_precision": average_precision_score(hand_pos, hand_scores),
}

# wdbc scored by a small trained model (wdbc-probabilities.sh).
with open("score/testdata/wdbc-probabilities.csv", newline="") as f:
    rows = list(csv.reader(f))
header, rows = rows[0], rows[1:]
classes = [h[len("p_"):] for h in header[1:]]
P = np.array([[float(v) for v in r[1:]] for r in rows])
Y = np.array([[1 if r[0] == c else 0 for c in classes] for r in rows])
per_class = []
for k, c in enumerate(classes):
    e = {
        "class": c,
        "roc_auc": roc_auc_score(Y[:, k], P[:, k]),
        "average_precision": average_precision_score(Y[:, k], P[:, k]),
    }
    if k == 0:  # curve points of the first class only, to keep the file small
        fpr, tpr, _ = roc_curve(Y[:, k], P[:, k], drop_intermediate=False)
        prec, rec, _ = precision_recall_curve(Y[:, k], P[:, k])
        # precision_recall_curve lists thresholds ascending and appends the
        # point (recall 0, precision 1); drop it and reverse to descending.
        e["roc_fpr"] = fpr.tolist()
        e["roc_tpr"] = tpr.tolist()
        e["pr_precision"] = prec[:-1][::-1].tolist()
        e["pr_recall"] = rec[:-1][::-1].tolist()
    per_class.append(e)
out["wdbc"] = {
    "rows": len(rows),
    "classes": classes,
    "per_class": per_class,
    "macro_roc_auc": roc_auc_score(Y, P, average="macro"),
    "macro_average_precision": average_precision_score(Y, P, average="macro"),
}

with open("score/testdata/ranking_golden.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
