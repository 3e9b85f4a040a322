#include "ui/common/ColumnStatus.h"

#include "core/base/NumberText.h"

#include <charconv>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

using look::State;

State worst(State a, State b)
{
    auto rankOf = [](State s) {
        switch (s) {
        case State::Problem: return 3;
        case State::Caution: return 2;
        case State::Good: return 1;
        case State::Neutral: break;
        }
        return 0;
    };
    return rankOf(a) >= rankOf(b) ? a : b;
}

// "2, 3, 5" (1-based). Written into one string: every column of a large coding that is not
// orthogonal to the others lists most of them, on every edit.
QString columnList(const QList<int> &columns)
{
    QString out;
    out.reserve(columns.size() * 4);
    for (int c : columns) {
        if (!out.isEmpty())
            out += u", "_s;
        char digits[12];
        const char *end = std::to_chars(digits, digits + sizeof digits, c + 1).ptr;
        out += QLatin1StringView(digits, end - digits);
    }
    return out;
}

// Columns that take part in a rank problem: named by a Rank finding, or the
// left side of a dependency "name = ...".
std::vector<bool> rankColumns(const Analysis &a)
{
    std::vector<bool> out(size_t(a.columnCount), false);
    for (const Finding &f : a.findings) {
        if (f.topic != Finding::Topic::Rank)
            continue;
        if (f.column >= 0 && f.column < a.columnCount)
            out[size_t(f.column)] = true;
        if (f.column2 >= 0 && f.column2 < a.columnCount)
            out[size_t(f.column2)] = true;
    }
    const int offset = a.intercept ? 1 : 0;
    for (const QString &d : a.dependencies) {
        int best = -1;
        qsizetype bestLength = -1;
        for (int c = 0; c < a.coefficientNames.size(); ++c) {
            const QString lhs = a.coefficientNames[c] + u" = "_s;
            if (d.startsWith(lhs) && lhs.size() > bestLength) {
                best = c;
                bestLength = lhs.size();
            }
        }
        if (best >= offset)
            out[size_t(best - offset)] = true;
    }
    return out;
}

} // namespace

State ColumnStatus::overall() const
{
    return worst(rank, vif);
}

State vifState(const std::optional<double> &vif)
{
    if (!vif)
        return State::Neutral;
    if (*vif >= kVifProblem)
        return State::Problem;
    if (*vif >= kVifCaution)
        return State::Caution;
    return State::Good;
}

QString formatIndex(double value)
{
    if (!std::isfinite(value))
        return numberText(value);
    return value < 100 ? QString::number(value, 'f', 2) : QString::number(value, 'g', 4);
}

QString formatVif(const std::optional<double> &vif)
{
    return vif ? formatIndex(*vif) : kMissingMark.toString();
}

QString formatWeight(const Weight &weight)
{
    if (weight.isExact() || recogniseFraction(weight.value()))
        return weight.display(true);
    return look::approxMark() + weight.display(true);
}

QString editableWeight(const Weight &weight, bool keepApproxMark)
{
    if (weight.isExact())
        return weight.display(false);
    return keepApproxMark ? weight.storageString() : doubleToString(weight.value());
}

QString sizesPhrase(bool plannedSizes)
{
    return plannedSizes ? u"under the planned n"_s : u"under equal n"_s;
}

std::vector<ColumnStatus> columnStatuses(const Analysis &a, bool plannedSizes)
{
    std::vector<ColumnStatus> out;
    const int m = a.columnCount;
    if (int(a.columnSums.size()) != m || int(a.vif.size()) != m)
        return out;
    const std::vector<bool> inRank = rankColumns(a);
    out.resize(size_t(m));
    for (int j = 0; j < m; ++j) {
        ColumnStatus &s = out[size_t(j)];
        const size_t uj = size_t(j);
        for (int i = 0; i < m; ++i) {
            if (i == j)
                continue;
            if (!a.orthogonal(j, i))
                s.notOrthogonalWritten << i;
            if (!a.orthogonalInDesign(j, i))
                s.notOrthogonalInDesign << i;
        }
        s.sum = a.sumsToZero[uj] ? State::Good : State::Caution;
        s.sumText = look::mark(s.sum) + u" "_s + formatWeight(a.columnSums[uj]);
        s.orthogonality = m == 1 ? State::Neutral : (s.notOrthogonalInDesign.isEmpty() ? State::Good : State::Caution);
        const QString inDesign = columnList(s.notOrthogonalInDesign);
        s.orthogonalityText = m == 1 ? kMissingMark.toString()
                              : s.notOrthogonalInDesign.isEmpty() ? look::mark(State::Good) + u" none"_s
                                                                 : look::mark(State::Caution) + u" "_s + inDesign;
        s.vif = vifState(a.vif[uj]);
        s.vifText = a.vif[uj] ? look::mark(s.vif) + u" "_s + formatVif(a.vif[uj]) : kMissingMark.toString();
        s.rank = inRank[uj] ? State::Problem : State::Good;

        QStringList lines;
        lines << u"Column %1 \u2018%2\u2019"_s.arg(j + 1).arg(a.columnNames[j]);
        lines << (a.sumsToZero[uj] ? u"\u2713 Sums to 0: its coefficient compares groups only."_s
                                   : u"\u2717 Sums to %1, not 0: with an intercept its coefficient is still a comparison, "
                                     "but this column also shifts the overall level."_s.arg(a.columnSums[uj].display(true)));
        if (m > 1) {
            lines << (s.notOrthogonalWritten.isEmpty()
                          ? u"\u2713 Orthogonal to every other column as written."_s
                          : u"\u2717 Not orthogonal as written to column %1 (cross-products are not 0)."_s.arg(columnList(s.notOrthogonalWritten)));
            lines << (s.notOrthogonalInDesign.isEmpty()
                          ? u"\u2713 Orthogonal to every other column %1: estimates do not share variance."_s.arg(sizesPhrase(plannedSizes))
                          : u"\u2717 Not orthogonal %1 to column %2: their estimates are correlated."_s
                                .arg(sizesPhrase(plannedSizes), inDesign));
        }
        if (a.vif[uj])
            lines << u"%1 VIF %2 (%3 below %4; %5 from %4; %6 from %7)."_s
                         .arg(look::mark(s.vif), formatVif(a.vif[uj]), look::mark(State::Good), QString::number(kVifCaution),
                              look::mark(State::Caution), look::mark(State::Problem), QString::number(kVifProblem));
        else
            lines << u"VIF undefined for this column."_s;
        if (inRank[uj])
            lines << u"\u2717 Part of a linear dependency: the coefficients cannot all be estimated."_s;
        s.explanation = lines.join(u'\n');
    }
    return out;
}

} // namespace cb
