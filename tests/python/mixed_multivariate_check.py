#!/usr/bin/env python3
"""Independent figures for the multivariate tests of mixed designs (TestMixedFit), from pandas and
statsmodels' MANOVA (Debian's python3-statsmodels).

Reads one JSON object on stdin: {"data": path of a long CSV with columns participant, group,
within, y; "groups": g group names in order; "within_cells": w names in order; "x": g x p design
rows of the between coding; "tests": [{"name", "l": h x p, "m": w x q}]}.
Writes {"participants": N, "tests": [{"wilks", "f", "df1", "df2", "p"}]}.

Written from the definitions, apart from the C++ code: each participant's cell means (pandas
groupby mean over replicate rows, mixed_fit_check.participant_means) and group; the participants with every within cell; one row
per participant, its group's design row as exog and its cell means as endog; then
statsmodels.multivariate.manova.MANOVA(endog, exog).mv_test with each (name, L, M) hypothesis,
which reports Wilks' lambda with its F approximation (Rao's), df and p.
"""
import importlib.util
import json
import pathlib
import sys
import warnings

import numpy as np
from statsmodels.multivariate.manova import MANOVA

_spec = importlib.util.spec_from_file_location("mixed_fit_check", pathlib.Path(__file__).with_name("mixed_fit_check.py"))
_mixed_fit_check = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(_mixed_fit_check)


def main():
    req = json.load(sys.stdin)
    groups = req["groups"]
    cells = req["within_cells"]
    means, group_of, x_groups = _mixed_fit_check.participant_means(req)
    complete = means.dropna()
    endog = complete.to_numpy()
    exog = np.array([x_groups[groups.index(group_of[p])] for p in complete.index])
    hypotheses = [(t["name"], np.array(t["l"], dtype=float).reshape(-1, exog.shape[1]),
                   np.array(t["m"], dtype=float).reshape(len(cells), -1)) for t in req["tests"]]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        result = MANOVA(endog, exog).mv_test(hypotheses)
    out = {"participants": int(endog.shape[0]), "tests": []}
    for name, _, _ in hypotheses:
        stat = result.results[name]["stat"].loc["Wilks' lambda"]
        out["tests"].append({"wilks": float(stat["Value"]), "f": float(stat["F Value"]),
                             "df1": float(stat["Num DF"]), "df2": float(stat["Den DF"]),
                             "p": float(stat["Pr > F"])})
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
