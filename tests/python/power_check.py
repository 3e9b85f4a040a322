#!/usr/bin/env python3
"""Independent power figures for TestPower, from SciPy.

Reads one JSON object on stdin: {"cases": [case, ...]} where a case holds
  rows (m x k contrast weights), means (k), sd (number) or sds (k, Welch),
  n (k planned sizes, may be fractional), ratios (k, for the sample-size search),
  alpha, one_sided, adjust ("none" | "bonferroni" | "sidak"),
  required (m lists of k sizes, or null), omnibus_required (k sizes or null),
  search_equal (optional bool: also search the smallest equal n for each contrast
  and for the omnibus test, by stepping n upwards).
Writes {"cases": [result, ...]} with, per case,
  power (m, scipy.stats.nct / t), power_integral (m, the same power by numerical
  integration over the chi-square variable, scipy.integrate.quad with scipy.stats.norm
  and chi2, which does not go through the noncentral t code), omnibus (scipy.stats.ncf / f),
  at_required / below_required (m: power at the required sizes and at the sizes one
  step smaller, or null), omnibus_at_required / omnibus_below_required,
  and with search_equal: searched (m) and omnibus_searched.

The formulas are written here from the textbook definitions, apart from the C++ code:
  psi = h . mu, se^2 = sum h_i^2 s_i^2 / n_i, df = N - k (common SD) or
  Welch-Satterthwaite (sum a_i)^2 / sum a_i^2 / (n_i - 1), a_i = h_i^2 s_i^2 / n_i;
  omnibus lambda = sum n_i (mu_i - mu_w)^2 / sigma^2 with mu_w the n-weighted mean and
  sigma^2 the common variance or the (n_i - 1)-weighted pooled one.
"""
import json
import math
import sys
import warnings

import numpy as np
from scipy import integrate, stats

warnings.simplefilter("ignore")  # SciPy's nct warns inside and still returns clipped values


def per_test_alpha(alpha, adjust, m):
    if m <= 1 or adjust == "none":
        return alpha
    if adjust == "bonferroni":
        return alpha / m
    return 1.0 - (1.0 - alpha) ** (1.0 / m)


def t_power(delta, df, alpha, one_sided):
    if one_sided:
        crit = stats.t.isf(alpha, df)
        return float(stats.nct.sf(crit, df, delta)) if delta != 0 else float(stats.t.sf(crit, df))
    crit = stats.t.isf(alpha / 2.0, df)
    if delta == 0:
        return float(2.0 * stats.t.sf(crit, df))
    return float(stats.nct.sf(crit, df, delta) + stats.nct.cdf(-crit, df, delta))


def t_power_integral(delta, df, alpha, one_sided):
    """P(T' > c) [+ P(T' < -c)] with T' = (Z + delta) / sqrt(U / df), integrated over U ~ chi2(df)."""
    crit = stats.t.isf(alpha if one_sided else alpha / 2.0, df)

    def integrand(u):
        s = math.sqrt(u / df)
        p = stats.norm.sf(crit * s - delta)
        if not one_sided:
            p += stats.norm.cdf(-crit * s - delta)
        return p * stats.chi2.pdf(u, df)

    lo = stats.chi2.ppf(1e-15, df)
    hi = stats.chi2.isf(1e-15, df)
    mid = [stats.chi2.ppf(q, df) for q in (0.001, 0.1, 0.5, 0.9, 0.999)]
    value, _ = integrate.quad(integrand, lo, hi, points=mid, epsabs=1e-13, epsrel=1e-11, limit=400)
    return float(value)


def f_power(lam, d1, d2, alpha):
    crit = stats.f.isf(alpha, d1, d2)
    if lam == 0:
        return float(stats.f.sf(crit, d1, d2))
    return float(stats.ncf.sf(crit, d1, d2, lam))


