#!/usr/bin/env python3
"""Independent figures for the by-participant check of mixed designs (TestMixedFit), from pandas,
NumPy and SciPy.

Reads one JSON object on stdin: {"data": path of a long CSV with columns participant, group,
within, y; "groups": g group names in order; "within_cells": w names in order; "x": g x p design
rows of the between coding (intercept column first when there is one); "rows": within rows,
each w weights; "alpha": a}.
Writes {"rows": [{"participants", "coefficients": [{estimate, se, t, df, p, ci_low, ci_high}]}]}.

Written from the definitions, apart from the C++ code (which fits from per-group sums): each
participant's cell means (pandas groupby mean over replicate rows), its group; for a within row
r the participants with every cell r weighs get the score r.y; the between coding is fitted by
ordinary least squares on one row per participant (numpy.linalg.lstsq of the participants'
design rows), SE from the residual variance with N - p df times (X'X)^-1, t and p from
scipy.stats.t, the interval from its quantile.
"""
import json
import sys

import numpy as np
import pandas as pd
from scipy import stats


def participant_means(req):
    """Each participant's cell means (participants x within cells, NaN where missing), its group,
    and the groups' design rows, from the request's CSV (also used by mixed_multivariate_check.py)."""
    df = pd.read_csv(req["data"], dtype={"participant": str, "group": str, "within": str})
    means = df.groupby(["participant", "within"])["y"].mean().unstack("within").reindex(columns=req["within_cells"])
    group_of = df.groupby("participant")["group"].first().reindex(means.index)
    return means, group_of, np.array(req["x"], dtype=float)


def main():
    req = json.load(sys.stdin)
    groups = req["groups"]
    cells = req["within_cells"]
    means, group_of, x_groups = participant_means(req)
    out = {"rows": []}
    for r in req["rows"]:
        r = np.array(r, dtype=float)
        needed = [cells[j] for j in range(len(cells)) if r[j] != 0]
        sub = means.dropna(subset=needed)
        scores = sub[cells].fillna(0.0).to_numpy() @ r
        x = np.array([x_groups[groups.index(group_of[p])] for p in sub.index])
        beta, _, _, _ = np.linalg.lstsq(x, scores, rcond=None)
        n, p = x.shape
        resid = scores - x @ beta
        dof = n - p
        s2 = float(resid @ resid) / dof
        cov = s2 * np.linalg.inv(x.T @ x)
        crit = stats.t.isf(req["alpha"] / 2, dof)
        coefs = []
        for i in range(p):
            se = float(np.sqrt(cov[i, i]))
            t = float(beta[i] / se)
            coefs.append({"estimate": float(beta[i]), "se": se, "t": t, "df": float(dof),
                          "p": float(2 * stats.t.sf(abs(t), dof)),
                          "ci_low": float(beta[i] - crit * se), "ci_high": float(beta[i] + crit * se)})
        out["rows"].append({"participants": int(n), "coefficients": coefs})
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
