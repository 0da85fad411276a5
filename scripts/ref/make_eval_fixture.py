#!/usr/bin/python3
"""Generate reference values for pkg/eval from the Debian-packaged scikit-learn.

Run from the repository root with the system interpreter (not a pyenv one):

    /usr/bin/python3 scripts/ref/make_eval_fixture.py

It writes testdata/eval/sklearn_cases.json. Every case holds binary labels
(1 = anomaly), scores (higher = more anomalous) and what scikit-learn returns
for them:

  auc         sklearn.metrics.roc_auc_score(labels, scores)
  pauc        {max_fpr: sklearn.metrics.roc_auc_score(labels, scores, max_fpr=p)}
  roc_fpr, roc_tpr, roc_thresholds
              sklearn.metrics.roc_curve(labels, scores, drop_intermediate=False);
              the first threshold is left out because its value is a
              version-dependent sentinel (max+1 in 1.2, +inf from 1.3 on).

The generator is deterministic (numpy default_rng with fixed seeds).
"""

import json
import os
import sys

import numpy as np
import sklearn
from sklearn.metrics import roc_auc_score, roc_curve

MAX_FPRS = [0.05, 0.1, 0.3, 1.0]
OUT = os.path.join("testdata", "eval", "sklearn_cases.json")


def both_classes(labels):
    labels = list(labels)
    if 0 not in labels:
        labels[0] = 0
    if 1 not in labels:
        labels[-1] = 1
    return labels


def cases():
    rng = np.random.default_rng(20240611)
    out = []

    # Random continuous scores, moderately separated.
    n = 40
    y = both_classes(rng.integers(0, 2, n))
    s = rng.normal(0.0, 1.0, n) + 0.8 * np.array(y)
    out.append(("random_n40", y, s))

    # Heavy ties: only four distinct score values.
    n = 60
    y = both_classes(rng.integers(0, 2, n))
    s = rng.integers(0, 4, n) + np.array(y) * rng.integers(0, 2, n)
    out.append(("heavy_ties", y, s.astype(float)))

    # Every score tied: the ROC is the chance diagonal.
    y = [0, 1, 0, 0, 1, 1, 0, 1, 0, 0]
    out.append(("all_tied", y, [0.5] * len(y)))

    # Perfect separation.
    y = [0] * 12 + [1] * 5
    s = list(rng.uniform(0.0, 0.4, 12)) + list(rng.uniform(0.6, 1.0, 5))
    out.append(("perfect", y, s))

    # Inverted: every anomaly scores below every normal.
    y = [0] * 9 + [1] * 6
    s = list(rng.uniform(0.6, 1.0, 9)) + list(rng.uniform(0.0, 0.4, 6))
    out.append(("inverted", y, s))

    # Smallest useful inputs.
    out.append(("small_n3_a", [0, 1, 1], [0.2, 0.7, 0.1]))
    out.append(("small_n3_b", [1, 0, 0], [0.3, 0.3, 0.9]))

    # Larger set with rounding to one decimal, which creates many ties.
    n = 500
    y = (rng.uniform(0.0, 1.0, n) < 0.15).astype(int)
    s = np.round(rng.gamma(2.0, 0.5, n) + 0.7 * y, 1)
    out.append(("large_n500_rounded", both_classes(y), s))

    # 20 normals: FPR steps of 0.05 land exactly on 0.1.
    y = [0] * 20 + [1] * 10
    s = rng.integers(0, 12, 30) + 2 * np.array(y)
    out.append(("fpr_grid_n30", y, s.astype(float)))

    # Typical monitoring balance: few anomalies among many normals.
    y = [0] * 200 + [1] * 7
    s = list(rng.gamma(3.0, 0.02, 200)) + list(rng.gamma(3.0, 0.02, 7) + 0.05)
    out.append(("imbalanced_n207", y, s))
    return out


def main():
    result = {
        "source": "scikit-learn %s (Debian python3-sklearn), numpy %s"
        % (sklearn.__version__, np.__version__),
        "generator": "scripts/ref/make_eval_fixture.py",
        "cases": [],
    }
    for name, y, s in cases():
        y = [int(v) for v in y]
        s = [float(v) for v in s]
        fpr, tpr, thr = roc_curve(y, s, drop_intermediate=False)
        pauc = {}
        for p in MAX_FPRS:
            pauc[repr(p)] = float(roc_auc_score(y, s, max_fpr=p))
        result["cases"].append(
            {
                "name": name,
                "labels": y,
                "scores": s,
                "auc": float(roc_auc_score(y, s)),
                "pauc": pauc,
                "roc_fpr": [float(v) for v in fpr],
                "roc_tpr": [float(v) for v in tpr],
                "roc_thresholds": [float(v) for v in thr[1:]],
            }
        )
    with open(OUT, "w") as f:
        json.dump(result, f, indent=1)
        f.write("\n")
    print("wrote %s: %d cases, %s" % (OUT, len(result["cases"]), result["source"]))


if __name__ == "__main__":
    sys.exit(main())
