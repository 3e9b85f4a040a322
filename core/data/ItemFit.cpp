#include "core/data/ItemFit.h"

#include "core/base/NumberText.h"
#include "core/base/Weight.h"
#include "core/model/Scheme.h"

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
        return R::failure(u"no item column was read; name the column that says which item each row shows"_s);
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
    DataSummary asUnits;
    asUnits.source = data.source;
    asUnits.columns = data.columns;
    asUnits.levels = data.levels;
    asUnits.participantIndex = data.itemIndex;
    asUnits.participants = data.items;
    asUnits.participantCells = data.itemCells;
    auto fit = fitParticipants(scheme, asUnits, options, mapping);
    if (!fit)
        return R::failure(asItems(fit.error()));
    ItemAnalysis out;
    out.column = column;
    out.byItem = fit.take();
    out.byItem.omnibusHypothesis = asItems(out.byItem.omnibusHypothesis);
    for (QString &note : out.byItem.notes)
        note = asItems(note);
    for (size_t c = 0; c < out.byItem.coefficients.size() && c < byParticipant.coefficients.size(); ++c) {
        const FitCoefficient &one = byParticipant.coefficients[c];
        const FitCoefficient &two = out.byItem.coefficients[c];
        out.minF.push_back(minFPrime(one.t * one.t, one.df, two.t * two.t, two.df));
    }
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
