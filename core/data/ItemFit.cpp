#include "core/data/ItemFit.h"

#include "core/base/NumberText.h"
#include "core/base/Weight.h"
#include "core/data/MixedFit.h"
#include "core/power/MixedPower.h"
#include "core/model/Scheme.h"

#include <QSet>

#include <QJsonArray>

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// fitParticipants's words, with the items in the participants' role.
QString asItems(QString text)
{
    return text.replace(u"participants"_s, u"items"_s).replace(u"participant"_s, u"item"_s).replace(u"P - 1 df"_s, u"I - 1 df"_s);
}

constexpr QStringView kNoItemColumn = u"no item column was read; name the column that says which item each row shows";

// The data with the items in the participants' role.
DataSummary itemsAsUnits(const DataSummary &data)
{
    DataSummary asUnits;
    asUnits.source = data.source;
    asUnits.columns = data.columns;
    asUnits.levels = data.levels;
    asUnits.participantIndex = data.itemIndex;
    asUnits.participants = data.items;
    asUnits.participantCells = data.itemCells;
    return asUnits;
}

// The by-item fit's words: items where the by-participant analysis says participants.
void sayItems(FitResult &fit)
{
    fit.omnibusHypothesis = asItems(fit.omnibusHypothesis);
    for (QString &note : fit.notes)
        note = asItems(note);
}

} // namespace

MinFPrime minFPrime(double f1, double df1, double f2, double df2, double numeratorDf)
{
    MinFPrime m;
    m.df1 = numeratorDf;
    m.f1 = f1;
    m.f2 = f2;
    if (!(f1 >= 0.0) || !(f2 >= 0.0) || !(df1 > 0.0) || !(df2 > 0.0) || !(f1 + f2 > 0.0) || std::isinf(f1) || std::isinf(f2))
        return m;
    m.f = f1 * f2 / (f1 + f2);
    m.df2 = (f1 + f2) * (f1 + f2) / (f1 * f1 / df2 + f2 * f2 / df1);
    m.p = fUpperTailP(m.f, m.df1, m.df2);
    return m;
}

Result<ItemAnalysis> fitItems(const Scheme &scheme, const DataSummary &data, const FitResult &byParticipant,
                              const FitOptions &options, const LevelMapping &mapping)
{
    using R = Result<ItemAnalysis>;
    if (data.itemIndex < 0)
        return R::failure(kNoItemColumn.toString());
    const QString column = data.columns.value(data.itemIndex);
    // An item with one data level: the factor varies between items here.
    for (qsizetype i = 0; i < data.items.size(); ++i) {
        const std::vector<RunningStats> &cells = data.itemCells[size_t(i)];
        int seen = 0;
        QString only;
        for (size_t d = 0; d < cells.size(); ++d)
            if (cells[d].n > 0) {
                ++seen;
                only = data.levels[d].name;
            }
        if (seen == 1 && scheme.levelCount() > 1)
            return R::failure(u"item %1 (column %2%3) has values at level %4 only; the by-item analysis "
                              u"needs every item at every level (measured within items); an item seen at one level only "
                              u"means the factor varies between items, which this analysis does not cover"_s
                                  .arg(quoted(data.items[i]), quoted(column),
                                       size_t(i) < data.itemLines.size() ? u", first on line %1"_s.arg(data.itemLines[size_t(i)]) : QString(),
                                       quoted(only)));
    }
    // The same analysis with the items in the participants' role.
    const DataSummary asUnits = itemsAsUnits(data);
    auto fit = fitParticipants(scheme, asUnits, options, mapping);
    if (!fit)
        return R::failure(asItems(fit.error()));
    ItemAnalysis out;
    out.column = column;
    out.byItem = fit.take();
    sayItems(out.byItem);
    for (size_t c = 0; c < out.byItem.coefficients.size() && c < byParticipant.coefficients.size(); ++c) {
        const FitCoefficient &one = byParticipant.coefficients[c];
        const FitCoefficient &two = out.byItem.coefficients[c];
        out.minF.push_back(minFPrime(one.t * one.t, one.df, two.t * two.t, two.df));
    }
    return out;
}

