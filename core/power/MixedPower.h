#pragma once

#include "core/model/Design.h"
#include "core/power/Power.h"

#include <QString>
#include <QStringList>

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
Result<PowerReport> computeMixedPower(const Eigen::MatrixXd &rows, const QStringList &names, const PowerSettings &settings,
                                      const MixedLayout &layout);

// Power of one column (contrast index; -1: the omnibus test) at each smallest-group size, as powerCurve does.
Result<std::vector<double>> mixedPowerCurve(const Eigen::MatrixXd &rows, int contrast, const PowerSettings &settings,
                                            const MixedLayout &layout, const std::vector<long long> &smallestGroupSizes);

} // namespace cb
