#include "core/files/StudyFile.h"

#include "core/analysis/Settled.h"
#include "core/base/JsonArray.h"
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

QByteArray designToJson(const Design &d)
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
    QJsonObject root{{u"format"_s, QString::fromLatin1(kSchemeFormatTag)}, {u"version"_s, kSchemeFormatVersion},
                     {u"design"_s, design}, {u"intercept"_s, d.intercept}, {u"notes"_s, d.notes}};
    return QJsonDocument(root).toJson(QJsonDocument::Indented);
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
    return study.isDesign() ? designToJson(study.design) : schemeToJson(study.activeScheme());
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
    if (!study.isDesign())
        return saveScheme(study.activeScheme(), path);
    if (const QString e = study.design.validate(); !e.isEmpty())
        return u"%1: not saved: %2"_s.arg(path, e);
    return writeFileAtomically(path, designToJson(study.design));
}

} // namespace cb
