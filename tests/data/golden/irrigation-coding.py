# Contrast Bench export: "Coding matrix of irrigation"
# 4 rows x 3 columns; rows: "level", columns: "column"
import numpy as np

coding_rows = [
    "none",
    "weekly",
    "twice-weekly",
    "daily",
]
coding_columns = [
    "watered_vs_none",
    "frequent_vs_weekly",
    "daily_vs_twice",
]
coding = np.array([
    [-3/4, 0, 0],  # "none"
    [1/4, -2/3, 0],  # "weekly"
    [1/4, 1/3, -1/2],  # "twice-weekly"
    [1/4, 1/3, 1/2],  # "daily"
], dtype=float)
