#pragma once

#include "core/data/DataFit.h"
#include "core/model/Design.h"

#include <QJsonObject>

#include <vector>

namespace cb {

// The by-participant analysis of a mixed design (some factors between participants, some within;
// core/power/MixedPower.h has the layout), from long data read with a participant column whose
// rows name the design's cells. Each participant belongs to one group (a combination of the
// between factors' levels) and has cell means at the within cells (replicates averaged).
//
// For each within row r (the participants' average over the within cells, then each hypothesis
// row of the within factors' coding), every participant with the cells r weighs gets a score r'y;
// the between coding is then fitted on those scores by fitScheme, the between-groups fit, with
// the groups as its levels. So the average row's intercept is the grand mean and its columns are
// the between effects; a within row's intercept is that within contrast (over the groups as the
// between coding's intercept weighs them) and its columns the between x within interactions.
// Each test uses the pooled within-group variance of its scores (N - g df, N the participants it
// used); without a between factor it is the one-sample t (N - 1 df).
struct MixedFitRow
{
    QString name;                // "average" or the within column's name
    std::vector<double> weights; // over the within cells
    int participants = 0;        // with every within cell the row weighs
    FitResult fit;               // the between coding on the scores (levels: the groups)
};

// A multivariate test of a mixed design over the participants with every within cell: L B M = 0
// (wilksTest in core/data/DataFit.h) with the participants' cell means as Y, their groups' rows of
// the between coding as X, L the between part (the groups' equal-weight average, or a between
// term's columns) and M the within part (the participants' average over the within cells, or a
// within term's hypothesis rows).
struct MixedTest
{
    QString name;       // "all within cells", a within term, a between term, or "A × T"
    QString hypothesis; // what it tests, in words
    MultivariateTest test;
    QString refusal;    // why it could not be computed (then the numbers are NaN)
    int participants = 0;
    Eigen::MatrixXd contrast;  // L: rows over the between design's columns
    Eigen::MatrixXd transform; // M: columns over the within cells
};

struct MixedFitResult
{
    // The design's columns as tested: each within row's coefficients, flattened (names joined with
    // " × ": "lip trills vs humming × ee vs ah"), with df and participants; byParticipant and
    // mixedDesign are set, and the omnibus F is the first of `tests` (Hotelling's T^2 that the
    // within cells are equal, averaged over the groups).
    FitResult overall;
    // All within cells; each within term when there are several; each between term on the
    // participants' averages; each between term x within term.
    std::vector<MixedTest> tests;
    std::vector<MixedFitRow> rows;
    QStringList groups;
    QStringList withinCells;
    Eigen::MatrixXd betweenDesign; // groups x p: the design rows the scores were fitted with
};

// Refused, naming the participant and the lines: a participant with rows in two groups. Also the
// refusals of fitScheme (levels that do not match the cells, ...) and a participant with one
// within cell only.
Result<MixedFitResult> fitMixedParticipants(const Design &design, const DataSummary &data, const FitOptions &options = {},
                                            const LevelMapping &mapping = {});

// fitResultToJson of `overall`, its "omnibus" {test: "hotelling", ..., tests: [{name, hypothesis,
// wilks, f, df1, df2, p, exact, participants, refusal}]}, plus "groups", "within_cells" and
// "within_rows": [{name, weights, participants, sigma, df, f, f_df1, f_df2, f_p, coefficients}].
QJsonObject mixedFitToJson(const MixedFitResult &fit, const DataSummary &data);

} // namespace cb
