#include "core/files/SchemeFile.h"

#include "core/files/InputFile.h"
#include "core/base/JsonArray.h"

#include <QFile>
#include <QFileInfo>
#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QSaveFile>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QJsonArray weightsToJson(const std::vector<Weight> &ws)
{
    return jsonArray(ws, [](const Weight &w) { return w.storageString(); });
}

// Reads the document with messages of the form "<where>: field '<path>': <what was expected>".
class Reader
{
public:
    Reader(QString where, QString prefix) : m_where(std::move(where)), m_prefix(std::move(prefix)) {}

    QString fail(const QString &field, const QString &what) const
    {
        return u"%1: field '%2': %3"_s.arg(m_where, m_prefix + field, what);
    }

    bool string(const QJsonObject &o, const QString &key, const QString &path, QString &out, QString &err, bool required = true) const
    {
        const QJsonValue v = o.value(key);
        if (v.isUndefined() && !required)
            return true;
        if (!v.isString()) {
            err = fail(path, v.isUndefined() ? u"missing; expected a string"_s : u"expected a string"_s);
            return false;
        }
        out = v.toString();
        return true;
    }

    bool weights(const QJsonValue &v, const QString &path, std::vector<Weight> &out, QString &err) const
    {
        if (!v.isArray()) {
            err = fail(path, v.isUndefined() ? u"missing; expected an array of weights such as [\"1\", \"-1/2\"]"_s
                                             : u"expected an array of weights such as [\"1\", \"-1/2\"]"_s);
            return false;
        }
        const QJsonArray a = v.toArray();
        out.clear();
        for (qsizetype i = 0; i < a.size(); ++i) {
            const QString itemPath = u"%1[%2]"_s.arg(path).arg(i);
            QString text;
            if (a[i].isString()) {
                text = a[i].toString();
            } else if (a[i].isDouble()) {
                text = doubleToString(a[i].toDouble()); // plain JSON numbers are read as the decimals they show
            } else {
                err = fail(itemPath, u"expected a weight as a string such as \"-2/3\" or a number"_s);
                return false;
            }
            auto w = parseStoredWeight(text);
            if (!w) {
                err = fail(itemPath, w.error());
                return false;
            }
            out.push_back(*w);
        }
        return true;
    }

private:
    QString m_where;
    QString m_prefix;
};

} // namespace

QJsonObject schemeToObject(const Scheme &s)
{
    QJsonObject factor;
    factor[u"name"_s] = s.factor.name;
    factor[u"levels"_s] = QJsonArray::fromStringList(s.factor.levels);
    if (s.factor.hasPlannedN()) {
        factor[u"n"_s] = jsonArray(s.factor.plannedN, [](const Rational &r) { return rationalToString(r); });
    }
    if (!s.factor.spacing.empty())
        factor[u"spacing"_s] = weightsToJson(s.factor.spacing);
    factor[u"measured"_s] = measureId(s.factor.measure);

    QJsonObject origin;
    origin[u"kind"_s] = schemeId(s.kind);
    if (s.kind != SchemeKind::Custom && schemeUsesReference(s.kind) && s.reference >= 0 && s.reference < s.levelCount())
        origin[u"reference"_s] = s.factor.levels[s.reference];
    if (s.kind == SchemeKind::Polynomial) {
        origin[u"polynomial_form"_s] = s.polynomialForm == PolynomialForm::Integer ? u"integer"_s : u"orthonormal"_s;
        origin[u"polynomial_weighted"_s] = s.polynomialWeighted;
    }

    QJsonArray columns;
    for (const Column &c : s.columns) {
        QJsonObject o;
        o[u"name"_s] = c.name;
        o[u"named"_s] = c.named;
        if (c.named && !c.namedFor.empty())
            o[u"named_for"_s] = weightsToJson(c.namedFor);
        o[u"weights"_s] = weightsToJson(c.weights);
        columns.append(o);
    }
    QJsonObject root;
    root[u"factor"_s] = factor;
    root[u"scheme"_s] = origin;
    root[u"intercept"_s] = s.intercept;
    root[u"columns"_s] = columns;
    root[u"notes"_s] = s.notes;
    return root;
}

