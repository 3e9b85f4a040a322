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

struct MixedFitResult
{
    // The design's columns as tested: each within row's coefficients, flattened (names joined with
    // " × ": "lip trills vs humming × ee vs ah"), with df and participants; byParticipant is set,
    // and the omnibus F is not computed (NaN), each row's fit has its own between F.
    FitResult overall;
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

// fitResultToJson of `overall`, its "omnibus" {test: "none", ...}, plus "groups", "within_cells"
// and "within_rows": [{name, weights, participants, sigma, df, f, f_df1, f_df2, f_p, coefficients}].
QJsonObject mixedFitToJson(const MixedFitResult &fit, const DataSummary &data);

} // namespace cb
