#pragma once

#include "core/model/Scheme.h"
#include "core/base/Weight.h"

#include <Eigen/Dense>

#include <QString>
#include <QStringList>

#include <optional>
#include <type_traits>
#include <vector>

namespace cb {

// An n x n table in one block of memory (per-pair diagnostics are rebuilt on every edit:
// one allocation instead of one per row). t(i, j) reads row i, column j.
template <class T>
class SquareTable
{
    // Flags are held as bytes: std::vector<bool> cannot hand out references.
    using Cell = std::conditional_t<std::is_same_v<T, bool>, unsigned char, T>;

public:
    SquareTable() = default;
    explicit SquareTable(int n, const T &fill = T()) : m_n(n), m_cells(size_t(n) * size_t(n), Cell(fill)) {}
    int size() const { return m_n; }
    bool isEmpty() const { return m_n == 0; }
    decltype(auto) operator()(int i, int j) const
    {
        if constexpr (std::is_same_v<T, bool>)
            return m_cells[index(i, j)] != 0;
        else
            return static_cast<const T &>(m_cells[index(i, j)]);
    }
    void set(int i, int j, T value) { m_cells[index(i, j)] = Cell(std::move(value)); }
    friend bool operator==(const SquareTable &, const SquareTable &) = default;

private:
    size_t index(int i, int j) const { return size_t(i) * size_t(m_n) + size_t(j); }
    int m_n = 0;
    std::vector<Cell> m_cells;
};

// A non-fatal finding about a scheme, for the window's list and the reports.
struct Finding
{
    enum class Severity { Info, Caution, Problem };
    enum class Topic {
        ColumnSum,         // a column does not sum to zero
        Orthogonality,     // a pair is not orthogonal (as written or under n)
        Rank,              // rank deficiency and the dependency
        Collinearity,      // condition index or VIF over a threshold
        DependsOnSizes,    // implied hypotheses depend on the planned n
        ExactPath,         // exact arithmetic was not used, and why
        Hypothesis,        // about a requested hypothesis (reverse direction)
    };
    Severity severity = Severity::Info;
    Topic topic = Topic::ColumnSum;
    QString message;
    int column = -1;  // coding column (0-based) the finding is about, or -1
    int column2 = -1; // second column for pairwise findings, or -1
};

// The constant's name among the coefficient names (JSON, exports, dependencies).
inline constexpr QStringView kInterceptName = u"intercept";

// A coefficient as the reports and the window label it: "b0 intercept", "b2 low vs control".
// b0 is the intercept; without one the coefficients count from b1. index counts from 0.
QString coefficientLabel(bool intercept, int index, const QString &name);

// What a coding implies: hypotheses and diagnostics. Recomputed on every change.
struct Analysis
{
    int levelCount = 0;       // k
    int columnCount = 0;      // m coding columns
    int coefficientCount = 0; // p = m + 1 with intercept, m without
    bool intercept = true;
    QStringList levels;
    QStringList columnNames;      // m names
    QStringList coefficientNames; // p names, kInterceptName first when there is one

    // Exact arithmetic was used for hypotheses, sums and orthogonality.
    bool exact = false;

    // Rank of [1 | C] (or C without intercept) and whether it equals p.
    int rank = 0;
    bool fullRank = false;
    // For a rank-deficient design: each dependent column written in terms of
    // earlier ones, e.g. "intercept = a + b + c". Empty otherwise.
    QStringList dependencies;

    // Hypothesis matrix, p rows (intercept first) of k weights on the level means.
    // Empty when rank deficient.
    std::vector<std::vector<Weight>> hypotheses;
    Eigen::MatrixXd hypothesisValues; // the same as doubles (p x k), empty when rank deficient
    // True when m < k-1 (with intercept): the rows are least-squares combinations
    // under the planned n, (X'WX)^-1 X'W, and change with n.
    bool dependsOnSizes = false;

    // Per coefficient: "b2: mean(weekly, twice) - mean(none) = 0" and plain words.
    QStringList hypothesisSymbols;
    QStringList hypothesisWords;
    QStringList hypothesisCombinations; // "(2 weekly + twice)/3 - none"

    // Diagnostics on the coding columns.
    std::vector<Weight> columnSums;                  // m
    std::vector<bool> sumsToZero;                    // m
    SquareTable<bool> orthogonal;          // m x m, c_i . c_j == 0 as written
    SquareTable<bool> orthogonalInDesign;  // m x m, n-weighted centred cross-product == 0
    SquareTable<Weight> crossProducts;       // m x m, c_i . c_j
    SquareTable<Weight> designCrossProducts; // m x m, sum n c_i c_j - (sum n c_i)(sum n c_j)/N

    // Collinearity of the design under the planned n: columns of diag(sqrt n) [1 | C]
    // scaled to unit length (Belsley, Kuh & Welsch 1980).
    std::optional<double> conditionNumber;  // nullopt when singular
    std::vector<double> conditionIndices;   // p, largest singular value over each, ascending; inf when zero
    // Variance inflation per coding column under the planned n; nullopt where undefined.
    std::vector<std::optional<double>> vif;
    Eigen::MatrixXd correlation; // m x m, n-weighted correlations; NaN where a column is constant

    std::vector<Finding> findings;
};

// Thresholds (common practice, not laws).
inline constexpr double kConditionIndexFlag = 30.0; // Belsley, Kuh & Welsch (1980)
inline constexpr double kVifCaution = 5.0;
inline constexpr double kVifProblem = 10.0;
// Largest k for which hypotheses are computed in exact rational arithmetic.
inline constexpr int kExactLevelLimit = 40;

// How much analyze() computes: everything, or only the rank, dependencies and hypotheses (the
// naming pass needs no VIFs, column checks or findings about them, about half the work).
enum class AnalysisScope { Full, Hypotheses };
Analysis analyze(const Scheme &scheme, AnalysisScope scope = AnalysisScope::Full);

// Design rows of a scheme: k x p, a column of ones first when it has an intercept.
Eigen::MatrixXd designRows(const Scheme &scheme);

// The reverse direction: the coding whose coefficients test exactly the given
// hypotheses. rows: weights on the k level means, one row per coefficient.
// With an intercept, interceptRow is the intercept's hypothesis (default: the
// unweighted grand mean) and each row must sum to 0.
Result<std::vector<Column>> codingFromHypotheses(const Factor &factor,
                                                 const std::vector<std::vector<Weight>> &rows,
                                                 bool intercept,
                                                 const std::optional<std::vector<Weight>> &interceptRow = std::nullopt);

} // namespace cb
