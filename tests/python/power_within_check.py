#!/usr/bin/env python3
"""Independent figures for power within participants (TestPowerWithin), from NumPy and SciPy.

Reads one JSON object on stdin: {"cases": [case, ...]} where a case holds
  rows (m x k contrast weights), means (k), sds (k), corr (k x k correlations),
  participants (P), alpha, one_sided, adjust ("none" | "bonferroni" | "sidak"), target.
Writes {"cases": [result, ...]} with, per case,
  se, df, power (m: the contrasts at P, scipy.stats.nct / t),
  searched (m: the smallest P reaching the target, by its own search),
  omnibus_lambda, omnibus_df2, omnibus_power (Hotelling's T^2 as a noncentral F, scipy.stats.ncf),
  omnibus_searched (smallest P from k upwards),
  groups_searched (the first contrast as separate equal groups with a common SD equal to the
  first level's SD: the smallest n per group, from the two-sample formulas).

Written from the textbook definitions, apart from the C++ code:
  Sigma = D R D (numpy), se = sqrt(h' Sigma h / P), df = P - 1, delta = h.mu / se;
  Hotelling: lambda = P d' (C Sigma C')^-1 d with d = C mu, here C the orthonormal Helmert
  contrasts (numpy.linalg.qr of the centred identity; a different C from the C++ code, so the
  test also shows lambda does not depend on the choice), F(k - 1, P - k + 1).
"""
import importlib.util
import json
import pathlib
import sys
import warnings

import numpy as np
from scipy import stats

# The same reference definitions as TestPower's (power_check.py beside this file), loaded by path.
_spec = importlib.util.spec_from_file_location("power_check", pathlib.Path(__file__).with_name("power_check.py"))
_power_check = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(_power_check)
per_test_alpha, t_power = _power_check.per_test_alpha, _power_check.t_power

warnings.simplefilter("ignore")


def step_search(power_at, target, start):
    """Smallest whole P >= start with power_at(P) >= target: doubling, then halving the gap;
    the answer is checked on both sides (power at P reaches the target, at P - 1 it does not)."""
    if power_at(start) >= target:
        return start
    lo, hi = start, 2 * start
    while power_at(hi) < target:
        lo, hi = hi, 2 * hi
        if hi > 20_000_000:
            return None
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if power_at(mid) >= target:
            hi = mid
        else:
            lo = mid
    assert power_at(hi) >= target and power_at(hi - 1) < target
    return hi


def helmert_basis(k):
    """k - 1 orthonormal contrasts (rows orthogonal to the ones vector)."""
    centred = np.eye(k) - np.ones((k, k)) / k
    q, _ = np.linalg.qr(centred)
    return q[:, : k - 1].T


def check_case(case):
    mu = np.array(case["means"], dtype=float)
    k = len(mu)
    sd = np.array(case["sds"], dtype=float)
    r = np.array(case["corr"], dtype=float)
    sigma = np.diag(sd) @ r @ np.diag(sd)
    rows = [np.array(h, dtype=float) for h in case["rows"]]
    alpha_t = per_test_alpha(case["alpha"], case["adjust"], len(rows))
    p = float(case["participants"])

    def contrast(h, pp):
        se = float(np.sqrt(h @ sigma @ h / pp))
        return se, pp - 1.0, t_power(float(h @ mu) / se, pp - 1.0, alpha_t, case["one_sided"])

    c = helmert_basis(k)
    d = c @ mu
    q = float(d @ np.linalg.solve(c @ sigma @ c.T, d))

    def omnibus(pp):
        df2 = pp - k + 1.0
        crit = stats.f.isf(case["alpha"], k - 1, df2)
        return float(stats.ncf.sf(crit, k - 1, df2, pp * q))

    out = {"se": [], "df": [], "power": [], "searched": []}
    for h in rows:
        se, df, power = contrast(h, p)
        out["se"].append(se)
        out["df"].append(df)
        out["power"].append(power)
        out["searched"].append(step_search(lambda pp, h=h: contrast(h, float(pp))[2], case["target"], 2))
    out["omnibus_lambda"] = p * q
    out["omnibus_df2"] = p - k + 1.0
    out["omnibus_power"] = omnibus(p)
    out["omnibus_searched"] = step_search(lambda pp: omnibus(float(pp)), case["target"], k)

    h = rows[0]
    s = sd[0]

    def groups(n):
        se = s * np.sqrt(float(h @ h) / n)
        return t_power(float(h @ mu) / se, k * n - k, alpha_t, case["one_sided"])

    out["groups_searched"] = step_search(groups, case["target"], 2)
    return out


def main():
    request = json.load(sys.stdin)
    json.dump({"cases": [check_case(c) for c in request["cases"]]}, sys.stdout)


if __name__ == "__main__":
    main()
