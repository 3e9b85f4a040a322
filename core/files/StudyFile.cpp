#include "core/files/StudyFile.h"

#include "core/analysis/Adjustment.h"
#include "core/analysis/Settled.h"
#include "core/base/JsonArray.h"
#include "core/base/Weight.h"
#include "core/files/InputFile.h"
#include "core/files/SchemeFile.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
using R = Result<Study>;
} // namespace

namespace {

QJsonObject designToObject(const Design &d)
{
    QJsonArray factors;
    for (const Scheme &s : d.factors) {
        QJsonObject f = schemeToObject(s);
        f.remove(u"intercept"_s);
        f.remove(u"notes"_s);
        factors.append(f);
    }
    QJsonArray terms;
    for (const Term &t : d.terms) {
        QJsonArray names;
        for (int f : t.factors)
            names.append(factorLabel(d, f));
        QJsonObject to{{u"factors"_s, names}};
        if (t.within >= 0)
            to[u"within"_s] = factorLabel(d, t.within);
        terms.append(to);
    }
    QJsonObject design{{u"factors"_s, factors}, {u"terms"_s, terms}};
    if (!d.cellN.empty()) {
        design[u"cell_n"_s] = jsonArray(d.cellN, [](const Rational &r) { return rationalToString(r); });
    }
    return QJsonObject{{u"format"_s, QString::fromLatin1(kSchemeFormatTag)}, {u"version"_s, kSchemeFormatVersion},
                       {u"design"_s, design}, {u"intercept"_s, d.intercept}, {u"notes"_s, d.notes}};
}

// The power planner's inputs as typed, every field written; the levels in the order of `names`.
QJsonObject powerPlanToObject(const PowerPlan &plan, const QStringList &names)
{
    QJsonArray levels;
    for (const QString &name : names)
        if (plan.levels.contains(name)) {
            const PowerPlanLevel &l = plan.levels[name];
            levels.append(QJsonObject{{u"level"_s, name}, {u"expected"_s, l.expected}, {u"sd"_s, l.sd}, {u"ratio"_s, l.ratio}});
        }
    return QJsonObject{{u"levels"_s, levels},
                       {u"expected"_s, plan.differences ? u"differences"_s : u"means"_s},
                       {u"baseline"_s, plan.baseline},
                       {u"sd"_s, plan.sd},
                       {u"sd_per_level"_s, plan.perLevelSd},
                       {u"sizes"_s, powerPlanSizesId(plan.sizes)},
                       {u"total"_s, plan.total},
                       {u"correlation"_s, plan.correlation},
                       {u"correlation_matrix"_s, plan.fullMatrix},
                       {u"correlations"_s, plan.correlations},
                       {u"alpha"_s, plan.alpha},
                       {u"target"_s, plan.target},
                       {u"sided"_s, plan.oneSided ? u"one"_s : u"two"_s},
                       {u"adjustment"_s, plan.adjustment}};
}

// Reads "power" of a study file. Every field may be left out (its default); texts may be
// written as strings or numbers. Level names are checked against the study by the caller.
Result<PowerPlan> powerPlanFromJson(const QJsonValue &value, const QString &where)
{
    using P = Result<PowerPlan>;
    auto fail = [&](const QString &field, const QString &what) { return P::failure(u"%1: field 'power%2': %3"_s.arg(where, field, what)); };
    if (!value.isObject())
        return fail({}, u"expected an object with the power planner's inputs"_s);
    const QJsonObject o = value.toObject();
    PowerPlan plan;
    // A text field: a string, or a number written as one.
    auto text = [](const QJsonObject &from, const QString &key, QString &into) -> bool {
        const QJsonValue v = from.value(key);
        if (v.isUndefined())
            return true;
        if (v.isString())
            into = v.toString();
        else if (v.isDouble())
            into = doubleToString(v.toDouble());
        else
            return false;
        return true;
    };
    auto flag = [&](const QString &key, bool &into) -> bool {
        const QJsonValue v = o.value(key);
        if (v.isUndefined())
            return true;
        into = v.toBool();
        return v.isBool();
    };
    for (const auto &[key, into] : {std::pair{u"baseline"_s, &plan.baseline}, {u"sd"_s, &plan.sd}, {u"total"_s, &plan.total},
                                    {u"correlation"_s, &plan.correlation}, {u"correlations"_s, &plan.correlations},
                                    {u"alpha"_s, &plan.alpha}, {u"target"_s, &plan.target}})
        if (!text(o, key, *into))
            return fail(u"."_s + key, u"expected a number, as a string such as \"0.5\" or a number"_s);
    for (const auto &[key, into] : {std::pair{u"sd_per_level"_s, &plan.perLevelSd}, {u"correlation_matrix"_s, &plan.fullMatrix}})
        if (!flag(key, *into))
            return fail(u"."_s + key, u"expected true or false"_s);
    if (const QJsonValue v = o.value(u"expected"_s); !v.isUndefined()) {
        if (v.toString() != u"means"_s && v.toString() != u"differences"_s)
            return fail(u".expected"_s, u"expected \"means\" or \"differences\""_s);
        plan.differences = v.toString() == u"differences"_s;
    }
    if (const QJsonValue v = o.value(u"sided"_s); !v.isUndefined()) {
        if (v.toString() != u"one"_s && v.toString() != u"two"_s)
            return fail(u".sided"_s, u"expected \"two\" or \"one\""_s);
        plan.oneSided = v.toString() == u"one"_s;
    }
    if (const QJsonValue v = o.value(u"sizes"_s); !v.isUndefined()) {
        const auto sizes = powerPlanSizesFromId(v.toString());
        if (!v.isString() || !sizes)
            return fail(u".sizes"_s, u"expected %1"_s.arg(powerPlanSizesIdList()));
        plan.sizes = *sizes;
    }
    if (const QJsonValue v = o.value(u"adjustment"_s); !v.isUndefined()) {
        const auto adjustment = adjustmentFromId(v.toString());
        if (!v.isString() || !adjustment || !adjustsPower(*adjustment))
            return fail(u".adjustment"_s, u"expected %1"_s.arg(adjustmentIdList(true)));
        plan.adjustment = adjustmentId(*adjustment);
    }
    if (const QJsonValue v = o.value(u"levels"_s); !v.isUndefined()) {
        if (!v.isArray())
            return fail(u".levels"_s, u"expected an array of objects such as {\"level\": \"A\", \"expected\": \"10\"}"_s);
        const QJsonArray levels = v.toArray();
        for (qsizetype i = 0; i < levels.size(); ++i) {
            const QString path = u".levels[%1]"_s.arg(i);
            const QJsonObject lo = levels[i].toObject();
            if (!levels[i].isObject() || !lo.value(u"level"_s).isString())
                return fail(path, u"expected an object with a \"level\" name and its \"expected\", \"sd\" and \"ratio\""_s);
            const QString name = lo.value(u"level"_s).toString();
            if (plan.levels.contains(name))
                return fail(path + u".level"_s, u"%1 is given twice"_s.arg(quoted(name)));
            PowerPlanLevel l;
            for (const auto &[key, into] : {std::pair{u"expected"_s, &l.expected}, {u"sd"_s, &l.sd}, {u"ratio"_s, &l.ratio}})
                if (!text(lo, key, *into))
                    return fail(path + u"."_s + key, u"expected a number, as a string such as \"12.5\" or a number"_s);
            plan.levels.insert(name, l);
        }
    }
    return P(std::move(plan));
}

// The plan's level names and baseline must name levels (a design: cells) of the study.
QString checkPlanLevels(const PowerPlan &plan, const QStringList &names, const QString &where, const QJsonValue &value)
{
    const QString known = shortenedInput(names.join(u", "_s));
    const QJsonArray levels = value.toObject().value(u"levels"_s).toArray();
    for (qsizetype i = 0; i < levels.size(); ++i)
        if (const QString name = levels[i].toObject().value(u"level"_s).toString(); !names.contains(name))
            return u"%1: field 'power.levels[%2].level': %3 is not a level of the study; expected one of %4"_s.arg(where).arg(i).arg(
                quoted(name), known);
    if (!plan.baseline.isEmpty() && !names.contains(plan.baseline))
        return u"%1: field 'power.baseline': %2 is not a level of the study; expected one of %3"_s.arg(where, quoted(plan.baseline), known);
    return {};
}

} // namespace

