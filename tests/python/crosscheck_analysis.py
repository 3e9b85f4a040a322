"""Reference values for TestAnalysisCrossCheck, computed with NumPy only.

Reads cases (design matrix X = [1 | C] or C over the k levels, planned n,
intercept flag) from argv[1] and writes, per case, what NumPy says:
  rank      numpy.linalg.matrix_rank(X)
  h         pinv(diag(sqrt n) X) diag(sqrt n)   (= inv(X) when square)
  cond      numpy.linalg.cond of diag(sqrt n) X with unit-length columns
  indices   largest singular value over each singular value, ascending
  vif       diagonal of inv(R), R the n-weighted correlation matrix of the coding columns;
            undefined (None) where R is singular to working precision, by the tool's rule:
            reciprocal condition number in the 1-norm at most 1e-13
  vif_cond  numpy.linalg.cond(R), which bounds how closely any method can agree on the VIFs
"""
import json
import sys

import numpy as np


def main():
    cases = json.load(open(sys.argv[1]))
    out = []
    for c in cases:
        x = np.array(c["x"], dtype=float)
        n = np.array(c["n"], dtype=float)
        k, p = x.shape
        res = {"rank": int(np.linalg.matrix_rank(x))}
        sw = np.sqrt(n)
        if res["rank"] == p:
            res["h"] = (np.linalg.pinv(sw[:, None] * x) * sw[None, :]).tolist()
        z = sw[:, None] * x
        norms = np.linalg.norm(z, axis=0)
        if np.all(norms > 0) and res["rank"] == p:
            zs = z / norms
            res["cond"] = float(np.linalg.cond(zs))
            s = np.linalg.svd(zs, compute_uv=False)
            res["indices"] = sorted((s[0] / s).tolist())
        cols = x[:, 1:] if c["intercept"] else x
        total = n.sum()
        centred = cols - (n @ cols) / total
        cov = (centred * n[:, None]).T @ centred
        d = np.diag(cov)
        scale = (cols * cols * n[:, None]).sum(axis=0)
        live = d > 1e-10 * np.maximum(scale, 1e-300)
        vif = [None] * cols.shape[1]
        if live.any():
            r = cov[np.ix_(live, live)] / np.sqrt(np.outer(d[live], d[live]))
            if np.isfinite(np.linalg.cond(r)):
                res["vif_cond"] = float(np.linalg.cond(r))
            if 1.0 / np.linalg.cond(r, 1) > 1e-13:
                inv_diag = np.diag(np.linalg.inv(r))
                for idx, v in zip(np.flatnonzero(live), inv_diag):
                    vif[int(idx)] = float(v)
        res["vif"] = vif
        out.append(res)
    json.dump(out, open(sys.argv[2], "w"))


if __name__ == "__main__":
    main()