QJsonObject schemeDocument(const Scheme &s)
{
    QJsonObject root = schemeToObject(s);
    root[u"format"_s] = QString::fromLatin1(kSchemeFormatTag);
    root[u"version"_s] = kSchemeFormatVersion;
    return root;
}

QByteArray schemeToJson(const Scheme &s)
{
    return QJsonDocument(schemeDocument(s)).toJson(QJsonDocument::Indented);
}

Result<QJsonObject> schemeDocumentRoot(const QByteArray &data, const QString &where)
{
    using R = Result<QJsonObject>;
    if (data.trimmed().isEmpty())
        return R::failure(u"%1: the file is empty; expected a scheme file (JSON)"_s.arg(where));
    QJsonParseError pe;
    const QJsonDocument doc = QJsonDocument::fromJson(data, &pe);
    if (pe.error != QJsonParseError::NoError) {
        // Turn the byte offset into a line and column for people.
        const QByteArray head = data.left(pe.offset);
        const int line = int(head.count('\n')) + 1;
        const int col = int(pe.offset - (head.lastIndexOf('\n') + 1)) + 1;
        return R::failure(u"%1: line %2, column %3: not valid JSON (%4)"_s.arg(where).arg(line).arg(col).arg(pe.errorString()));
    }
    if (!doc.isObject())
        return R::failure(u"%1: expected a JSON object at the top level"_s.arg(where));
    const QJsonObject root = doc.object();
    Reader rd(where, {});
    if (root.value(u"format"_s).toString() != QString::fromLatin1(kSchemeFormatTag))
        return R::failure(rd.fail(u"format"_s, u"expected \"%1\"; this is not a Contrast Bench scheme file"_s.arg(QString::fromLatin1(kSchemeFormatTag))));
    const QJsonValue version = root.value(u"version"_s);
    if (!version.isDouble() || version.toDouble() != double(version.toInt()) || version.toInt() < 1)
        return R::failure(rd.fail(u"version"_s, u"expected a whole number such as %1"_s.arg(kSchemeFormatVersion)));
    if (version.toInt() > kSchemeFormatVersion)
        return R::failure(u"%1: the file has format version %2, newer than this program reads (up to %3); please update Contrast Bench"_s
                              .arg(where).arg(version.toInt()).arg(kSchemeFormatVersion));
    return R(root);
}

Result<Scheme> schemeFromJson(const QByteArray &data, const QString &where)
{
    auto root = schemeDocumentRoot(data, where);
    if (!root)
        return Result<Scheme>::failure(root.error());
    if (root->contains(u"design"_s))
        return Result<Scheme>::failure(u"%1: this file holds a design of several factors, not a single factor's scheme"_s.arg(where));
    return schemeFromObject(*root, where, {});
}

