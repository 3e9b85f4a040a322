// Contrast Bench export: "Hypothesis matrix (weights on the level means)"
// 4 rows x 4 columns; rows: "coefficient", columns: "level"
#include <Eigen/Dense>
#include <array>
#include <string_view>

// Row and column names (UTF-8).
inline constexpr std::array<std::string_view, 4> hypotheses_rows{
    std::string_view{"intercept", 9},
    std::string_view{"watered_vs_none", 15},
    std::string_view{"frequent_vs_weekly", 18},
    std::string_view{"daily_vs_twice", 14},
};
inline constexpr std::array<std::string_view, 4> hypotheses_columns{
    std::string_view{"none", 4},
    std::string_view{"weekly", 6},
    std::string_view{"twice-weekly", 12},
    std::string_view{"daily", 5},
};

// The matrix as nested arrays: hypotheses_array[row][column].
inline constexpr std::array<std::array<double, 4>, 4> hypotheses_array{{
    {{0.25, 0.25, 0.25, 0.25}}, // "intercept"
    {{-1.0, 0.3333333333333333, 0.3333333333333333, 0.3333333333333333}}, // "watered_vs_none"
    {{0.0, -1.0, 0.5, 0.5}}, // "frequent_vs_weekly"
    {{0.0, 0.0, -1.0, 1.0}}, // "daily_vs_twice"
}};

// The same matrix as an Eigen matrix, filled row by row.
inline const Eigen::MatrixXd hypotheses = [] {
    Eigen::MatrixXd value(4, 4);
    value << 0.25, 0.25, 0.25, 0.25, // "intercept"
             -1.0, 0.3333333333333333, 0.3333333333333333, 0.3333333333333333, // "watered_vs_none"
             0.0, -1.0, 0.5, 0.5, // "frequent_vs_weekly"
             0.0, 0.0, -1.0, 1.0; // "daily_vs_twice"
    return value;
}();
