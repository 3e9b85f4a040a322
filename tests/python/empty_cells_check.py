#!/usr/bin/env python3
"""Independent figures for designs with empty cells (TestEmptyCells), from NumPy alone.

Reads one JSON object on standard input: {"cases": [{"X": k x p design rows over every cell
([1 | C], cells in the design's order), "n": k cell sizes, 0 marking an empty cell}]}.
Writes {"cases": [{"rank", "estimable", "hypotheses", "full", "fill"}]}:
  rank        numpy.linalg.matrix_rank of X_r, the rows of the cells with n > 0;
  estimable   per coefficient j, whether the unit vector e_j lies in X_r's row space
              (|| pinv(X_r) X_r e_j - e_j || < 1e-9: the projector onto the row space);
  hypotheses  pinv(diag(sqrt n_r) X_r) diag(sqrt n_r), the weights each least-squares coefficient
              puts on the cell means, written over every cell (0 at the empty ones); null when
              X_r is rank deficient;
  full        the same over every cell with each empty cell's n set to the mean of the others
              ("fill"), the full design the empty-cell analysis compares with.
Written from the definitions, apart from the C++ code.
"""
import json
import sys

import numpy as np


def weighted_pinv(x, n):
    s = np.sqrt(np.asarray(n, dtype=float))
    return np.linalg.pinv(s[:, None] * x) * s[None, :]


def main():
    req = json.load(sys.stdin)
    out = []
    for case in req["cases"]:
        x = np.asarray(case["X"], dtype=float)
        n = np.asarray(case["n"], dtype=float)
        kept = n > 0
        xr = x[kept]
        p = x.shape[1]
        rank = int(np.linalg.matrix_rank(xr)) if xr.size else 0
        proj = np.linalg.pinv(xr) @ xr if xr.size else np.zeros((p, p))
        estimable = [bool(np.linalg.norm(proj[:, j] - np.eye(p)[:, j]) < 1e-9) for j in range(p)]
        res = {"rank": rank, "estimable": estimable, "hypotheses": None}
        if rank == p:
            h = np.zeros((p, len(n)))
            h[:, kept] = weighted_pinv(xr, n[kept])
            res["hypotheses"] = h.tolist()
        fill = float(n[kept].mean()) if kept.any() else 0.0
        nf = np.where(kept, n, fill)
        res["fill"] = fill
        res["full"] = weighted_pinv(x, nf).tolist() if np.linalg.matrix_rank(x) == p else None
        out.append(res)
    json.dump({"cases": out}, sys.stdout)


if __name__ == "__main__":
    main()
