#include "core/model/Factor.h"

#include "core/base/NameTable.h"

#include <algorithm>
#include <vector>

#include <QSet>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

struct MeasureRow
{
    Measure value;
    const char16_t *id;
    const char16_t *title;
};

constexpr MeasureRow kMeasures[] = {
    {Measure::Between, u"between", u"between participants"},
    {Measure::Within, u"within", u"within participants"},
};

} // namespace

QString measureId(Measure measure)
{
    return QString::fromUtf16(rowOf(kMeasures, measure).id);
}

std::optional<Measure> measureFromId(const QString &id)
{
    return valueFromId(kMeasures, id);
}

QString measureIdList()
{
    return idList(kMeasures, u" or "_s);
}

QString measureTitle(Measure measure)
{
    return QString::fromUtf16(rowOf(kMeasures, measure).title);
}

std::vector<Rational> Factor::sizes() const
{
    if (!plannedN.empty())
        return plannedN;
    return std::vector<Rational>(size_t(levelCount()), Rational(1));
}

std::vector<double> Factor::sizesAsDouble() const
{
    std::vector<double> out;
    out.reserve(size_t(levelCount()));
    for (const Rational &r : sizes())
        out.push_back(r.get_d());
    return out;
}

std::vector<Weight> Factor::positions() const
{
    if (!spacing.empty())
        return spacing;
    std::vector<Weight> out;
    for (int i = 0; i < levelCount(); ++i)
        out.push_back(Weight(i + 1));
    return out;
}

Problem Factor::problem() const
{
    if (levels.size() < kMinLevels)
        return Problem{u"a factor needs at least %1 levels, got %2"_s.arg(kMinLevels).arg(levels.size()), u"levels"_s};
    if (levels.size() > kMaxLevels)
        return Problem{u"at most %1 levels are supported, got %2"_s.arg(kMaxLevels).arg(levels.size()), u"levels"_s};
    for (qsizetype i = 0; i < levels.size(); ++i)
        if (levels[i].trimmed().isEmpty())
            return Problem{u"level %1 has an empty name; every level needs a name"_s.arg(i + 1), u"levels"_s};
    // Unique names: sorted views side by side (cheaper than hashing; validate runs on every edit).
    std::vector<QStringView> sorted(levels.begin(), levels.end());
    std::sort(sorted.begin(), sorted.end());
    if (std::adjacent_find(sorted.begin(), sorted.end()) != sorted.end()) {
        QSet<QString> seen;
        for (qsizetype i = 0; i < levels.size(); ++i) {
            if (seen.contains(levels[i]))
                return Problem{u"level %1 repeats the name %2; level names must be unique"_s.arg(i + 1).arg(quoted(levels[i])), u"levels"_s};
            seen.insert(levels[i]);
        }
    }
    if (!plannedN.empty()) {
        if (plannedN.size() != size_t(levels.size()))
            return Problem{u"%1 planned group sizes for %2 levels; give one per level"_s.arg(plannedN.size()).arg(levels.size()), u"n"_s};
        for (size_t i = 0; i < plannedN.size(); ++i)
            if (plannedN[i] <= 0)
                return Problem{u"the planned size of level %1 is %2; sizes must be positive"_s.arg(quoted(levels[qsizetype(i)]), rationalToString(plannedN[i])),
                               u"n"_s};
    }
    if (!spacing.empty()) {
        if (spacing.size() != size_t(levels.size()))
            return Problem{u"%1 values for %2 levels; give one per level"_s.arg(spacing.size()).arg(levels.size()), u"spacing"_s};
        for (size_t i = 0; i < spacing.size(); ++i)
            for (size_t j = 0; j < i; ++j)
                if (spacing[i].value() == spacing[j].value())
                    return Problem{u"levels %1 and %2 have the same position %3; positions must differ"_s
                                       .arg(quoted(levels[qsizetype(j)]), quoted(levels[qsizetype(i)]), spacing[i].display()),
                                   u"spacing"_s};
    }
    if (isWithin() && !plannedN.empty())
        for (size_t i = 1; i < plannedN.size(); ++i)
            if (plannedN[i] != plannedN[0])
                return Problem{u"a factor measured within participants has the same participants at every level, but level %1 "
                               u"plans %2 and level %3 plans %4; give one number of participants"_s
                                   .arg(quoted(levels[0]), rationalToString(plannedN[0]), quoted(levels[qsizetype(i)]),
                                        rationalToString(plannedN[i])),
                               u"n"_s};
    return {};
}

QString Factor::validate() const
{
    const Problem p = problem();
    return p.isEmpty() ? QString() : p.field + u": "_s + p.message;
}

QStringList splitList(const QString &text, QChar separator)
{
    QStringList out;
    if (text.trimmed().isEmpty())
        return out;
    const QStringList parts = text.split(separator);
    for (const QString &p : parts)
        out << p.trimmed();
    return out;
}

// One value per level, each typed as a weight and read by take(weight, index), which returns
// the value or a failure naming the item. what names the values in the count's message.
template <typename T, typename Take>
static Result<std::vector<T>> parsePerLevel(const QStringList &items, int levelCount, const QString &where,
                                            QStringView what, Take take)
{
    using R = Result<std::vector<T>>;
    if (items.size() != levelCount)
        return R::failure(u"%1: %2 %3 for %4 levels; give one per level"_s.arg(where).arg(items.size()).arg(what).arg(levelCount));
    std::vector<T> out;
    for (qsizetype i = 0; i < items.size(); ++i) {
        auto w = parseWeight(items[i]);
        if (!w)
            return R::failure(u"%1, item %2: %3"_s.arg(where).arg(i + 1).arg(w.error()));
        Result<T> value = take(*w, i);
        if (!value)
            return R::failure(value.error());
        out.push_back(value.take());
    }
    return R(std::move(out));
}

Result<std::vector<Rational>> parseSizes(const QStringList &items, int levelCount, const QString &where)
{
    return parsePerLevel<Rational>(items, levelCount, where, u"sizes", [&](const Weight &w, qsizetype i) {
        if (!w.isExact() || w.rational() <= 0)
            return Result<Rational>::failure(u"%1, item %2: %3 is not a positive size; expected a number above 0"_s.arg(where)
                                                 .arg(i + 1)
                                                 .arg(quoted(items[i])));
        return Result<Rational>(w.rational());
    });
}

Result<std::vector<Weight>> parseSpacing(const QStringList &items, int levelCount, const QString &where)
{
    return parsePerLevel<Weight>(items, levelCount, where, u"positions",
                                 [](const Weight &w, qsizetype) { return Result<Weight>(w); });
}

} // namespace cb
