# Contrast Bench export: "Hypothesis matrix (weights on the level means)"
# 4 rows x 4 columns; rows: "coefficient", columns: "level"
hypotheses_rows = [
    "intercept",
    "watered_vs_none",
    "frequent_vs_weekly",
    "daily_vs_twice",
]
hypotheses_columns = [
    "none",
    "weekly",
    "twice-weekly",
    "daily",
]
hypotheses = Float64[
    0.25  0.25  0.25  0.25  # "intercept"
    (-1)  0.3333333333333333  0.3333333333333333  0.3333333333333333  # "watered_vs_none"
    0  (-1)  0.5  0.5  # "frequent_vs_weekly"
    0  0  (-1)  1  # "daily_vs_twice"
]