QByteArray designToJson(const Design &d)
{
    return QJsonDocument(designToObject(d)).toJson(QJsonDocument::Indented);
}

bool isDesignJson(const QByteArray &data)
{
    return QJsonDocument::fromJson(data).object().contains(u"design"_s);
}

Result<Design> designFromJson(const QByteArray &data, const QString &where)
{
    using R = Result<Design>;
    auto root = schemeDocumentRoot(data, where);
    if (!root)
        return R::failure(root.error());
    auto fail = [&](const QString &field, const QString &what) { return R::failure(u"%1: field '%2': %3"_s.arg(where, field, what)); };
    const QJsonValue dv = root->value(u"design"_s);
    if (!dv.isObject())
        return fail(u"design"_s, u"expected an object with factors and terms"_s);
    const QJsonObject dobj = dv.toObject();
    Design d;
    const QJsonArray factors = dobj.value(u"factors"_s).toArray();
    if (!dobj.value(u"factors"_s).isArray() || factors.size() < 2 || factors.size() > kMaxDesignFactors)
        return fail(u"design.factors"_s, u"expected an array of 2 or 3 factors"_s);
    for (qsizetype f = 0; f < factors.size(); ++f) {
        if (!factors[f].isObject())
            return fail(u"design.factors[%1]"_s.arg(f), u"expected an object with factor, scheme and columns"_s);
        auto s = schemeFromObject(factors[f].toObject(), where, u"design.factors[%1]."_s.arg(f));
        if (!s)
            return R::failure(s.error());
        d.factors.push_back(s.take());
    }
    auto factorIndex = [&](const QJsonValue &v) -> int {
        for (size_t f = 0; f < d.factors.size(); ++f)
            if (v.toString() == factorLabel(d, int(f)))
                return int(f);
        return -1;
    };
    const QJsonValue tv = dobj.value(u"terms"_s);
    if (tv.isUndefined()) {
        d.terms = Design::fullFactorial(int(d.factors.size()));
    } else {
        if (!tv.isArray())
            return fail(u"design.terms"_s, u"expected an array of terms such as {\"factors\": [\"A\", \"B\"]}"_s);
        const QJsonArray terms = tv.toArray();
        for (qsizetype t = 0; t < terms.size(); ++t) {
            const QString path = u"design.terms[%1]"_s.arg(t);
            const QJsonObject to = terms[t].toObject();
            if (!terms[t].isObject() || !to.value(u"factors"_s).isArray())
                return fail(path, u"expected an object with a \"factors\" array of factor names"_s);
            Term term;
            const QJsonArray names = to.value(u"factors"_s).toArray();
            for (qsizetype i = 0; i < names.size(); ++i) {
                if (!names[i].isString())
                    return fail(u"%1.factors[%2]"_s.arg(path).arg(i), u"expected a factor name (a string)"_s);
                const int f = factorIndex(names[i]);
                if (f < 0)
                    return fail(u"%1.factors[%2]"_s.arg(path).arg(i), u"%1 is not a factor of the design"_s.arg(quoted(names[i].toString())));
                term.factors.push_back(f);
            }
            std::sort(term.factors.begin(), term.factors.end());
            if (to.contains(u"within"_s)) {
                if (!to.value(u"within"_s).isString())
                    return fail(path + u".within"_s, u"expected a factor name (a string)"_s);
                term.within = factorIndex(to.value(u"within"_s));
                if (term.within < 0)
                    return fail(path + u".within"_s, u"%1 is not a factor of the design"_s.arg(quoted(to.value(u"within"_s).toString())));
            }
            d.terms.push_back(term);
        }
    }
    if (dobj.contains(u"cell_n"_s) && !dobj.value(u"cell_n"_s).isNull()) {
        if (!dobj.value(u"cell_n"_s).isArray())
            return fail(u"design.cell_n"_s, u"expected an array of planned cell sizes such as [\"12\", \"10\"], one per cell"_s);
        const QJsonArray n = dobj.value(u"cell_n"_s).toArray();
        for (qsizetype c = 0; c < n.size(); ++c) {
            if (!n[c].isString() && !n[c].isDouble())
                return fail(u"design.cell_n[%1]"_s.arg(c), u"expected a planned cell size of 0 or more, as a string such as \"12\" or a number"_s);
            auto w = parseWeight(n[c].isString() ? n[c].toString() : doubleToString(n[c].toDouble()));
            if (!w || !w->isExact() || w->rational() < 0)
                return fail(u"design.cell_n[%1]"_s.arg(c), u"expected a planned cell size of 0 or more"_s);
            d.cellN.push_back(w->rational());
        }
    }
    const QJsonValue iv = root->value(u"intercept"_s);
    if (!iv.isUndefined() && !iv.isBool())
        return fail(u"intercept"_s, u"expected true or false"_s);
    d.intercept = iv.toBool(true);
    const QJsonValue nv = root->value(u"notes"_s);
    if (!nv.isUndefined() && !nv.isString())
        return fail(u"notes"_s, u"expected a string"_s);
    d.notes = nv.toString();
    if (QString e = d.validate(); !e.isEmpty())
        return R::failure(where + u": "_s + e);
    return R(std::move(d));
}

