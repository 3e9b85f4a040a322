#!/usr/bin/env python3
"""Reference fit for TestDataFit: ordinary least squares on the explicit N-row design.

Reads one JSON object on standard input:
  {"csv": path, "factor": column, "response": column, "weight": column or null,
   "levels": [names in design order], "X": k x p design rows, "alpha": 0.05}
or, for a crossed design, "factors": [columns] instead of "factor": a row's cell is its
values joined with a middle dot, U+00B7 ("grass\u00b7early", as Design::cellNames names them), with surrounding spaces removed; rows with an empty
factor value are left out.
reads the CSV with pandas, builds the N x p design matrix D (row i = X[level of i]),
solves with numpy.linalg.lstsq (weights as case weights: rows scaled by sqrt(w),
residual df = sum(w) - p) and prints the estimates and tests as JSON.
Independent of the project's code: pandas parses the file, NumPy/SciPy do the algebra.
"""
import json
import sys

import numpy as np
import pandas as pd
from scipy import stats


def adjust(p, method):
    p = np.asarray(p, dtype=float)
    m = len(p)
    if method == "bonferroni":
        return np.minimum(1.0, m * p)
    if method == "sidak":
        return 1.0 - (1.0 - p) ** m
    if method == "holm":
        order = np.argsort(p, kind="stable")
        out = np.empty(m)
        running = 0.0
        for rank, i in enumerate(order):
            running = max(running, min(1.0, (m - rank) * p[i]))
            out[i] = running
        return out
    raise ValueError(method)


def t_upper_quantile(tail, df):
    """The t value with upper tail area `tail`. SciPy 1.10's t.isf is good to only about
    1e-9 for some df (checked against mpmath at 40 digits), so two Newton steps on
    t.sf (accurate to rounding) refine it."""
    t = stats.t.isf(tail, df)
    for _ in range(2):
        t += (stats.t.sf(t, df) - tail) / stats.t.pdf(t, df)
    return t


def main():
    spec = json.load(sys.stdin)
    frame = pd.read_csv(spec["csv"], encoding="utf-8-sig", sep=None, engine="python")
    levels = spec["levels"]
    X = np.array(spec["X"], dtype=float)
    index = {name: i for i, name in enumerate(levels)}
    if "factors" in spec:
        parts = [frame[c].astype(str).str.strip() for c in spec["factors"]]
        keep = np.logical_and.reduce([(p != "") & (p != "nan") for p in parts])
        frame = frame[keep]
        cells = parts[0][keep]
        for p in parts[1:]:
            cells = cells + "\u00b7" + p[keep]
        groups = cells.map(index).to_numpy()
    else:
        groups = frame[spec["factor"]].astype(str).map(index).to_numpy()
    y = frame[spec["response"]].to_numpy(dtype=float)
    w = frame[spec["weight"]].to_numpy(dtype=float) if spec.get("weight") else np.ones_like(y)
    D = X[groups]
    sw = np.sqrt(w)
    b, _, rank, _ = np.linalg.lstsq(D * sw[:, None], y * sw, rcond=None)
    n, p = w.sum(), D.shape[1]
    resid = y - D @ b
    rss = float(np.sum(w * resid ** 2))
    df = n - p
    sigma2 = rss / df
    cov = sigma2 * np.linalg.inv((D * w[:, None]).T @ D)
    se = np.sqrt(np.diag(cov))
    t = b / se
    pvals = 2 * stats.t.sf(np.abs(t), df)
    crit = t_upper_quantile(spec.get("alpha", 0.05) / 2, df)
    # Does the design span the constant? Then R^2 and F are about the mean.
    ones = np.ones(len(y))
    c, *_ = np.linalg.lstsq(D, ones, rcond=None)
    centred = bool(np.linalg.norm(D @ c - ones) <= 1e-9 * np.sqrt(len(y)))
    if centred:
        ybar = np.sum(w * y) / n
        tss = float(np.sum(w * (y - ybar) ** 2))
        df1 = p - 1
    else:
        tss = float(np.sum(w * y ** 2))
        df1 = p
    f = ((tss - rss) / df1) / sigma2 if df1 > 0 else None
    family = slice(1, None) if spec.get("intercept", True) else slice(0, None)
    means = [float(np.sum(w[groups == j] * y[groups == j]) / np.sum(w[groups == j])) for j in range(len(levels))]
    out = {
        "rank": int(rank),
        "coefficients": b.tolist(),
        "se": se.tolist(),
        "t": t.tolist(),
        "p": pvals.tolist(),
        "ci_low": (b - crit * se).tolist(),
        "ci_high": (b + crit * se).tolist(),
        "sigma": float(np.sqrt(sigma2)),
        "df": float(df),
        "rss": rss,
        "r_squared": 1 - rss / tss,
        "centred": centred,
        "f": f,
        "f_df1": df1,
        "f_p": float(stats.f.sf(f, df1, df)) if f is not None else None,
        "means": means,
        "p_adjusted": {m: adjust(pvals[family], m).tolist() for m in ("bonferroni", "holm", "sidak")},
    }
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