def contrast_values(h, case, n):
    n = [float(v) for v in n]
    mu = case["means"]
    k = len(mu)
    sds = case.get("sds") or [case["sd"]] * k
    psi = sum(h[i] * mu[i] for i in range(k))
    scale = sum(abs(h[i] * mu[i]) for i in range(k))
    if abs(psi) <= 1e-12 * scale:
        psi = 0.0
    a = [h[i] ** 2 * sds[i] ** 2 / n[i] for i in range(k)]
    var = sum(a)
    if case.get("sds"):
        df = var ** 2 / sum(a[i] ** 2 / (n[i] - 1) for i in range(k) if a[i] > 0)
    else:
        df = sum(n) - k
    return psi / math.sqrt(var), df


def contrast_power(h, case, n, alpha):
    delta, df = contrast_values(h, case, n)
    return t_power(delta, df, alpha, case["one_sided"])


def omnibus_power(case, n):
    n = [float(v) for v in n]
    mu = case["means"]
    k = len(mu)
    total = sum(n)
    grand = sum(n[i] * mu[i] for i in range(k)) / total
    ss = sum(n[i] * (mu[i] - grand) ** 2 for i in range(k))
    if case.get("sds"):
        var = sum((n[i] - 1) * case["sds"][i] ** 2 for i in range(k)) / (total - k)
    else:
        var = case["sd"] ** 2
    lam = 0.0 if max(mu) == min(mu) else ss / var
    return f_power(lam, k - 1, total - k, case["alpha"])


def sizes_for(smallest, ratios):
    least = min(ratios)
    return [max(smallest, math.ceil(smallest * (r / least) * (1 - 1e-12))) for r in ratios]


def smallest_group(sizes, ratios):
    """The search variable behind a list of group sizes: the size of a smallest-ratio group."""
    least = min(ratios)
    return min(sizes[i] for i in range(len(ratios)) if ratios[i] == least)


def search_equal(power_at, target):
    """Smallest equal n per level with power_at(n) >= target, by doubling then one by one (None above 10^7)."""
    n = 2
    while power_at(2 * n) < target:
        n *= 2
        if n > 10_000_000:
            return None
    while power_at(n) < target:
        n += 1
    return n


def check_case(case):
    rows = case["rows"]
    m = len(rows)
    k = len(case["means"])
    alpha_t = per_test_alpha(case["alpha"], case["adjust"], m)
    n = case["n"]
    ratios = case["ratios"]
    out = {
        "power": [contrast_power(h, case, n, alpha_t) for h in rows],
        "power_integral": [],
        "omnibus": omnibus_power(case, n),
        "at_required": [],
        "below_required": [],
    }
    for h in rows:
        delta, df = contrast_values(h, case, n)
        out["power_integral"].append(t_power_integral(delta, df, alpha_t, case["one_sided"]))
    for h, req in zip(rows, case["required"]):
        if req is None:
            out["at_required"].append(None)
            out["below_required"].append(None)
            continue
        t = smallest_group(req, ratios)
        out["at_required"].append(contrast_power(h, case, [float(v) for v in req], alpha_t))
        out["below_required"].append(
            contrast_power(h, case, [float(v) for v in sizes_for(t - 1, ratios)], alpha_t) if t > 2 else None)
    req = case.get("omnibus_required")
    if req is not None:
        t = smallest_group(req, ratios)
        out["omnibus_at_required"] = omnibus_power(case, [float(v) for v in req])
        out["omnibus_below_required"] = (
            omnibus_power(case, [float(v) for v in sizes_for(t - 1, ratios)]) if t > 2 else None)
    if case.get("search_equal"):
        target = case["target"]
        out["searched"] = [search_equal(lambda nn, h=h: contrast_power(h, case, [nn] * k, alpha_t), target)
                           for h in rows]
        out["omnibus_searched"] = search_equal(lambda nn: omnibus_power(case, [nn] * k), target)
    return out


def main():
    request = json.load(sys.stdin)
    json.dump({"cases": [check_case(c) for c in request["cases"]]}, sys.stdout)


if __name__ == "__main__":
    main()
