#pragma once

#include "core/base/Result.h"
#include "core/base/Limits.h"
#include "core/base/Weight.h"

#include <QString>
#include <QStringList>

#include <optional>
#include <vector>

namespace cb {

// How a factor's levels are observed: each participant in one level (separate groups, the
// default and what files written before the field existed mean), or each participant at every
// level (repeated measures). Coding and hypotheses do not depend on it; power and the data
// check do (core/power, core/data).
enum class Measure {
    Between, // independent groups: planned n is participants per level
    Within,  // repeated measures: planned n is the number of participants, the same at every level
};
// Stable ids for files and the command line: "between", "within".
QString measureId(Measure measure);
std::optional<Measure> measureFromId(const QString &id);
QString measureIdList(); // "between or within"
// For people: "between participants", "within participants".
QString measureTitle(Measure measure);

// A categorical predictor: a name and its ordered, unique, non-empty levels,
// with optional planned group sizes and numeric spacing (for trends).
struct Factor
{
    QString name;
    QStringList levels;
    // Planned group size per level (positive). Empty means equal sizes.
    std::vector<Rational> plannedN;
    // Numeric position per level for trends. Empty means 1, 2, ..., k.
    std::vector<Weight> spacing;
    Measure measure = Measure::Between;

    bool isWithin() const { return measure == Measure::Within; }
    int levelCount() const { return int(levels.size()); }
    bool hasPlannedN() const { return !plannedN.empty(); }
    // Planned sizes, all 1 when none were given.
    std::vector<Rational> sizes() const;
    std::vector<double> sizesAsDouble() const;
    // Spacing, 1..k when none was given.
    std::vector<Weight> positions() const;
    friend bool operator==(const Factor &, const Factor &) = default;

    // Empty when valid; otherwise what was expected, in the field it belongs to ("levels", "n",
    // "spacing").
    Problem problem() const;
    // The same as one text: "levels: level 2 has an empty name; ...".
    QString validate() const;
};

inline constexpr int kMinLevels = 2;

// Splits "a, b, c" into trimmed items (used for command-line and pasted lists).
QStringList splitList(const QString &text, QChar separator = u',');

// Parses planned group sizes, one per level: positive numbers, exact.
Result<std::vector<Rational>> parseSizes(const QStringList &items, int levelCount, const QString &where);
// Parses spacing values, one per level: distinct numbers.
Result<std::vector<Weight>> parseSpacing(const QStringList &items, int levelCount, const QString &where);

} // namespace cb
