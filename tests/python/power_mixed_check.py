#!/usr/bin/env python3
"""Independent figures for power in mixed designs (TestPowerMixed), from NumPy and SciPy.

Reads one JSON object on stdin: {"cases": [case, ...]} where a case holds
  rows (m x cells hypothesis weights over the cells), group_of and within_of (per cell: its group
  and its within cell), means and sds (per cell), corr (w x w correlations of the within cells),
  group_n (participants per group), alpha, one_sided, adjust, target.
Writes {"cases": [result, ...]} with, per case,
  se, df, power (m: at the planned sizes), part (m: "between", "within", "between x within" or
  "combined", from the rank of the weights as a groups x within-cells matrix), searched (m: the
  smallest participants per group reaching the target, as a list, by its own search keeping the
  groups' ratios), and between_se (m: for between columns, the SE computed again from the
  variance of one participant's average over the within cells and the group sizes).
Parts are written with ASCII x; the C++ side writes the multiplication sign. Also "omnibus":
{noncentrality, df2, power, searched} for Hotelling's T^2 that the within cells are equal,
averaged over the groups: lambda = delta' (A V A')^-1 delta with delta = A mu, A the groups'
average of each within cell's difference from the first, V the covariance of the cell means
below; F with w - 1 and N - g - w + 2 df (scipy.stats.ncf); searched by stepping the smallest
group up one participant at a time.

With "terms" (a list of {L, M}, the data check's multivariate tests L B M = 0) and "x" (the
between coding's design rows, groups x p), also "terms": [{df2, noncentrality, power}] for each:
Wilks' lambda as Rao's F (df1 = q c, df2 = s (nu - (c - q + 1)/2) - (q c - 2)/2, nu = N - p).
When min(q, c) = 1 the noncentrality is theta' Cov(theta)^-1 theta for theta = vec(L Bhat M), its
covariance built as a whole from each group's covariance (sum_j a_j a_j' kron M' Sigma_j M / n_j,
a_j the weight of group j's means in L Bhat); otherwise the approximation of Muller & Peterson
(1984): Lambda* = |E| / |E + H| from the population H and E = nu M' Sigma M, eta = 1 - Lambda*^(1/s),
lambda = df2 eta / (1 - eta). With "simulate_terms": N, the share of N simulated studies in which
each test rejects, Wilks' lambda computed from its definition on each simulated study.

Written from the definitions, apart from the C++ code: the covariance of the vector of cell means
is built in NumPy as a whole (cells x cells: two cells of the same group covary by
Sigma_g[w1, w2] / n_g, cells of different groups not at all, Sigma_g = D_g R D_g), so
se = sqrt(h' V h); df = N - g (the pooled within-group error of the column's scores); power from
scipy.stats.nct / t through power_check.py's t_power.
"""
import importlib.util
import json
import math
import pathlib
import sys
import warnings

import numpy as np

_spec = importlib.util.spec_from_file_location("power_check", pathlib.Path(__file__).with_name("power_check.py"))
_power_check = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(_power_check)
per_test_alpha, t_power, f_power = _power_check.per_test_alpha, _power_check.t_power, _power_check.f_power

warnings.simplefilter("ignore")


def cell_covariance(case, n):
    group_of = case["group_of"]
    within_of = case["within_of"]
    sds = np.array(case["sds"], dtype=float)
    r = np.array(case["corr"], dtype=float)
    cells = len(group_of)
    v = np.zeros((cells, cells))
    for a in range(cells):
        for b in range(cells):
            if group_of[a] == group_of[b]:
                v[a, b] = sds[a] * sds[b] * r[within_of[a], within_of[b]] / n[group_of[a]]
    return v


def part_of(case, h):
    g = max(case["group_of"]) + 1
    w = max(case["within_of"]) + 1
    m = np.zeros((g, w))
    for cell, x in enumerate(h):
        m[case["group_of"][cell], case["within_of"][cell]] = x
    if np.linalg.matrix_rank(m, tol=1e-9 * np.abs(m).max()) > 1:
        return "combined"
    # rank one: m = a c'; a from the largest column, c from the largest row
    i, j = np.unravel_index(np.argmax(np.abs(m)), m.shape)
    a, c = m[:, j], m[i, :]
    if np.ptp(c) <= 1e-9 * np.abs(c).max():
        return "between"
    return "between x within" if abs(a.sum()) <= 1e-9 * np.abs(a).sum() else "within"


def sizes_for(t, ratios):
    least = min(ratios)
    return [max(t, int(math.ceil(t * (r / least) * (1 - 1e-12)))) for r in ratios]


