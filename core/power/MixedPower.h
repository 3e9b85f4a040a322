#pragma once

#include "core/model/Design.h"
#include "core/power/Power.h"

#include <QString>
#include <QStringList>

#include <optional>
#include <vector>

namespace cb {

// A design that crosses factors measured between participants (each participant in one level)
// with factors measured within participants (each participant at every level): a mixed, or
// split-plot, design. Its cells split into groups, the combinations of the between factors'
// levels (one group when there is none), and within cells, the combinations of the within
// factors' levels; each participant belongs to one group and gives a value in every within cell.
struct MixedLayout
{
    std::vector<int> groupOf;   // per cell (A-major): its group
    std::vector<int> withinOf;  // per cell: its within cell
    QStringList groupNames;     // levels of the between factors joined by kCellJoiner ("all" without any)
    QStringList withinNames;    // levels of the within factors joined by kCellJoiner
    int groups() const { return int(groupNames.size()); }
    int withinCells() const { return int(withinNames.size()); }
};

bool hasWithinFactor(const Design &design);
MixedLayout mixedLayout(const Design &design);

// The multivariate tests of a mixed design, one list for the data check (core/data/MixedFit.h)
// and for power: L B M = 0, B the coefficients of the between coding (betweenDesign, groups x p)
// fitted to the participants' values in the within cells, L rows over its columns, M columns over
// the within cells. In order: all within cells (L the groups' equal-weight average, M the within
// coding's hypothesis rows), each within term when there are several, then for each between term
// (when the between coding has an intercept) the term on the participants' averages and the term
// x each within term.
struct MixedTermTest
{
    QString name;              // "all within cells", a within term, a between term, or "A × T"
    QString hypothesis;        // what it tests, in words
    Eigen::MatrixXd contrast;  // L
    Eigen::MatrixXd transform; // M
};
struct MixedTerms
{
    std::optional<Scheme> between; // the between factors' coding over the groups; none without a between factor
    Eigen::MatrixXd betweenDesign; // groups x p: its design rows (a column of ones without a between factor)
    Eigen::MatrixXd withinRows;    // the within coding's hypothesis rows over the within cells, the intercept's first
    QStringList withinNames;       // the within coding's column names
    std::vector<MixedTermTest> tests;
};
// Refused when the design has no factor within participants, or the within coding is rank deficient.
Result<MixedTerms> mixedTerms(const Design &design);

// What a column of a mixed design tests, from its hypothesis row h over the cells written as a
// groups x within-cells matrix H. When H = a c' (rank one): c constant is a between column (a
// contrast a of the participants' averages), otherwise the column tests the within contrast c:
// a summing to 0 compares it across groups (between x within), else it is averaged over the
// groups with weights a (within). A row that is not of that form is "combined".
enum class MixedPart { Between, Within, Interaction, Combined };
QString mixedPartText(MixedPart part); // "between", "within", "between × within", "combined"
MixedPart mixedPart(const Eigen::VectorXd &h, const MixedLayout &layout);

// Empty when the settings fit the mixed design: means and SDs (sd or sds) per cell, A-major;
// n per cell (every cell of a group holds the group's participants, so they must agree within a
// group) or total (participants, split equally over the groups); correlation or correlations
// between a participant's values in two within cells (correlations: withinCells x withinCells).
Problem validateMixedPowerSettings(const PowerSettings &settings, const MixedLayout &layout, const QString &fieldPrefix = {});

// Participants per group from the settings (n of the group's first cell, or total / groups).
std::vector<double> groupSizes(const PowerSettings &settings, const MixedLayout &layout);

// Power of each column of a mixed design (rows: m x cells hypothesis rows without the
// intercept). Group j's participants have covariance Sigma_j = D_j R D_j over the within cells
// (D_j the SDs of its cells, R the correlations). A column with H_j the weights of group j has
// estimate sum_j H_j' mu_j and SE sqrt(sum_j H_j' Sigma_j H_j / n_j): for a between column this
// is a contrast of the participants' averages over the within cells, for a within or between x
// within column a contrast of the groups' mean contrast scores. Each column has its own error
// term, the pooled within-group variance of its scores, with N - g df (N participants, g groups;
// the multivariate, separate-error approach to split-plot designs, Maxwell & Delaney 2004,
// ch. 14), and the noncentral t. The sample-size search keeps the groups' ratios and reports
// participants per group. The omnibus test is Hotelling's T^2 that the within cells are equal,
// averaged over the groups (MixedModel::omnibusAt in MixedPower.cpp; the data check's omnibus).
// With terms (mixedTerms of the same design), also the power of each of the data check's
// multivariate tests (PowerReport::terms; MixedModel::termAt in MixedPower.cpp).
Result<PowerReport> computeMixedPower(const Eigen::MatrixXd &rows, const QStringList &names, const PowerSettings &settings,
                                      const MixedLayout &layout, const MixedTerms *terms = nullptr);
// The same for a design: its layout, and its multivariate tests when mixedTerms gives them.
Result<PowerReport> computeMixedPower(const Eigen::MatrixXd &rows, const QStringList &names, const PowerSettings &settings,
                                      const Design &design);

// Power of one column (contrast index; -1: the omnibus test) at each smallest-group size, as powerCurve does.
Result<std::vector<double>> mixedPowerCurve(const Eigen::MatrixXd &rows, int contrast, const PowerSettings &settings,
                                            const MixedLayout &layout, const std::vector<long long> &smallestGroupSizes);

} // namespace cb
