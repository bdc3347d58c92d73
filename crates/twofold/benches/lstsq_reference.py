#!/usr/bin/env python3
"""The general-purpose least-squares reference for the analysis benchmark (analysis_vs_lstsq.rs).

Reads a coded CSV table (factor columns A, B, ..., then the response Y), builds the model of the
intercept, every main effect and every two-factor interaction, solves it with numpy's lstsq and
prints the coefficients with their standard errors, as the reference job of the benchmark:

    python3 lstsq_reference.py TABLE.csv
"""

import sys
import itertools

import numpy as np


def read(path):
    # pandas' C reader when it is there (the fast, usual choice), numpy's otherwise.
    try:
        import pandas as pd

        return pd.read_csv(path).to_numpy(dtype=float)
    except ImportError:
        return np.loadtxt(path, delimiter=",", skiprows=1)


def main(path):
    data = read(path)
    x, y = data[:, :-1], data[:, -1]
    n, k = x.shape
    cols = [np.ones(n)] + [x[:, i] for i in range(k)]
    cols += [x[:, i] * x[:, j] for i, j in itertools.combinations(range(k), 2)]
    X = np.column_stack(cols)
    beta, res, rank, _ = np.linalg.lstsq(X, y, rcond=None)
    resid = y - X @ beta
    df = n - rank
    s2 = resid @ resid / df
    se = np.sqrt(s2 * np.diag(np.linalg.inv(X.T @ X)))
    for b, s in zip(beta, se):
        print("%.10g %.10g" % (b, s))


if __name__ == "__main__":
    main(sys.argv[1])
