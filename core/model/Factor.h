#pragma once

#include "core/base/Result.h"
#include "core/base/Limits.h"
#include "core/base/Weight.h"

#include <QString>
#include <QStringList>

#include <vector>

namespace cb {

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
