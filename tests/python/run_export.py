"""Runs Python files written by Contrast Bench's exporter and prints what they hold.

Usage: run_export.py FILE VARIABLE [FILE VARIABLE ...]

Each FILE is executed on its own (runpy); VARIABLE names the NumPy matrix it
defines, with VARIABLE_rows and VARIABLE_columns the lists of names. Printed,
one item a line, so that the Qt test can compare bit for bit:

    table VARIABLE
    shape ROWS COLUMNS
    row HEX-OF-UTF8
    column HEX-OF-UTF8
    cell I J FLOAT.hex()

The matrix must be a two-dimensional float64 array.
"""
import runpy
import sys

import numpy as np


def main(argv):
    if len(argv) % 2 != 0 or not argv:
        print("usage: run_export.py FILE VARIABLE [FILE VARIABLE ...]", file=sys.stderr)
        return 2
    for path, var in zip(argv[0::2], argv[1::2]):
        ns = runpy.run_path(path)
        m = ns[var]
        rows = ns[var + "_rows"]
        cols = ns[var + "_columns"]
        if not isinstance(m, np.ndarray) or m.dtype != np.float64 or m.ndim != 2:
            print(f"{var}: not a 2-d float64 array", file=sys.stderr)
            return 1
        if not all(isinstance(s, str) for s in list(rows) + list(cols)):
            print(f"{var}: names are not all str", file=sys.stderr)
            return 1
        print("table", var)
        print("shape", m.shape[0], m.shape[1])
        for s in rows:
            print("row", s.encode("utf-8").hex())
        for s in cols:
            print("column", s.encode("utf-8").hex())
        for i in range(m.shape[0]):
            for j in range(m.shape[1]):
                print("cell", i, j, float(m[i, j]).hex())
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
