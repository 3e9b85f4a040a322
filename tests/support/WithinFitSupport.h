#pragma once
// Helpers shared by the by-participant and by-item fit tests (TestParticipantFit, TestItemFit):
// the three-level cue factor measured within participants, the hypothesis rows as the reference
// scripts read them, and the comparison of one contrast test with a script's figures.

#include "core/analysis/Analysis.h"
#include "core/data/DataFit.h"
#include "core/model/Scheme.h"
#include "core/model/SchemeEdits.h"

#include <QJsonArray>
#include <QJsonObject>
#include <QString>

#include <QByteArray>
#include <QStringList>

#include <algorithm>
#include <cmath>
#include <functional>

namespace cb::test {

inline Scheme withinCueScheme(SchemeKind kind)
{
    Factor f;
    f.name = QStringLiteral("cue");
    f.levels = {QStringLiteral("none"), QStringLiteral("valid"), QStringLiteral("invalid")};
    f.measure = Measure::Within;
    return makeScheme(f, kind).take();
}

// |a - b| within tolerance relative to |b| (absolute below 1).
inline bool nearRelative(double a, double b, double tolerance)
{
    return std::abs(a - b) <= tolerance * std::max(1.0, std::abs(b));
}

// The scheme's hypothesis rows (intercept first) as a JSON array of arrays.
inline QJsonArray hypothesisRowsJson(const Scheme &scheme)
{
    QJsonArray rows;
    const Analysis analysis = analyze(scheme);
    for (Eigen::Index r = 0; r < analysis.hypothesisValues.rows(); ++r) {
        QJsonArray row;
        for (Eigen::Index j = 0; j < analysis.hypothesisValues.cols(); ++j)
            row.append(analysis.hypothesisValues(r, j));
        rows.append(row);
    }
    return rows;
}

// One contrast's test on the units' scores against a script's {estimate, se, t, p, ci_low,
// ci_high, df, <unitsKey>}; empty when they agree, else the first figure that differs.
inline QString contrastTestDiffers(const FitCoefficient &mine, const QJsonObject &ref, const QString &unitsKey)
{
    const struct
    {
        const char *key;
        double value;
        double tolerance;
    } figures[] = {{"estimate", mine.estimate, 1e-12}, {"se", mine.se, 1e-10},        {"t", mine.t, 1e-9},
                   {"p", mine.p, 1e-9},                {"ci_low", mine.ciLow, 1e-10}, {"ci_high", mine.ciHigh, 1e-10},
                   {"df", mine.df, 0.0}};
    for (const auto &f : figures) {
        const double expected = ref[QLatin1String(f.key)].toDouble();
        if (!nearRelative(f.value, expected, f.tolerance))
            return QStringLiteral("%1: %2, expected %3").arg(QLatin1String(f.key)).arg(f.value, 0, 'g', 17).arg(expected, 0, 'g', 17);
    }
    if (mine.participants != ref[unitsKey].toInt())
        return QStringLiteral("%1: %2, expected %3").arg(unitsKey).arg(mine.participants).arg(ref[unitsKey].toInt());
    return {};
}

// A Latin square in long format (header "participant,item,level,value" as given): participant
// p (named prefixes[0] + p) sees item i (prefixes[1] + i) once, at level (i + p) mod k;
// value(p, i, j) gives the response.
inline QByteArray latinSquareCsv(const QByteArray &header, const QStringList &prefixes, const QStringList &levels, int participants,
                                 int items, const std::function<int(int, int, int)> &value)
{
    QByteArray out = header + '\n';
    for (int p = 0; p < participants; ++p)
        for (int i = 0; i < items; ++i) {
            const int j = (i + p) % int(levels.size());
            out += prefixes[0].toUtf8() + QByteArray::number(p) + ',' + prefixes[1].toUtf8() + QByteArray::number(i) + ','
                + levels[j].toUtf8() + ',' + QByteArray::number(value(p, i, j)) + '\n';
        }
    return out;
}

} // namespace cb::test
