"""Orthogonal polynomial trends with NumPy, for TestPolynomialTrends.

Input (argv[1], JSON): a list of cases {"x": positions, "w": weights}.
Output (argv[2], JSON): per case, the k-1 trend columns (degree 1..k-1), each
orthogonal to the constant and to each other under the weights w, from a QR
decomposition of the weighted Vandermonde matrix (numpy.linalg.qr), scaled to
unit length and signed so that the last entry is positive.
"""
import json
import sys

import numpy as np


def trends(x, w):
    x = np.asarray(x, dtype=float)
    w = np.asarray(w, dtype=float)
    t = (x - x.mean()) / np.abs(x - x.mean()).max()
    k = len(x)
    v = np.vander(t, k, increasing=True)
    q, _ = np.linalg.qr(np.sqrt(w)[:, None] * v)
    cols = []
    for d in range(1, k):
        c = q[:, d] / np.sqrt(w)
        c = c / np.linalg.norm(c)
        nz = np.flatnonzero(np.abs(c) > 1e-12)
        if c[nz[-1]] < 0:
            c = -c
        cols.append(c.tolist())
    return cols


def main():
    cases = json.load(open(sys.argv[1]))
    json.dump([trends(c["x"], c["w"]) for c in cases], open(sys.argv[2], "w"))


if __name__ == "__main__":
    main()
