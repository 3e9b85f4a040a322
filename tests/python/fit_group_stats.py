#!/usr/bin/env python3
"""Per-level count, mean and variance (ddof=1) of a long-format file, read by pandas.

Usage: fit_group_stats.py FILE FACTOR RESPONSE SEP [WEIGHT]
SEP is the delimiter ("tab" for a tab). Prints {level: [n, mean, var]} as JSON, where with
a WEIGHT column n = sum(w), mean is weighted and var = sum(w (y - mean)^2) / (n - 1).
Used by TestDataReader as an outside reference for the streaming reader.
"""
import json
import sys

import numpy as np
import pandas as pd

path, factor, response, sep = sys.argv[1:5]
weight = sys.argv[5] if len(sys.argv) > 5 else None
frame = pd.read_csv(path, sep="\t" if sep == "tab" else sep, encoding="utf-8-sig", dtype={factor: str})
out = {}
for level, group in frame.groupby(factor, sort=False):
    y = group[response].to_numpy(dtype=float)
    w = group[weight].to_numpy(dtype=float) if weight else np.ones_like(y)
    n = w.sum()
    mean = float(np.sum(w * y) / n)
    var = float(np.sum(w * (y - mean) ** 2) / (n - 1)) if n > 1 else None
    out[str(level).strip()] = [float(n), mean, var]
json.dump(out, sys.stdout)
