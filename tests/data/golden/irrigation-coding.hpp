// Contrast Bench export: "Coding matrix of irrigation"
// 4 rows x 3 columns; rows: "level", columns: "column"
#include <Eigen/Dense>
#include <array>
#include <string_view>

// Row and column names (UTF-8).
inline constexpr std::array<std::string_view, 4> coding_rows{
    std::string_view{"none", 4},
    std::string_view{"weekly", 6},
    std::string_view{"twice-weekly", 12},
    std::string_view{"daily", 5},
};
inline constexpr std::array<std::string_view, 3> coding_columns{
    std::string_view{"watered_vs_none", 15},
    std::string_view{"frequent_vs_weekly", 18},
    std::string_view{"daily_vs_twice", 14},
};

// The matrix as nested arrays: coding_array[row][column].
inline constexpr std::array<std::array<double, 3>, 4> coding_array{{
    {{-3.0 / 4, 0.0, 0.0}}, // "none"
    {{1.0 / 4, -2.0 / 3, 0.0}}, // "weekly"
    {{1.0 / 4, 1.0 / 3, -1.0 / 2}}, // "twice-weekly"
    {{1.0 / 4, 1.0 / 3, 1.0 / 2}}, // "daily"
}};

// The same matrix as an Eigen matrix, filled row by row.
inline const Eigen::MatrixXd coding = [] {
    Eigen::MatrixXd value(4, 3);
    value << -3.0 / 4, 0.0, 0.0, // "none"
             1.0 / 4, -2.0 / 3, 0.0, // "weekly"
             1.0 / 4, 1.0 / 3, -1.0 / 2, // "twice-weekly"
             1.0 / 4, 1.0 / 3, 1.0 / 2; // "daily"
    return value;
}();