Result<ItemAnalysis> fitItems(const Design &design, const DataSummary &data, const FitResult &byParticipant,
                              const FitOptions &options, const LevelMapping &mapping)
{
    using R = Result<ItemAnalysis>;
    if (data.itemIndex < 0)
        return R::failure(kNoItemColumn.toString());
    const QString column = data.columns.value(data.itemIndex);
    auto cells = cellScheme(design);
    if (!cells)
        return R::failure(cells.error());
    auto matched = matchLevels(cells->factor.levels, data, mapping);
    if (!matched)
        return R::failure(matched.error());
    // Each data level's cell of the design, then each item's levels of every factor.
    std::vector<int> cellOf(data.levels.size(), -1);
    for (int c = 0; c < cells->levelCount(); ++c)
        for (const QString &source : matched->sources[size_t(c)])
            for (size_t d = 0; d < data.levels.size(); ++d)
                if (data.levels[d].name == source)
                    cellOf[d] = c;
    // How each factor varies over the items, from the data: within items when an item is seen at
    // several of its levels, between items when at one; every item must agree.
    const auto place = [&](qsizetype i) {
        return u"item %1 (column %2%3)"_s.arg(quoted(data.items[i]), quoted(column),
                                              size_t(i) < data.itemLines.size() ? u", first on line %1"_s.arg(data.itemLines[size_t(i)]) : QString());
    };
    Design byItems = design; // the design with the items as its units
    byItems.cellN.clear();   // (the planned sizes count participants; the columns, made from them, stay as they are)
    for (size_t f = 0; f < design.factors.size(); ++f) {
        const Scheme &factor = design.factors[f];
        qsizetype first = -1;
        bool firstWithin = false;
        for (qsizetype i = 0; i < data.items.size(); ++i) {
            QSet<int> seen;
            for (size_t d = 0; d < data.levels.size(); ++d)
                if (cellOf[d] >= 0 && data.itemCells[size_t(i)][d].n > 0)
                    seen.insert(cellLevels(design, cellOf[d])[f]);
            if (seen.isEmpty())
                continue;
            const bool within = seen.size() > 1;
            if (first < 0) {
                first = i;
                firstWithin = within;
            } else if (within != firstWithin) {
                const qsizetype w = within ? i : first, b = within ? first : i;
                return R::failure(u"factor %1 varies within %2 (seen at several of its levels) but between items for %3 (seen at one "
                                  u"level only); the by-item analysis needs each factor to vary within every item or between "
                                  u"items (each item at one level)"_s.arg(quoted(factor.factor.name), place(w), place(b)));
            }
        }
        Scheme &s = byItems.factors[f];
        s.factor.measure = firstWithin || factor.levelCount() < 2 ? Measure::Within : Measure::Between;
        s.factor.plannedN.clear();
    }
    const DataSummary asUnits = itemsAsUnits(data);
    Result<FitResult> fit = [&]() -> Result<FitResult> {
        if (hasWithinFactor(byItems)) {
            auto mixed = fitMixedParticipants(byItems, asUnits, options, mapping);
            return mixed ? Result<FitResult>(std::move(mixed->overall)) : Result<FitResult>::failure(mixed.error());
        }
        // Every factor between items: each item is one value in its cell, and the design is fitted
        // between groups on the items' means.
        DataSummary means;
        means.source = data.source;
        means.columns = data.columns;
        means.levels = data.levels;
        for (size_t d = 0; d < data.levels.size(); ++d) {
            means.levels[d].stats = RunningStats{};
            for (qsizetype i = 0; i < data.items.size(); ++i)
                if (const RunningStats &cell = data.itemCells[size_t(i)][d]; cell.n > 0)
                    means.levels[d].stats.add(cell.mean);
        }
        auto between = fitScheme(*cells, means, options, mapping);
        if (between) { // each coefficient with its df and the items it used, as a fit by unit has them (its omnibus stays the F test)
            int used = 0;
            for (const LevelStats &l : means.levels)
                used += int(l.stats.n);
            between->participants = between->completeParticipants = used;
            for (FitCoefficient &c : between->coefficients) {
                c.df = between->df;
                c.participants = used;
            }
        }
        return between;
    }();
    if (!fit)
        return R::failure(asItems(fit.error()));
    ItemAnalysis out;
    out.column = column;
    out.byItem = fit.take();
    // In the by-participant fit's order, matched by name (the parts of a crossed name in any
    // order: a factor between participants but within items comes first in one and second in the other).
    const auto parts = [](const QString &name) {
        QStringList p = name.split(kCrossJoiner.toString());
        p.sort();
        return p;
    };
    std::vector<FitCoefficient> ordered;
    for (const FitCoefficient &one : byParticipant.coefficients) {
        const auto two = std::find_if(out.byItem.coefficients.begin(), out.byItem.coefficients.end(),
                                      [&](const FitCoefficient &c) { return parts(c.name) == parts(one.name); });
        if (two == out.byItem.coefficients.end())
            return R::failure(u"the by-item analysis has no column %1 to pair with the by-participant one"_s.arg(quoted(one.name)));
        ordered.push_back(*two);
        out.minF.push_back(minFPrime(one.t * one.t, one.df, two->t * two->t, two->df));
    }
    out.byItem.coefficients = std::move(ordered);
    sayItems(out.byItem);
    return out;
}

