"""Inverse of a square matrix with NumPy, for the window's reverse-direction test.

Reads a JSON array of rows (numbers) from argv[1] and writes the inverse as a
JSON array of rows to argv[2].
"""
import json
import sys

import numpy as np

rows = json.load(open(sys.argv[1]))
inverse = np.linalg.inv(np.array(rows, dtype=float))
json.dump(inverse.tolist(), open(sys.argv[2], "w"))
