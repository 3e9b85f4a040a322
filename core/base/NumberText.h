#pragma once

#include <QJsonValue>
#include <QString>
#include <QStringView>

#include <optional>

namespace cb {

// Numbers for people and for JSON, written one way everywhere: the command-line reports,
// the window and every JSON object use these functions, never their own.

// The one mark for a number that does not exist (undefined, not computed): an em dash.
inline constexpr QStringView kMissingMark = u"\u2014";

// v with `significant` significant digits as QString::number(v, 'g', significant) writes it;
// kMissingMark for NaN, "∞" and "-∞" for infinities.
QString numberText(double v, int significant = 4);
QString numberText(const std::optional<double> &v, int significant = 4);

// The p-value rule: four decimals ("0.0159", "1.0000"), and "< 0.0001" below 0.0001, so
// that no p is shown as 0 and no digits beyond what a test can carry are shown;
// kMissingMark when undefined.
inline constexpr double kSmallestShownP = 1e-4;
QString pValueText(double p);
// The same in a sentence: "p = 0.0159", "p < 0.0001", "p = —".
QString pClause(double p);

// A JSON number; non-finite numbers and nullopt are written as null.
QJsonValue jsonNumber(double v);
QJsonValue jsonNumber(const std::optional<double> &v);

} // namespace cb