void addItemAnalysisToJson(QJsonObject &fitJson, const ItemAnalysis &items)
{
    // The by-participant JSON of the by-item fit, its units called items (a design whose factors
    // all vary between items is fitted between groups on the items' means: its omnibus is the F test).
    const FitResult &f = items.byItem;
    const QJsonObject whole = fitResultToJson(f, DataSummary{});
    QJsonArray coefficients;
    const QJsonArray written = whole[u"coefficients"_s].toArray();
    for (qsizetype c = 0; c < written.size(); ++c) {
        QJsonObject o = written[c].toObject();
        o.remove(u"participants"_s);
        o.insert(u"df"_s, jsonNumber(f.coefficients[size_t(c)].df));
        o.insert(u"items"_s, f.coefficients[size_t(c)].participants);
        coefficients.append(o);
    }
    const QJsonObject omnibus{{u"test"_s, f.byParticipant ? u"hotelling"_s : u"anova"_s},
                              {u"hypothesis"_s, f.omnibusHypothesis},
                              {u"f"_s, jsonNumber(f.f)},
                              {u"df1"_s, jsonNumber(f.fDf1)},
                              {u"df2"_s, jsonNumber(f.fDf2)},
                              {u"p"_s, jsonNumber(f.fP)},
                              {u"items"_s, f.completeParticipants}};
    fitJson[u"by_item"_s] = QJsonObject{
        {u"column"_s, items.column},
        {u"count"_s, f.participants},
        {u"complete"_s, f.completeParticipants},
        {u"incomplete"_s, QJsonArray::fromStringList(f.incompleteParticipants)},
        {u"coefficients"_s, coefficients},
        {u"omnibus"_s, omnibus},
        {u"notes"_s, whole[u"notes"_s]},
    };
    QJsonArray minF;
    for (size_t c = 0; c < items.minF.size(); ++c) {
        const MinFPrime &m = items.minF[c];
        minF.append(QJsonObject{{u"name"_s, items.byItem.coefficients[c].name},
                                {u"f"_s, jsonNumber(m.f)},
                                {u"df1"_s, jsonNumber(m.df1)},
                                {u"df2"_s, jsonNumber(m.df2)},
                                {u"p"_s, jsonNumber(m.p)},
                                {u"f1"_s, jsonNumber(m.f1)},
                                {u"f2"_s, jsonNumber(m.f2)}});
    }
    fitJson[u"min_f"_s] = minF;
}

} // namespace cb
