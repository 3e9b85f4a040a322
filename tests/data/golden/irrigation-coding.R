# Contrast Bench export: "Coding matrix of irrigation"
# 4 rows x 3 columns; rows: "level", columns: "column"
coding <- matrix(c(
  -3/4, 0, 0,  # "none"
  1/4, -2/3, 0,  # "weekly"
  1/4, 1/3, -1/2,  # "twice-weekly"
  1/4, 1/3, 1/2  # "daily"
), nrow = 4, ncol = 3, byrow = TRUE)
dimnames(coding) <- list(
  c("none", "weekly", "twice-weekly", "daily"),
  c("watered_vs_none", "frequent_vs_weekly", "daily_vs_twice")
)
names(dimnames(coding)) <- c("level", "column")
