"""Reference for the summary query's accuracy (tests/cli/TestDatabaseFit.cpp).

Reads a CSV with a header and columns level,value from the file named on the command line and
prints, per level, NumPy's mean and sample variance (numpy.var with ddof=1, a two-pass
computation) as JSON: {"levels": {"a": {"n": 3, "mean": ..., "variance": ...}, ...}}.
Run with /usr/bin/python3 (Debian's NumPy).
"""
import csv
import json
import sys

import numpy as np

groups = {}
with open(sys.argv[1], newline="", encoding="utf-8") as f:
    for row in csv.DictReader(f):
        groups.setdefault(row["level"], []).append(float(row["value"]))
out = {}
for name, values in groups.items():
    x = np.array(values, dtype=np.float64)
    out[name] = {"n": int(x.size), "mean": float(np.mean(x)), "variance": float(np.var(x, ddof=1))}
print(json.dumps({"levels": out}))
