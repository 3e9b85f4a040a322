#pragma once

#include "core/analysis/Analysis.h"
#include "core/model/Scheme.h"
#include "core/model/Study.h"

#include <QString>
#include <QStringList>

#include <optional>
#include <vector>

namespace cb {

// Two codings of the same factor (or of the same design's cells) side by side: for each
// coefficient, whether it tests the same hypothesis under both, the same one rescaled (and by
// what factor), or something else; and how the design health differs. Pure algebra on the two
// analyses' hypothesis rows (weights on the level means; exact fractions where both are exact).

enum class Correspondence {
    Same,          // identical rows: same hypothesis, same estimate
    Rescaled,      // right row = factor x left row: same null hypothesis, estimate times factor
    Different,     // not proportional: tests something else
    Unavailable,   // a side has no such coefficient, or its coding is rank deficient
};

// How the right row relates to the left one. factor is set for Same (1) and Rescaled.
struct RowRelation
{
    Correspondence kind = Correspondence::Different;
    std::optional<Weight> factor;
};
// Compares two rows of weights on the level means: proportional rows are Same (factor 1) or
// Rescaled; exact rows compare exactly, floating ones within 1e-9 of the largest weight.
RowRelation relateRows(const std::vector<Weight> &left, const std::vector<Weight> &right);

struct ComparedCoefficient
{
    int left = -1;  // coefficient index in the left analysis (intercept first), -1 when none
    int right = -1; // the same on the right
    RowRelation relation;
    // When the coefficient in the same place on the right tests something different but another
    // one tests the same (or a rescaled) hypothesis: that one's index, and how it relates.
    int alsoRight = -1;
    RowRelation alsoRelation;
    QString verdict; // one sentence for people
};

// One line of the health comparison: what, the two values as shown, whether they differ.
struct HealthDifference
{
    QString what;
    QString left;
    QString right;
    bool differs = false;
};

struct CodingComparison
{
    QString leftTitle;  // "Treatment (dummy)", "Sum (effect, deviation)", a file's name, ...
    QString rightTitle;
    Analysis left;
    Analysis right;
    std::vector<ComparedCoefficient> coefficients; // intercept first when either has one
    std::vector<HealthDifference> health;
    QString interceptLeft;  // what the intercept is under each coding, in words ("the mean of a")
    QString interceptRight;
    QStringList summary; // a few sentences: how many same, rescaled, different; the intercept
    bool overCells = false; // a design's codings, compared over its cells (the analyses' levels are cells)
};

// A coding's title for people: the scheme's title, with its reference level where it has one
// ("Treatment (dummy), reference control"), or "Custom".
QString codingTitle(const Scheme &scheme);

// The comparison of two codings given with their analyses (a design's cell scheme and its
// analysis work the same way). Both must have the same levels; otherwise an error names them.
Result<CodingComparison> compareCodings(const Scheme &left, const Analysis &leftAnalysis, const Scheme &right,
                                        const Analysis &rightAnalysis);
Result<CodingComparison> compareCodings(const Scheme &left, const Scheme &right);
// Two studies of the same factor, or of the same design (compared over its cells); the titles
// name the active factor's coding (in a design, with the factor's name).
Result<CodingComparison> compareStudies(const Study &left, const Study &right);

// The study with its active factor coded by another standard scheme (options as makeScheme
// takes them; spacing, when given, replaces the factor's positions, empty for equal spacing).
// The intercept stays as it was.
Result<Study> recodedStudy(const Study &study, SchemeKind kind, const SchemeOptions &options,
                           const std::optional<std::vector<Weight>> &spacing = std::nullopt);

} // namespace cb