Result<Scheme> schemeFromObject(const QJsonObject &root, const QString &where, const QString &prefix)
{
    using R = Result<Scheme>;
    Reader rd(where, prefix);
    QString err;
    Scheme s;
    const QJsonValue fv = root.value(u"factor"_s);
    if (!fv.isObject())
        return R::failure(rd.fail(u"factor"_s, u"expected an object with name and levels"_s));
    const QJsonObject factor = fv.toObject();
    if (!rd.string(factor, u"name"_s, u"factor.name"_s, s.factor.name, err, false))
        return R::failure(err);
    const QJsonValue lv = factor.value(u"levels"_s);
    if (!lv.isArray())
        return R::failure(rd.fail(u"factor.levels"_s, u"expected an array of level names"_s));
    const QJsonArray levels = lv.toArray();
    for (qsizetype i = 0; i < levels.size(); ++i) {
        if (!levels[i].isString())
            return R::failure(rd.fail(u"factor.levels[%1]"_s.arg(i), u"expected a level name (a string)"_s));
        s.factor.levels << levels[i].toString();
    }
    if (factor.contains(u"n"_s) && !factor.value(u"n"_s).isNull()) {
        std::vector<Weight> n;
        if (!rd.weights(factor.value(u"n"_s), u"factor.n"_s, n, err))
            return R::failure(err);
        for (size_t i = 0; i < n.size(); ++i) {
            if (!n[i].isExact() || n[i].rational() <= 0)
                return R::failure(rd.fail(u"factor.n[%1]"_s.arg(i), u"expected a positive planned group size"_s));
            s.factor.plannedN.push_back(n[i].rational());
        }
    }
    if (factor.contains(u"spacing"_s) && !factor.value(u"spacing"_s).isNull())
        if (!rd.weights(factor.value(u"spacing"_s), u"factor.spacing"_s, s.factor.spacing, err))
            return R::failure(err);
    // Files written before the field existed hold independent groups.
    if (const QJsonValue mv = factor.value(u"measured"_s); !mv.isUndefined()) {
        const std::optional<Measure> measure = mv.isString() ? measureFromId(mv.toString()) : std::nullopt;
        if (!measure)
            return R::failure(rd.fail(u"factor.measured"_s, u"expected \"between\" (separate groups) or \"within\" "
                                                             u"(every participant at every level)"_s));
        s.factor.measure = *measure;
    }
    if (const Problem p = s.factor.problem(); !p.isEmpty())
        return R::failure(rd.fail(u"factor."_s + p.field, p.message));

    const QJsonValue ov = root.value(u"scheme"_s);
    if (!ov.isUndefined() && !ov.isObject())
        return R::failure(rd.fail(u"scheme"_s, u"expected an object with kind (and reference, polynomial_form, polynomial_weighted)"_s));
    const QJsonObject origin = ov.toObject();
    // Every optional key of "scheme" is checked for its type before it is read.
    for (const auto &[key, isString] : {std::pair{u"kind", true}, std::pair{u"reference", true}, std::pair{u"polynomial_form", true},
                                        std::pair{u"polynomial_weighted", false}}) {
        const QJsonValue v = origin.value(QString::fromUtf16(key));
        if (!v.isUndefined() && (isString ? !v.isString() : !v.isBool()))
            return R::failure(rd.fail(u"scheme."_s + QString::fromUtf16(key), isString ? u"expected a string"_s : u"expected true or false"_s));
    }
    const QString kindId = origin.value(u"kind"_s).toString(u"custom"_s);
    const auto kind = schemeFromId(kindId);
    if (!kind)
        return R::failure(rd.fail(u"scheme.kind"_s, u"unknown scheme %1; expected one of %2"_s.arg(quoted(kindId), schemeIdList(true))));
    s.kind = *kind;
    if (origin.contains(u"reference"_s)) {
        const QString ref = origin.value(u"reference"_s).toString();
        s.reference = int(s.factor.levels.indexOf(ref));
        if (s.reference < 0)
            return R::failure(rd.fail(u"scheme.reference"_s, u"%1 is not one of the levels"_s.arg(quoted(ref))));
    }
    const QString form = origin.value(u"polynomial_form"_s).toString(u"orthonormal"_s);
    if (form != u"orthonormal"_s && form != u"integer"_s)
        return R::failure(rd.fail(u"scheme.polynomial_form"_s, u"expected \"orthonormal\" or \"integer\""_s));
    s.polynomialForm = form == u"integer"_s ? PolynomialForm::Integer : PolynomialForm::Orthonormal;
    s.polynomialWeighted = origin.value(u"polynomial_weighted"_s).toBool(false);

    const QJsonValue iv = root.value(u"intercept"_s);
    if (!iv.isUndefined() && !iv.isBool())
        return R::failure(rd.fail(u"intercept"_s, u"expected true or false"_s));
    s.intercept = iv.toBool(true);

    const QJsonValue cv = root.value(u"columns"_s);
    if (!cv.isArray())
        return R::failure(rd.fail(u"columns"_s, u"expected an array of columns, each with a name and weights"_s));
    const QJsonArray columns = cv.toArray();
    for (qsizetype j = 0; j < columns.size(); ++j) {
        const QString path = u"columns[%1]"_s.arg(j);
        if (!columns[j].isObject())
            return R::failure(rd.fail(path, u"expected an object with name and weights"_s));
        const QJsonObject co = columns[j].toObject();
        Column c;
        if (!rd.string(co, u"name"_s, path + u".name"_s, c.name, err, false))
            return R::failure(err);
        if (!rd.weights(co.value(u"weights"_s), path + u".weights"_s, c.weights, err))
            return R::failure(err);
        if (int(c.weights.size()) != s.levelCount())
            return R::failure(rd.fail(path + u".weights"_s, u"%1 weights for %2 levels; expected one per level"_s.arg(c.weights.size()).arg(s.levelCount())));
        // A file without the flag (written before it existed) keeps every name it gives: the user's.
        const QJsonValue named = co.value(u"named"_s);
        if (!named.isUndefined() && !named.isBool())
            return R::failure(rd.fail(path + u".named"_s, u"expected true (the user named the column) or false (the tool names it)"_s));
        c.named = named.isBool() ? named.toBool() : !c.name.trimmed().isEmpty();
        const QJsonValue namedFor = co.value(u"named_for"_s);
        if (!namedFor.isUndefined() && !namedFor.isNull()) {
            if (!rd.weights(namedFor, path + u".named_for"_s, c.namedFor, err))
                return R::failure(err);
            if (int(c.namedFor.size()) != s.levelCount())
                return R::failure(rd.fail(path + u".named_for"_s, u"%1 weights for %2 levels; expected one per level"_s.arg(c.namedFor.size()).arg(s.levelCount())));
            if (!c.named)
                c.namedFor.clear();
        }
        s.columns.push_back(std::move(c));
    }
    if (s.columns.empty())
        return R::failure(rd.fail(u"columns"_s, u"expected at least one column"_s));
    if (int(s.columns.size()) > s.levelCount())
        return R::failure(rd.fail(u"columns"_s, u"%1 columns for %2 levels; at most %2 are possible"_s.arg(s.columns.size()).arg(s.levelCount())));
    const QJsonValue nv = root.value(u"notes"_s);
    if (!nv.isUndefined() && !nv.isString())
        return R::failure(rd.fail(u"notes"_s, u"expected a string"_s));
    s.notes = nv.toString();
    return R(std::move(s));
}