QByteArray studyToJson(const Study &study)
{
    if (study.power.isDefault()) // files without a power plan stay as they were before plans were saved
        return study.isDesign() ? designToJson(study.design) : schemeToJson(study.activeScheme());
    QJsonObject root = study.isDesign() ? designToObject(study.design) : schemeDocument(study.activeScheme());
    root[u"power"_s] = powerPlanToObject(study.power, study.powerLevelNames());
    return QJsonDocument(root).toJson(QJsonDocument::Indented);
}

namespace {

// The rule for files (DEVELOPERS.md, "Columns that contradict their scheme"): a factor whose
// scheme names a standard kind is coded as that kind says. Its columns are made again from the
// definition (levels, reference, polynomial options, planned n); the columns written in the
// file are not read for it. Its intercept and notes stay as written.
Result<Scheme> codedAsDefined(const Scheme &s, const QString &where, const QString &field)
{
    if (s.kind == SchemeKind::Custom)
        return Result<Scheme>(s);
    auto made = makeScheme(s.factor, s.kind, schemeOptions(s));
    if (!made)
        return Result<Scheme>::failure(u"%1: field '%2': factor '%3' cannot be coded as %4: %5"_s
                                           .arg(where, field, s.factor.name, schemeId(s.kind), made.error()));
    Scheme out = made.take();
    out.intercept = s.intercept;
    out.notes = s.notes;
    return Result<Scheme>(std::move(out));
}

} // namespace