def check_case(case):
    mu = np.array(case["means"], dtype=float)
    rows = [np.array(h, dtype=float) for h in case["rows"]]
    alpha_t = per_test_alpha(case["alpha"], case["adjust"], len(rows))
    g = max(case["group_of"]) + 1
    ratios = [float(x) for x in case["group_n"]]

    def contrast(h, n):
        se = float(np.sqrt(h @ cell_covariance(case, n) @ h))
        df = float(sum(n) - g)
        psi = float(h @ mu)
        return se, df, t_power(psi / se if psi != 0 else 0.0, df, alpha_t, case["one_sided"])

    out = {"se": [], "df": [], "power": [], "part": [], "searched": [], "between_se": []}
    for h in rows:
        se, df, power = contrast(h, ratios)
        out["se"].append(se)
        out["df"].append(df)
        out["power"].append(power)
        part = part_of(case, h)
        out["part"].append(part)
        if part == "between":
            # a participant's average over the within cells: variance 1' Sigma_g 1 / w^2 in group g
            w = max(case["within_of"]) + 1
            corr = np.array(case["corr"], dtype=float)
            a = np.zeros(g)
            sd = np.zeros((g, w))
            for cell, x in enumerate(h):
                a[case["group_of"][cell]] += x  # the contrast of the group averages (sum of a group's weights)
                sd[case["group_of"][cell], case["within_of"][cell]] = case["sds"][cell]
            avg_var = np.array([float(np.ones(w) @ (np.diag(sd[j]) @ corr @ np.diag(sd[j])) @ np.ones(w)) / w**2 for j in range(g)])
            out["between_se"].append(float(np.sqrt(np.sum(a**2 * avg_var / np.array(ratios)))))
        else:
            out["between_se"].append(None)
        found = None
        if float(h @ mu) != 0 and not (case["one_sided"] and float(h @ mu) < 0):
            t = 2
            while t <= 20_000_000:
                if contrast(h, sizes_for(t, ratios))[2] >= case["target"]:
                    break
                t *= 2
            lo, hi = max(1, t // 2), t
            if contrast(h, sizes_for(lo, ratios))[2] >= case["target"]:
                hi = lo
            while hi - lo > 1:
                mid = (lo + hi) // 2
                if contrast(h, sizes_for(mid, ratios))[2] >= case["target"]:
                    hi = mid
                else:
                    lo = mid
            found = sizes_for(hi, ratios)
        out["searched"].append(found)

    # The omnibus test: all within cells equal, averaged over the groups. A maps the cells to the
    # groups' average of each within cell's difference from the first; its covariance A V A'.
    w = max(case["within_of"]) + 1
    a = np.zeros((w - 1, len(mu)))
    for cell in range(len(mu)):
        j = case["within_of"][cell]
        if j > 0:
            a[j - 1, cell] += 1.0 / g
        a[:, cell] -= (1.0 / g) if j == 0 else 0.0

    def omnibus(n):
        delta = a @ mu
        lam = float(delta @ np.linalg.solve(a @ cell_covariance(case, n) @ a.T, delta))
        df2 = float(sum(n) - g - w + 2)
        return lam, df2, (f_power(lam, w - 1, df2, case["alpha"]) if df2 >= 1 else None)

    lam, df2, power = omnibus(ratios)
    found = None
    if lam > 1e-20:
        t = 1
        while omnibus(sizes_for(t, ratios))[2] is None or omnibus(sizes_for(t, ratios))[2] < case["target"]:
            t += 1
        found = sizes_for(max(t, 2), ratios)
    out["omnibus"] = {"noncentrality": lam, "df2": df2, "power": power, "searched": found}
    if case.get("simulate"):
        out["omnibus"]["simulated"] = simulated_omnibus_power(case, a, g, w, int(case["simulate"]))
    if "terms" in case:
        out["terms"] = term_powers(case, g, w)
    return out


def group_means_and_covariances(case, g, w):
    mu = np.array(case["means"], dtype=float)
    sds = np.array(case["sds"], dtype=float)
    corr = np.array(case["corr"], dtype=float)
    means = np.zeros((g, w))
    covs = []
    for j in range(g):
        cells = sorted((c for c in range(len(mu)) if case["group_of"][c] == j), key=lambda c: case["within_of"][c])
        means[j] = mu[cells]
        covs.append(np.diag(sds[cells]) @ corr @ np.diag(sds[cells]))
    return means, covs


def rao(q, c, nu):
    s = math.sqrt((q * q * c * c - 4) / (q * q + c * c - 5)) if q * q + c * c - 5 > 0 else 1.0
    return s, s * (nu - (c - q + 1) / 2) - (q * c - 2) / 2


def term_powers(case, g, w):
    means, covs = group_means_and_covariances(case, g, w)
    x = np.array(case["x"], dtype=float)
    n = np.array(case["group_n"], dtype=float)
    nu = n.sum() - x.shape[1]
    pooled = sum((n[j] - 1) * covs[j] for j in range(g)) / (n.sum() - g)
    xtwx = x.T @ np.diag(n) @ x
    out = []
    for term in case["terms"]:
        l = np.array(term["L"], dtype=float).reshape(-1, x.shape[1])
        m = np.array(term["M"], dtype=float).reshape(w, -1)
        q, c = l.shape[0], m.shape[1]
        s, df2 = rao(q, c, nu)
        weights = l @ np.linalg.solve(xtwx, x.T @ np.diag(n))  # q x g: L Bhat = weights @ group means
        theta = (weights @ means @ m).reshape(-1)  # row-major vec: index i * c + k
        if min(q, c) == 1:
            cov = sum(np.kron(np.outer(weights[:, j], weights[:, j]), m.T @ covs[j] @ m) / n[j] for j in range(g))
            lam = float(theta @ np.linalg.solve(cov, theta))
        else:
            th = weights @ means @ m
            h = th.T @ np.linalg.solve(l @ np.linalg.solve(xtwx, l.T), th)
            e = nu * m.T @ pooled @ m
            wilks = np.linalg.det(e) / np.linalg.det(e + h)
            eta = 1 - wilks ** (1 / s)
            lam = float(df2 * eta / (1 - eta))
        result = {"df2": df2, "noncentrality": lam, "power": f_power(lam, q * c, df2, case["alpha"]) if df2 >= 1 else None}
        if case.get("simulate_terms"):
            result["simulated"] = simulated_term_power(case, means, covs, x, l, m, s, df2, int(case["simulate_terms"]))
        out.append(result)
    return out


def simulated_term_power(case, means, covs, x, l, m, s, df2, reps):
    """Each group's participants drawn from the multivariate normal of its cell means and covariance;
    B fitted by least squares on the participants' rows (X repeated per participant), E the
    residual SSCP and H = (L B M)' (L (X'X)^-1 L')^-1 (L B M) as M-transformed, Wilks' lambda as
    Rao's F against its quantile."""
    from scipy import stats
    rng = np.random.default_rng(20261204)
    n = [int(v) for v in case["group_n"]]
    g, w = means.shape
    y = np.concatenate([rng.multivariate_normal(means[j], covs[j], size=(reps, n[j])) for j in range(g)], axis=1)
    xs = np.concatenate([np.repeat(x[j:j + 1], n[j], axis=0) for j in range(g)], axis=0)  # N x p
    xtx_inv = np.linalg.inv(xs.T @ xs)
    b = np.einsum("pq,nq,rnw->rpw", xtx_inv, xs, y)  # reps x p x w
    resid = y - np.einsum("np,rpw->rnw", xs, b)
    e = np.einsum("wi,rnw,rnv,vj->rij", m, resid, resid, m)
    th = np.einsum("qp,rpw,wc->rqc", l, b, m)
    a_inv = np.linalg.inv(l @ xtx_inv @ l.T)
    h = np.einsum("rqi,qk,rkj->rij", th, a_inv, th)
    wilks = np.linalg.det(e) / np.linalg.det(e + h)
    q, c = l.shape[0], m.shape[1]
    root = wilks ** (1 / s)
    f = (1 - root) / root * df2 / (q * c)
    return float(np.mean(f > stats.f.isf(case["alpha"], q * c, df2)))


def simulated_omnibus_power(case, a, g, w, reps):
    """The share of simulated studies in which the omnibus test rejects: each group's participants
    drawn from the multivariate normal of its cell means and covariance, the test statistic computed
    from its definition (the groups' average of the within differences, the pooled within-group
    covariance of the differences, T^2 and its F), compared with the F quantile."""
    from scipy import stats
    rng = np.random.default_rng(20261203)
    mu = np.array(case["means"], dtype=float)
    sds = np.array(case["sds"], dtype=float)
    corr = np.array(case["corr"], dtype=float)
    n = [int(x) for x in case["group_n"]]
    diff = np.zeros((w, w - 1))
    diff[0, :] = -1.0
    diff[1:, :] = np.eye(w - 1)
    means = np.zeros((reps, g, w - 1))
    sscp = np.zeros((reps, w - 1, w - 1))
    for j in range(g):
        cells = [c for c in range(len(mu)) if case["group_of"][c] == j]
        cells.sort(key=lambda c: case["within_of"][c])
        m = mu[cells]
        sd = sds[cells]
        cov = np.diag(sd) @ corr @ np.diag(sd)
        y = rng.multivariate_normal(m, cov, size=(reps, n[j])) @ diff  # reps x n_j x (w - 1)
        centre = y.mean(axis=1)
        means[:, j, :] = centre
        r = y - centre[:, None, :]
        sscp += np.einsum("rni,rnj->rij", r, r)
    nu = sum(n) - g
    pooled = sscp / nu
    delta = means.mean(axis=1)
    c = sum(1.0 / (g * g * nj) for nj in n)
    t2 = np.einsum("ri,ri->r", delta, np.linalg.solve(c * pooled, delta[:, :, None])[:, :, 0])
    q = w - 1
    f = t2 * (nu - q + 1) / (nu * q)
    crit = stats.f.isf(case["alpha"], q, nu - q + 1)
    return float(np.mean(f > crit))


if __name__ == "__main__":
    json.dump({"cases": list(map(check_case, json.load(sys.stdin)["cases"]))}, sys.stdout)
