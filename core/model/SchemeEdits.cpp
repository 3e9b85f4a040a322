#include "core/model/SchemeEdits.h"

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb::edits {

Scheme asCustom(Scheme s)
{
    s.kind = SchemeKind::Custom;
    s.reference = -1;
    return s;
}

namespace {

// A standard scheme is rebuilt from its definition; a custom one is kept as it is.
Result<Scheme> settle(Scheme s)
{
    if (QString e = s.factor.validate(); !e.isEmpty())
        return Result<Scheme>::failure(e);
    if (s.kind == SchemeKind::Custom)
        return Result<Scheme>(std::move(s));
    return withStandard(s, s.kind, schemeOptions(s));
}

} // namespace

QString freshName(const QStringList &taken, const QString &stem)
{
    for (int i = int(taken.size()) + 1;; ++i) {
        const QString name = u"%1 %2"_s.arg(stem).arg(i);
        if (!taken.contains(name))
            return name;
    }
}

Scheme withWeights(const Scheme &scheme, const std::vector<CellWeight> &cells)
{
    Scheme s = asCustom(scheme);
    for (const CellWeight &c : cells)
        s.columns[size_t(c.column)].weights[size_t(c.level)] = c.weight;
    return s;
}

Result<Scheme> withColumnName(const Scheme &scheme, int column, const QString &name)
{
    if (name.trimmed().isEmpty())
        return Result<Scheme>::failure(u"column %1: a column needs a name"_s.arg(column + 1));
    Scheme s = asCustom(scheme);
    Column &c = s.columns[size_t(column)];
    c.name = name.trimmed();
    c.named = true;
    c.namedFor.clear(); // the naming pass records what it tests now
    return Result<Scheme>(std::move(s));
}

Result<Scheme> withGeneratedName(const Scheme &scheme, int column)
{
    if (column < 0 || column >= scheme.columnCount())
        return Result<Scheme>::failure(u"column %1: no such column"_s.arg(column + 1));
    Scheme s = scheme;
    Column &c = s.columns[size_t(column)];
    c.named = false;
    c.namedFor.clear();
    return Result<Scheme>(std::move(s));
}

Result<Scheme> withNameKept(const Scheme &scheme, int column)
{
    if (column < 0 || column >= scheme.columnCount() || !scheme.columns[size_t(column)].named)
        return Result<Scheme>::failure(u"column %1: only a name the user gave can be kept"_s.arg(column + 1));
    Scheme s = scheme;
    s.columns[size_t(column)].namedFor.clear();
    return Result<Scheme>(std::move(s));
}

Result<Scheme> withColumnAdded(const Scheme &scheme)
{
    if (scheme.columnCount() >= scheme.levelCount())
        return Result<Scheme>::failure(u"columns: %1 levels allow at most %1 coding columns; add a level first"_s.arg(scheme.levelCount()));
    Scheme s = asCustom(scheme);
    QStringList names;
    for (const Column &c : s.columns)
        names << c.name;
    s.columns.push_back(Column{freshName(names, u"comparison"_s), std::vector<Weight>(size_t(s.levelCount()), Weight(0))});
    return Result<Scheme>(std::move(s));
}

Result<Scheme> withColumnRemoved(const Scheme &scheme, int column)
{
    if (scheme.columnCount() <= 1)
        return Result<Scheme>::failure(u"columns: a scheme keeps at least one coding column"_s);
    Scheme s = asCustom(scheme);
    s.columns.erase(s.columns.begin() + column);
    return Result<Scheme>(std::move(s));
}

Scheme withIntercept(const Scheme &scheme, bool intercept)
{
    Scheme s = scheme;
    s.intercept = intercept;
    return s;
}

Result<Scheme> withFactorName(const Scheme &scheme, const QString &name)
{
    Scheme s = scheme;
    s.factor.name = name.trimmed();
    return Result<Scheme>(std::move(s));
}

Result<Scheme> withLevelName(const Scheme &scheme, int level, const QString &name)
{
    Scheme s = scheme;
    s.factor.levels[level] = name.trimmed();
    return settle(std::move(s));
}

Result<Scheme> withLevelAdded(const Scheme &scheme)
{
    if (scheme.levelCount() >= kMaxLevels)
        return Result<Scheme>::failure(u"levels: at most %1 levels are supported"_s.arg(kMaxLevels));
    Scheme s = scheme;
    Factor &f = s.factor;
    f.levels << freshName(f.levels, u"level"_s);
    if (f.hasPlannedN())
        f.plannedN.push_back(f.plannedN.back());
    if (!f.spacing.empty()) {
        const auto top = std::max_element(f.spacing.begin(), f.spacing.end(),
                                          [](const Weight &a, const Weight &b) { return a.value() < b.value(); });
        f.spacing.push_back(top->isExact() ? Weight::exact(top->rational() + 1) : Weight::approx(top->value() + 1));
    }
    for (Column &c : s.columns)
        c.weights.push_back(Weight(0));
    return settle(std::move(s));
}

Result<Scheme> withLevelRemoved(const Scheme &scheme, int level)
{
    if (scheme.levelCount() <= kMinLevels)
        return Result<Scheme>::failure(u"levels: a factor needs at least %1 levels"_s.arg(kMinLevels));
    if (scheme.kind == SchemeKind::Custom && scheme.columnCount() >= scheme.levelCount())
        return Result<Scheme>::failure(u"levels: %1 coding columns need at least %1 levels; remove a column first"_s
                                           .arg(scheme.columnCount()));
    Scheme s = scheme;
    Factor &f = s.factor;
    f.levels.removeAt(level);
    if (f.hasPlannedN())
        f.plannedN.erase(f.plannedN.begin() + level);
    if (!f.spacing.empty())
        f.spacing.erase(f.spacing.begin() + level);
    for (Column &c : s.columns)
        c.weights.erase(c.weights.begin() + level);
    if (s.reference == level)
        s.reference = -1;
    else if (s.reference > level)
        --s.reference;
    return settle(std::move(s));
}

Result<Scheme> withLevelMoved(const Scheme &scheme, int from, int to)
{
    Scheme s = scheme;
    Factor &f = s.factor;
    auto move = [from, to](auto &v) {
        auto item = v[size_t(from)];
        v.erase(v.begin() + from);
        v.insert(v.begin() + to, item);
    };
    f.levels.move(from, to);
    if (f.hasPlannedN())
        move(f.plannedN);
    if (!f.spacing.empty())
        move(f.spacing);
    for (Column &c : s.columns)
        move(c.weights);
    if (s.reference == from)
        s.reference = to;
    else if (from < s.reference && s.reference <= to)
        --s.reference;
    else if (to <= s.reference && s.reference < from)
        ++s.reference;
    return settle(std::move(s));
}

Result<Scheme> withPlannedSize(const Scheme &scheme, int level, const QString &text)
{
    auto w = parseWeight(text);
    if (!w)
        return Result<Scheme>::failure(w.error());
    if (!w->isExact() || w->rational() <= 0)
        return Result<Scheme>::failure(u"'%1' is not a positive group size; expected a number above 0"_s.arg(text.trimmed()));
    Scheme s = scheme;
    s.factor.plannedN = s.factor.sizes();
    if (s.factor.isWithin()) // the same participants at every level
        std::fill(s.factor.plannedN.begin(), s.factor.plannedN.end(), w->rational());
    else
        s.factor.plannedN[size_t(level)] = w->rational();
    return settle(std::move(s));
}

Result<Scheme> withEqualSizes(const Scheme &scheme)
{
    return withSizes(scheme, {});
}

Result<Scheme> withSizes(const Scheme &scheme, std::vector<Rational> sizes)
{
    Scheme s = scheme;
    s.factor.plannedN = std::move(sizes);
    return settle(std::move(s));
}

Result<Scheme> withPosition(const Scheme &scheme, int level, const QString &text)
{
    auto w = parseWeight(text);
    if (!w)
        return Result<Scheme>::failure(w.error());
    Scheme s = scheme;
    s.factor.spacing = s.factor.positions();
    s.factor.spacing[size_t(level)] = *w;
    return settle(std::move(s));
}

Result<Scheme> withDefaultPositions(const Scheme &scheme)
{
    Scheme s = scheme;
    s.factor.spacing.clear();
    return settle(std::move(s));
}

Scheme withNotes(const Scheme &scheme, const QString &notes)
{
    Scheme s = scheme;
    s.notes = notes;
    return s;
}

Result<Scheme> withMeasure(const Scheme &scheme, Measure measure)
{
    Scheme s = scheme;
    s.factor.measure = measure;
    if (QString e = s.factor.validate(); !e.isEmpty())
        return Result<Scheme>::failure(e);
    return Result<Scheme>(std::move(s));
}

Result<Scheme> withStandard(const Scheme &scheme, SchemeKind kind, const SchemeOptions &options)
{
    auto made = makeScheme(scheme.factor, kind, options);
    if (!made)
        return made;
    Scheme s = made.take();
    // Indicator coding is meant without an intercept; the others keep the user's choice.
    s.intercept = kind == SchemeKind::Indicator ? false : (scheme.kind == SchemeKind::Indicator ? true : scheme.intercept);
    s.notes = scheme.notes;
    return Result<Scheme>(std::move(s));
}

} // namespace cb::edits
