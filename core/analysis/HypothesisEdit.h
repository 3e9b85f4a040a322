#pragma once

#include "core/model/SchemeEdits.h"

namespace cb::edits {

// The edit of the reverse direction; it needs the algebra (codingFromHypotheses), so it lives
// with the analysis rather than with the other edits (core/model/SchemeEdits.h).
// The coding that tests the given hypotheses (one row of level weights per
// coefficient, the intercept's first when there is one). Column names (and whether the user
// gave them) are kept.
Result<Scheme> withHypotheses(const Scheme &scheme, const std::vector<std::vector<Weight>> &coefficientRows);

} // namespace cb::edits
