#pragma once

#include "core/base/Result.h"
#include "core/model/Scheme.h"

#include <QString>

#include <vector>

// Edits as plain functions from one scheme to the next. The window turns each
// into one undo step; tests call them directly. Structure only: every number
// that has a meaning (standard columns, codings for hypotheses) comes from core.
namespace cb::edits {

struct CellWeight
{
    int level = 0;
    int column = 0;
    Weight weight;
};

// Coding grid. Typing weights turns any scheme into a custom one.
Scheme withWeights(const Scheme &scheme, const std::vector<CellWeight> &cells);
// A name the user gives: kept through later edits (Column::named).
Result<Scheme> withColumnName(const Scheme &scheme, int column, const QString &name);
// Back to the name the tool gives after what the column tests; it follows edits again.
Result<Scheme> withGeneratedName(const Scheme &scheme, int column);
// Keeps the user's name for what the column tests now (the window stops marking it).
Result<Scheme> withNameKept(const Scheme &scheme, int column);
Result<Scheme> withColumnAdded(const Scheme &scheme);
Result<Scheme> withColumnRemoved(const Scheme &scheme, int column);
Scheme withIntercept(const Scheme &scheme, bool intercept);

// Levels. A standard scheme is rebuilt for the new levels (its reference
// follows its level); a custom scheme keeps its weights, row by row.
Result<Scheme> withFactorName(const Scheme &scheme, const QString &name);
Result<Scheme> withLevelName(const Scheme &scheme, int level, const QString &name);
Result<Scheme> withLevelAdded(const Scheme &scheme);
Result<Scheme> withLevelRemoved(const Scheme &scheme, int level);
// Moves level `from` so that it ends up at index `to`.
Result<Scheme> withLevelMoved(const Scheme &scheme, int from, int to);
// Planned size of one level from text; the other levels keep theirs (1 when none were planned).
Result<Scheme> withPlannedSize(const Scheme &scheme, int level, const QString &text);
Result<Scheme> withEqualSizes(const Scheme &scheme);
// Every level's planned size at once (empty: equal sizes).
Result<Scheme> withSizes(const Scheme &scheme, std::vector<Rational> sizes);
Result<Scheme> withPosition(const Scheme &scheme, int level, const QString &text);
Result<Scheme> withDefaultPositions(const Scheme &scheme);
Scheme withNotes(const Scheme &scheme, const QString &notes);
// Between or within participants. A within factor has one number of participants: its planned
// sizes must be equal (the edit is refused, naming the levels, when they are not).
Result<Scheme> withMeasure(const Scheme &scheme, Measure measure);

// Replaces the columns with a standard scheme's, keeping levels, sizes, intercept and notes.
Result<Scheme> withStandard(const Scheme &scheme, SchemeKind kind, const SchemeOptions &options);
// withHypotheses, the reverse direction's edit, is in core/analysis/HypothesisEdit.h.

// "level 5", "level 6", ... not yet among `taken`.
QString freshName(const QStringList &taken, const QString &stem);
// The scheme as a custom one (its kind and reference dropped), weights unchanged.
Scheme asCustom(Scheme scheme);

} // namespace cb::edits
