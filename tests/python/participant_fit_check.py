#!/usr/bin/env python3
"""Independent figures for the by-participant data check (TestParticipantFit), from pandas and SciPy.

Reads one JSON object on stdin: {"data": path of a long CSV with columns participant, level,
y; "levels": k names in order; "rows": p x k hypothesis rows; "alpha": a}.
Writes {"coefficients": [{estimate, se, t, df, p, ci_low, ci_high, participants}],
        "hotelling": {f, df1, df2, p, participants}}.

Written from the definitions, apart from the C++ code: each participant's cell means
(pandas groupby mean over replicate rows); for a row h the participants with every level h
weighs; their scores h.y tested with scipy.stats.ttest_1samp (and its confidence_interval);
Hotelling's T^2 = n dbar' S^-1 dbar on the Helmert-orthonormal contrasts of the complete
participants (numpy.linalg.solve), F = (n - k + 1) / ((n - 1)(k - 1)) T^2, p from scipy.stats.f.
"""
import json
import sys

import numpy as np
import pandas as pd
from scipy import stats


def main():
    req = json.load(sys.stdin)
    df = pd.read_csv(req["data"], dtype={"participant": str, "level": str})
    levels = req["levels"]
    k = len(levels)
    means = df.groupby(["participant", "level"])["y"].mean().unstack("level").reindex(columns=levels)
    out = {"coefficients": []}
    for h in req["rows"]:
        h = np.array(h, dtype=float)
        needed = [levels[j] for j in range(k) if h[j] != 0]
        sub = means.dropna(subset=needed)
        scores = sub[levels].fillna(0.0).to_numpy() @ h
        res = stats.ttest_1samp(scores, 0.0)
        ci = res.confidence_interval(1.0 - req["alpha"])
        n = len(scores)
        out["coefficients"].append({
            "estimate": float(scores.mean()), "se": float(scores.std(ddof=1) / np.sqrt(n)),
            "t": float(res.statistic), "df": float(n - 1), "p": float(res.pvalue),
            "ci_low": float(ci.low), "ci_high": float(ci.high), "participants": n})
    complete = means.dropna().to_numpy()
    n = complete.shape[0]
    centred = np.eye(k) - np.ones((k, k)) / k
    q, _ = np.linalg.qr(centred)
    d = complete @ q[:, : k - 1]
    dbar = d.mean(axis=0)
    s = np.cov(d, rowvar=False, ddof=1).reshape(k - 1, k - 1)
    t2 = n * dbar @ np.linalg.solve(s, dbar)
    f = (n - k + 1) / ((n - 1) * (k - 1)) * t2
    out["hotelling"] = {"f": float(f), "df1": k - 1, "df2": n - k + 1,
                        "p": float(stats.f.sf(f, k - 1, n - k + 1)), "participants": n}
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
