#include "core/data/SummaryQuery.h"

#include "core/model/Design.h"

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

QString quoteSqlIdentifier(const QString &name)
{
    QString inner = name;
    inner.replace(u'"', u"\"\""_s);
    return u'"' + inner + u'"';
}

namespace {

// A constant written so that every engine reads it as a floating literal (never integer division).
QString floatingLiteral(double v)
{
    QString text = QString::number(v, 'g', 17);
    if (!text.contains(u'.') && !text.contains(u'e'))
        text += u".0"_s;
    return u"CAST(%1 AS DOUBLE PRECISION)"_s.arg(text);
}

QString checkName(const QString &option, const QString &name)
{
    if (name.isEmpty())
        return u"%1: empty name; expected the name of a table or column"_s.arg(option);
    if (name.contains(QChar(0)))
        return u"%1: the name contains a NUL character; expected the name of a table or column"_s.arg(option);
    return {};
}

// "-- " comment lines: a name in a comment may not end the comment early, so line breaks go.
QString commentText(QString text)
{
    text.replace(u'\n', u' ');
    text.replace(u'\r', u' ');
    return text;
}

} // namespace

Result<SummaryQuery> summaryQuery(const SummaryQuerySpec &spec)
{
    using R = Result<SummaryQuery>;
    if (!spec.participantColumn.isEmpty())
        return R::failure(u"--participant: the two-level form (each participant's cell means first) is not available: "
                          "the query does not yet write each participant's cell means. For a factor measured within "
                          "participants, export the rows and use fit --data with --participant; leave --participant "
                          "out to summarise every row as independent"_s,
                          u"participant"_s);
    if (QString e = checkName(u"--table"_s, spec.table); !e.isEmpty())
        return R::failure(e, u"table"_s);
    if (spec.factorColumns.isEmpty())
        return R::failure(u"--factor: missing; name the column that holds the levels"_s, u"factor"_s);
    if (spec.factorColumns.size() > 3)
        return R::failure(u"--factor: given %1 times; a design has at most 3 factors"_s.arg(spec.factorColumns.size()),
                          u"factor"_s);
    QStringList used;
    const auto checkColumn = [&used](const QString &option, const QString &name) -> QString {
        if (QString e = checkName(option, name); !e.isEmpty())
            return e;
        if (used.contains(name))
            return u"%1: column %2 is already used as another role; choose another column"_s.arg(option, quoted(name));
        used << name;
        return {};
    };
    for (const QString &f : spec.factorColumns)
        if (QString e = checkColumn(u"--factor"_s, f); !e.isEmpty())
            return R::failure(e, u"factor"_s);
    if (QString e = checkColumn(u"--response"_s, spec.responseColumn); !e.isEmpty())
        return R::failure(e, u"response"_s);
    const bool weighted = !spec.weightColumn.isEmpty();
    if (weighted)
        if (QString e = checkColumn(u"--weight"_s, spec.weightColumn); !e.isEmpty())
            return R::failure(e, u"weight"_s);
    if (spec.centre && !std::isfinite(*spec.centre))
        return R::failure(u"--centre: expected a finite number"_s, u"centre"_s);
    if (spec.form == VarianceForm::Engine && weighted)
        return R::failure(u"--variance engine: the engine's VAR_SAMP has no case weights; use the centred form with "
                          "--weight"_s, u"variance"_s);
    if (spec.form == VarianceForm::Engine && spec.centre)
        return R::failure(u"--centre: only the centred form subtracts a centre; leave --variance engine out"_s,
                          u"centre"_s);

    const QString table = quoteSqlIdentifier(spec.table);
    const auto col = [](const QString &alias, const QString &name) { return alias + u'.' + quoteSqlIdentifier(name); };
    // The level: the factor's value as text; a design's cell joins its factors' values as
    // Design::cellNames() does ("grass·early").
    const auto level = [&](const QString &alias) {
        QStringList parts;
        for (const QString &f : spec.factorColumns)
            parts << u"CAST(%1 AS VARCHAR(1000))"_s.arg(col(alias, f));
        return parts.join(u" || '%1' || "_s.arg(cellJoiner()));
    };
    // Rows are grouped and joined by the factor columns themselves; only each group's level is
    // written as text (a cast per row would cost as much as the rest of the query).
    QStringList keys, keyAliases, joins;
    for (qsizetype i = 0; i < spec.factorColumns.size(); ++i) {
        keys << col(u"d"_s, spec.factorColumns[i]);
        keyAliases << u"%1 AS \"k%2\""_s.arg(keys.back(), QString::number(i + 1));
        joins << u"p.\"k%1\" = %2"_s.arg(QString::number(i + 1), keys.back());
    }
    QStringList conditions;
    for (const QString &f : spec.factorColumns)
        conditions << col(u"d"_s, f) + u" IS NOT NULL"_s;
    conditions << col(u"d"_s, spec.responseColumn) + u" IS NOT NULL"_s;
    if (weighted)
        conditions << col(u"d"_s, spec.weightColumn) + u" > 0"_s;
    const QString where = conditions.join(u"\n  AND "_s);
    const QString y = col(u"d"_s, spec.responseColumn);
    const QString w = weighted ? col(u"d"_s, spec.weightColumn) : QString();

    SummaryQuery q;
    QString body;
    if (spec.form == VarianceForm::Engine) {
        q.formNote = u"variance: the engine's VAR_SAMP (accurate only when the engine's aggregate is; it loses digits "
                     "where the mean is large relative to the SD if the engine sums raw squares)"_s;
        body = u"SELECT %1 AS \"level\",\n"
               "  COUNT(*) AS \"n\",\n"
               "  AVG(%2) AS \"mean\",\n"
               "  VAR_SAMP(%2) AS \"variance\"\n"
               "FROM %3 AS d\n"
               "WHERE %4\n"
               "GROUP BY %5"_s.arg(level(u"d"_s), y, table, where, keys.join(u", "_s));
    } else {
        // n, the sum of the deviations from the centre and of their squares; then
        // mean = c + S1/n and variance = (S2 - S1^2/n)/(n - 1) (corrected two-pass form).
        const QString n = weighted ? u"SUM(%1)"_s.arg(w) : u"COUNT(*)"_s;
        const QString c = spec.centre ? floatingLiteral(*spec.centre) : u"p.\"centre\""_s;
        const QString dev = u"(%1 - %2)"_s.arg(y, c);
        const QString s1 = weighted ? u"SUM(%1 * %2)"_s.arg(w, dev) : u"SUM(%1)"_s.arg(dev);
        const QString s2 = weighted ? u"SUM(%1 * %2 * %2)"_s.arg(w, dev) : u"SUM(%1 * %1)"_s.arg(dev);
        QString from = u"%1 AS d"_s.arg(table);
        QString groupBy = keys.join(u", "_s);
        if (!spec.centre) {
            // The first pass: each level's midrange, half-way between its smallest and largest
            // value, the centre of its second pass. Not the mean: a parallel engine may compute
            // a sum in each worker in its own order, and a centre must be the same number in
            // every row of a level; MIN and MAX are exact. The mean lies within half the range.
            const QString firstValue = u"CAST(MIN(%1) AS DOUBLE PRECISION) / 2 + CAST(MAX(%1) AS DOUBLE PRECISION) / 2"_s.arg(y);
            // Named so as not to hide the table itself.
            const QString centres = quoteSqlIdentifier(spec.table == u"cb_level_centres"_s ? u"cb_level_centres_2"_s
                                                                                          : u"cb_level_centres"_s);
            body = u"WITH %5 AS (\n"
                   "  SELECT %1, %2 AS \"centre\"\n"
                   "  FROM %3 AS d\n"
                   "  WHERE %4\n"
                   "  GROUP BY %6\n"
                   ")\n"_s.arg(keyAliases.join(u", "_s), firstValue, table, where, centres, keys.join(u", "_s));
            from += u"\n  JOIN %1 AS p ON %2"_s.arg(centres, joins.join(u" AND "_s));
            groupBy += u", p.\"centre\""_s;
            q.formNote = u"variance: centred form, sums of squares about each level's midrange from a first pass "
                         "(accurate when the mean is large relative to the SD)"_s;
        } else {
            q.formNote = u"variance: centred form, sums of squares about the constant %1 (accurate when the level "
                         "means lie near it relative to the SD)"_s.arg(QString::number(*spec.centre, 'g', 17));
        }
        body += u"SELECT %1 AS \"level\",\n"
                "  %2 AS \"n\",\n"
                "  %3 + CAST(%4 AS DOUBLE PRECISION) / %2 AS \"mean\",\n"
                "  (CAST(%5 AS DOUBLE PRECISION) - CAST(%4 AS DOUBLE PRECISION) * %4 / %2) / NULLIF(%2 - 1, 0) AS \"variance\"\n"
                "FROM %6\n"
                "WHERE %7\n"
                "GROUP BY %8"_s.arg(level(u"d"_s), n, c, s1, s2, from, where, groupBy);
    }
    QString header = u"-- Contrast Bench summary query: one row per level (level, n, mean, variance), the summary\n"
                     "-- table that contrast-bench-cli fit --summary reads. One SELECT; nothing is written.\n"
                     "-- Rows with a missing factor or response%1 are left out.\n"
                     "-- %2\n"_s.arg(weighted ? u", or a weight that is missing or not above 0,"_s : QString(),
                                     commentText(q.formNote));
    q.sql = header + body;
    return q;
}

Result<DataSummary> summaryFromSource(const SummaryQuerySpec &spec, const SummaryRowSource &source,
                                      const QString &sourceName)
{
    auto query = summaryQuery(spec);
    if (!query)
        return Result<DataSummary>::failure(query.error(), query.field());
    auto rows = source(spec, *query);
    if (!rows)
        return Result<DataSummary>::failure(rows.error(), rows.field());
    return summaryFromRows(*rows, sourceName);
}

} // namespace cb