QString writeAll(QIODevice &device, const QByteArray &data, const QString &where)
{
    qint64 done = 0;
    while (done < data.size()) {
        const qint64 w = device.write(data.constData() + done, data.size() - done);
        if (w <= 0)
            return u"%1: could not write the file: %2"_s.arg(where, device.errorString());
        done += w;
    }
    return {};
}

QString writeFileAtomically(const QString &path, const QByteArray &data)
{
    // A device, pipe or socket (/dev/full, /dev/stdout, a FIFO) cannot be replaced by a
    // renamed temporary file: QSaveFile would put a regular file in its place (and as root
    // it may). Such a target is written directly.
    if (const QFileInfo info(path); info.exists() && !info.isFile() && !info.isDir()) {
        QFile direct(path);
        if (!direct.open(QIODevice::WriteOnly | QIODevice::Unbuffered))
            return u"%1: cannot open for writing: %2"_s.arg(path, direct.errorString());
        return writeAll(direct, data, path);
    }
    QSaveFile f(path);
    if (!f.open(QIODevice::WriteOnly))
        return u"%1: cannot open for writing: %2"_s.arg(path, f.errorString());
    if (QString e = writeAll(f, data, path); !e.isEmpty()) {
        f.cancelWriting();
        return e;
    }
    if (!f.commit())
        return u"%1: could not save the file: %2"_s.arg(path, f.errorString());
    return {};
}

QString saveScheme(const Scheme &scheme, const QString &path)
{
    return writeFileAtomically(path, schemeToJson(scheme));
}

} // namespace cb
