#!/usr/bin/python3
"""Golden encoded matrices for seine's encode package tests.

Reference library: scikit-learn 1.2.1 with numpy 1.24.2, from Debian's
python3-sklearn and python3-numpy packages (run with /usr/bin/python3).
The encoders are fitted on the training rows only: row i (0-based, in file
order) is a training row when i % 5 != 0. Every row is then encoded and
written with 17 significant digits, so that the Go test can compare within
rounding.

  golden-votes-level.csv  votes: each column one-hot over its levels sorted
                          ("n", "y"), plus a last unit for "?" (missing as a
                          level of its own: OneHotEncoder treats NaN as a
                          category, placed last)
  golden-votes-mode.csv   votes: "?" replaced by the column's most frequent
                          training value (SimpleImputer most_frequent, the
                          smallest on ties), then one-hot over ("n", "y")
  golden-bcw-median.csv   breast-cancer-wisconsin: the 9 scores, "?" replaced
                          by the training median (SimpleImputer median); id
                          and class left out; not scaled
"""
import csv

import numpy as np
import sklearn
from sklearn.impute import SimpleImputer
from sklearn.preprocessing import OneHotEncoder

assert sklearn.__version__ == "1.2.1", sklearn.__version__


def read(path):
    with open(path, newline="") as f:
        rows = list(csv.reader(f))
    return rows[0], rows[1:]


def write(path, m):
    with open(path, "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["# made by golden.py with scikit-learn %s, numpy %s" % (sklearn.__version__, np.__version__)])
        for row in m:
            w.writerow(["%.17g" % v for v in row])


def train_rows(n):
    return [i for i in range(n) if i % 5 != 0]


head, rows = read("votes.csv")
x = np.array([[np.nan if c == "?" else c for c in r[:-1]] for r in rows], dtype=object)
tr = train_rows(len(rows))

enc = OneHotEncoder(categories="auto", handle_unknown="error", sparse_output=False)
enc.fit(x[tr])
for cats in enc.categories_:
    assert [c for c in cats if isinstance(c, str)] == ["n", "y"], cats
write("golden-votes-level.csv", enc.transform(x))

imp = SimpleImputer(missing_values=np.nan, strategy="most_frequent")
imp.fit(x[tr])
filled = imp.transform(x)
enc = OneHotEncoder(categories="auto", sparse_output=False)
enc.fit(filled[tr])
write("golden-votes-mode.csv", enc.transform(filled))

head, rows = read("breast-cancer-wisconsin.csv")
x = np.array([[np.nan if c == "?" else float(c) for c in r[1:-1]] for r in rows], dtype=float)
tr = train_rows(len(rows))
imp = SimpleImputer(missing_values=np.nan, strategy="median")
imp.fit(x[tr])
write("golden-bcw-median.csv", imp.transform(x))