Result<Study> studyFromJson(const QByteArray &data, const QString &where)
{
    Study s;
    if (!isDesignJson(data)) {
        auto scheme = schemeFromJson(data, where);
        if (!scheme)
            return R::failure(scheme.error());
        s = studyOf(scheme.take());
    } else {
        auto design = designFromJson(data, where);
        if (!design)
            return R::failure(design.error());
        s.design = design.take();
    }
    for (size_t f = 0; f < s.design.factors.size(); ++f) {
        const QString field = s.isDesign() ? u"design.factors[%1].scheme.kind"_s.arg(f) : u"scheme.kind"_s;
        auto coded = codedAsDefined(s.design.factors[f], where, field);
        if (!coded)
            return R::failure(coded.error());
        s.design.factors[f] = coded.take();
    }
    if (const QJsonValue power = QJsonDocument::fromJson(data).object().value(u"power"_s); !power.isUndefined()) {
        auto plan = powerPlanFromJson(power, where);
        if (!plan)
            return R::failure(plan.error());
        if (const QString e = checkPlanLevels(*plan, s.powerLevelNames(), where, power); !e.isEmpty())
            return R::failure(e);
        s.power = plan.take();
    }
    return R(settled(std::move(s)));
}

Result<Study> loadStudy(const QString &path)
{
    auto data = readInput(path);
    if (!data)
        return R::failure(data.error());
    return studyFromJson(*data, inputLabel(path));
}

QString saveStudy(const Study &study, const QString &path)
{
    if (study.isDesign())
        if (const QString e = study.design.validate(); !e.isEmpty())
            return u"%1: not saved: %2"_s.arg(path, e);
    return writeFileAtomically(path, studyToJson(study));
}

} // namespace cb
