#include "core/data/ItemFit.h"

#include "core/base/NumberText.h"
#include "core/base/Weight.h"
#include "core/data/MixedFit.h"
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
    auto matched = matchLevels(cells->factor.levels, data.levels, mapping);
    if (!matched)
        return R::failure(matched.error());
    // Each data level's cell of the design, then each item's levels of every factor.
    std::vector<int> cellOf(data.levels.size(), -1);
    for (int c = 0; c < cells->levelCount(); ++c)
        for (const QString &source : matched->sources[size_t(c)])
            for (size_t d = 0; d < data.levels.size(); ++d)
                if (data.levels[d].name == source)
                    cellOf[d] = c;
    for (qsizetype i = 0; i < data.items.size(); ++i)
        for (size_t f = 0; f < design.factors.size(); ++f) {
            QSet<int> seen;
            for (size_t d = 0; d < data.levels.size(); ++d)
                if (cellOf[d] >= 0 && data.itemCells[size_t(i)][d].n > 0)
                    seen.insert(cellLevels(design, cellOf[d])[f]);
            const Scheme &factor = design.factors[f];
            if (seen.size() == 1 && factor.levelCount() > 1)
                return R::failure(u"item %1 (column %2%3) has values at level %4 of factor %5 only; the by-item analysis needs "
                                  u"every item at every level of every factor (measured within items); an item seen at one "
                                  u"level only means %5 varies between items, which this analysis does not cover"_s
                                      .arg(quoted(data.items[i]), quoted(column),
                                           size_t(i) < data.itemLines.size() ? u", first on line %1"_s.arg(data.itemLines[size_t(i)]) : QString(),
                                           quoted(factor.factor.levels[*seen.begin()]), quoted(factor.factor.name)));
        }
    // The items in the participants' role, every factor within them.
    // (The planned sizes count participants; the columns, already made from them, stay as they are.)
    Design withinItems = design;
    withinItems.cellN.clear();
    for (Scheme &s : withinItems.factors) {
        s.factor.measure = Measure::Within;
        s.factor.plannedN.clear();
    }
    const DataSummary asUnits = itemsAsUnits(data);
    auto mixed = fitMixedParticipants(withinItems, asUnits, options, mapping);
    if (!mixed)
        return R::failure(asItems(mixed.error()));
    ItemAnalysis out;
    out.column = column;
    out.byItem = std::move(mixed->overall);
    // In the by-participant fit's order, matched by name.
    std::vector<FitCoefficient> ordered;
    for (const FitCoefficient &one : byParticipant.coefficients) {
        const auto two = std::find_if(out.byItem.coefficients.begin(), out.byItem.coefficients.end(),
                                      [&](const FitCoefficient &c) { return c.name == one.name; });
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
    // The by-participant JSON of the by-item fit, its units called items.
    const QJsonObject whole = fitResultToJson(items.byItem, DataSummary{});
    const auto withItems = [](QJsonObject o) {
        o.insert(u"items"_s, o.take(u"participants"_s));
        return o;
    };
    QJsonArray coefficients;
    for (const QJsonValue c : whole[u"coefficients"_s].toArray())
        coefficients.append(withItems(c.toObject()));
    const QJsonObject units = whole[u"participants"_s].toObject();
    fitJson[u"by_item"_s] = QJsonObject{
        {u"column"_s, items.column},
        {u"count"_s, units[u"count"_s]},
        {u"complete"_s, units[u"complete"_s]},
        {u"incomplete"_s, units[u"incomplete"_s]},
        {u"coefficients"_s, coefficients},
        {u"omnibus"_s, withItems(whole[u"omnibus"_s].toObject())},
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
