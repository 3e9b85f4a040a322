#!/usr/bin/env python3
"""Independent figures for the by-item analysis and Clark's min F' (TestItemFit), from NumPy and SciPy.

Reads one JSON object on stdin: {"data": path of a long CSV with columns participant, item,
level, y; "levels": k names in order; "rows": p x k hypothesis rows; "alpha": a}.
Writes {"by_participant": [{t, df}], "by_item": [{estimate, se, t, df, p, ci_low, ci_high, items}],
        "hotelling_by_item": {f, df1, df2, p, items},
        "min_f": [{f1, f2, f, df2, p}], "incomplete_items": [names]}.

A row that no unit has every weighed level of (by participant, a design's between-participant
rows) gives null.

Written from the definitions, apart from the C++ code: the cell means of each unit (participant
or item) are means of its rows at each level (pandas groupby); for a row h the units with every
level h weighs; their scores h.y give t = mean / (sd / sqrt(n)) with n - 1 df written out in
NumPy, p = 2 scipy.stats.t.sf(|t|), the interval from scipy.stats.t.ppf. Hotelling's T^2 by item
is taken here on the successive differences of the complete items (any k - 1 independent
contrasts give the same F), F = (n - k + 1) / ((n - 1)(k - 1)) T^2, p from scipy.stats.f.sf.
Clark (1973), "The language-as-fixed-effect fallacy", JVLVB 12, 335-359: F1 = t1^2 (df1 error df),
F2 = t2^2 (df2), min F' = F1 F2 / (F1 + F2) with denominator df (F1 + F2)^2 / (F1^2 / df2 + F2^2 / df1),
p = scipy.stats.f.sf(min F', 1, df).
"""
import json
import sys

import numpy as np
import pandas as pd
from scipy import stats


def contrast_tests(means, levels, rows, alpha):
    out = []
    k = len(levels)
    for h in rows:
        h = np.array(h, dtype=float)
        needed = [levels[j] for j in range(k) if h[j] != 0]
        sub = means.dropna(subset=needed)
        scores = sub[levels].fillna(0.0).to_numpy() @ h
        n = len(scores)
        if n < 2:  # no units with every level the row weighs (participants of one group in a design)
            out.append(None)
            continue
        mean = scores.mean()
        se = scores.std(ddof=1) / np.sqrt(n)
        t = mean / se
        crit = stats.t.ppf(1.0 - alpha / 2.0, n - 1)
        out.append({"estimate": float(mean), "se": float(se), "t": float(t), "df": float(n - 1),
                    "p": float(2.0 * stats.t.sf(abs(t), n - 1)),
                    "ci_low": float(mean - crit * se), "ci_high": float(mean + crit * se), "items": n})
    return out


def main():
    req = json.load(sys.stdin)
    df = pd.read_csv(req["data"], dtype={"participant": str, "item": str, "level": str})
    levels = req["levels"]
    k = len(levels)
    by_p = df.groupby(["participant", "level"])["y"].mean().unstack("level").reindex(columns=levels)
    by_i = df.groupby(["item", "level"])["y"].mean().unstack("level").reindex(columns=levels)
    one = contrast_tests(by_p, levels, req["rows"], req["alpha"])
    two = contrast_tests(by_i, levels, req["rows"], req["alpha"])
    min_f = []
    for a, b in zip(one, two):
        if a is None or b is None:
            min_f.append(None)
            continue
        f1, df1, f2, df2 = a["t"] ** 2, a["df"], b["t"] ** 2, b["df"]
        f = f1 * f2 / (f1 + f2)
        dfd = (f1 + f2) ** 2 / (f1 ** 2 / df2 + f2 ** 2 / df1)
        min_f.append({"f1": f1, "f2": f2, "f": f, "df2": dfd, "p": float(stats.f.sf(f, 1, dfd))})
    complete = by_i.dropna().to_numpy()
    n = complete.shape[0]
    d = np.diff(complete, axis=1)
    dbar = d.mean(axis=0)
    s = np.cov(d, rowvar=False, ddof=1).reshape(k - 1, k - 1)
    t2 = n * dbar @ np.linalg.solve(s, dbar)
    f = (n - k + 1) / ((n - 1) * (k - 1)) * t2
    json.dump({"by_participant": [a and {"t": a["t"], "df": a["df"]} for a in one], "by_item": two,
               "hotelling_by_item": {"f": float(f), "df1": k - 1, "df2": n - k + 1,
                                     "p": float(stats.f.sf(f, k - 1, n - k + 1)), "items": n},
               "min_f": min_f,
               "incomplete_items": sorted(by_i.index[by_i.isna().any(axis=1)].tolist())}, sys.stdout)


if __name__ == "__main__":
    main()
