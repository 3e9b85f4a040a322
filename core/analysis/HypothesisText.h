#pragma once

#include "core/base/Weight.h"

#include <QString>
#include <QStringList>

#include <vector>

namespace cb {

// What one coefficient estimates, written three ways.
struct HypothesisText
{
    QString symbols;     // "b1: mean(weekly, twice) - mean(none) = 0"
    QString words;       // "the average of weekly and twice minus none"
    QString combination; // "(weekly + twice)/2 - none"
};

// Describes a row of weights on the level means. label is "b0", "b1", ...
// sizes are the planned group sizes (to recognise the n-weighted mean).
HypothesisText describeHypothesis(const std::vector<Weight> &row, const QStringList &levels,
                                  const std::vector<Rational> &sizes, bool isIntercept, QStringView label);

} // namespace cb
