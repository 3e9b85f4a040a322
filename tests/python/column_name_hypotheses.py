"""Hypothesis rows behind the names in tests/core/TestColumnNames.cpp.

Each coding [1 | C] is square, so its coefficients test the rows of its inverse (intercept row
first). Run with /usr/bin/python3 (NumPy); the printed rows are the ones the test names.
"""
import numpy as np

CASES = {
    # The scenario after typing column 1 as 1,1,-1,-1 and column 2 as 1,-1,0,0 over
    # treatment coding of four levels (column 3 stays D's indicator).
    "issue scenario": [[1, 1, -1, -1], [1, -1, 0, 0], [0, 0, 0, 1]],
    "treatment": [[0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1]],
    "sum": [[1, 0, 0, -1], [0, 1, 0, -1], [0, 0, 1, -1]],
    "helmert": [[3 / 4, -1 / 4, -1 / 4, -1 / 4], [0, 2 / 3, -1 / 3, -1 / 3], [0, 0, 1 / 2, -1 / 2]],
    "reverse helmert": [[-1 / 2, 1 / 2, 0, 0], [-1 / 3, -1 / 3, 2 / 3, 0], [-1 / 4, -1 / 4, -1 / 4, 3 / 4]],
    "integer polynomial": [[-3, -1, 1, 3], [1, -1, -1, 1], [-1, 3, -3, 1]],
    "one against two others": [[2, -1, -1, 0], [0, 1, -1, 0], [0, 0, 0, 1]],
}

for name, columns in CASES.items():
    x = np.column_stack([np.ones(4)] + [np.array(c, float) for c in columns])
    print(name)
    print(np.round(np.linalg.inv(x), 12))
