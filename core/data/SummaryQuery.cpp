#include "core/data/SummaryQuery.h"

#include "core/model/Design.h"

#include <QHash>

#include <algorithm>
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
    const bool twoLevel = !spec.participantColumn.isEmpty();
    if (twoLevel)
        if (QString e = checkColumn(u"--participant"_s, spec.participantColumn); !e.isEmpty())
            return R::failure(e, u"participant"_s);
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
    // Rows are grouped and joined by the factor columns themselves (and, in the two-level form,
    // the participant column: one group per participant's cell); only each group's level is
    // written as text (a cast per row would cost as much as the rest of the query).
    QStringList groupColumns = spec.factorColumns;
    if (twoLevel)
        groupColumns << spec.participantColumn;
    QStringList keys, keyAliases, joins;
    for (qsizetype i = 0; i < groupColumns.size(); ++i) {
        keys << col(u"d"_s, groupColumns[i]);
        keyAliases << u"%1 AS \"k%2\""_s.arg(keys.back(), QString::number(i + 1));
        joins << u"p.\"k%1\" = %2"_s.arg(QString::number(i + 1), keys.back());
    }
    QStringList conditions;
    for (const QString &f : groupColumns)
        conditions << col(u"d"_s, f) + u" IS NOT NULL"_s;
    conditions << col(u"d"_s, spec.responseColumn) + u" IS NOT NULL"_s;
    if (weighted)
        conditions << col(u"d"_s, spec.weightColumn) + u" > 0"_s;
    const QString where = conditions.join(u"\n  AND "_s);
    const QString y = col(u"d"_s, spec.responseColumn);
    // The two-level form: whose cell each row is, last, and the rows in a fixed order.
    const QString participantSelect = twoLevel
        ? u",\n  CAST(%1 AS VARCHAR(1000)) AS \"participant\""_s.arg(col(u"d"_s, spec.participantColumn))
        : QString();
    const QString orderBy = twoLevel ? u"\nORDER BY \"participant\", \"level\""_s : QString();
    const QString w = weighted ? col(u"d"_s, spec.weightColumn) : QString();

    SummaryQuery q;
    QString body;
    if (spec.form == VarianceForm::Engine) {
        q.formNote = u"variance: the engine's VAR_SAMP (accurate only when the engine's aggregate is; it loses digits "
                     "where the mean is large relative to the SD if the engine sums raw squares)"_s;
        body = u"SELECT %1 AS \"level\",\n"
               "  COUNT(*) AS \"n\",\n"
               "  AVG(%2) AS \"mean\",\n"
               "  %8%6\n"
               "FROM %3 AS d\n"
               "WHERE %4\n"
               "GROUP BY %5%7"_s.arg(level(u"d"_s), y, table, where, keys.join(u", "_s), participantSelect, orderBy,
                                     twoLevel ? u"COALESCE(VAR_SAMP(%1) * (COUNT(*) - 1), 0) AS \"ss\""_s.arg(y)
                                              : u"VAR_SAMP(%1) AS \"variance\""_s.arg(y));
    } else {
        // n, the sum of the deviations from the centre and of their squares; then
        // mean = c + S1/n and variance = (S2 - S1^2/n)/(n - 1) (corrected two-pass form).
        const QString n = weighted ? u"SUM(%1)"_s.arg(w) : u"COUNT(*)"_s;
        const QString c = spec.centre ? floatingLiteral(*spec.centre) : u"p.\"centre\""_s;
        const QString dev = u"(%1 - %2)"_s.arg(y, c);
        const QString s1 = weighted ? u"SUM(%1 * %2)"_s.arg(w, dev) : u"SUM(%1)"_s.arg(dev);
        const QString s2 = weighted ? u"SUM(%1 * %2 * %2)"_s.arg(w, dev) : u"SUM(%1 * %1)"_s.arg(dev);
        // The variance, or in the two-level form the sum of squared deviations itself: a cell's
        // weights may add up to 1 or less, where the variance's n - 1 is no divisor.
        const QString ss = u"CAST(%1 AS DOUBLE PRECISION) - CAST(%2 AS DOUBLE PRECISION) * %2 / %3"_s.arg(s2, s1, n);
        const QString spread = twoLevel ? u"%1 AS \"ss\""_s.arg(ss)
                                        : u"(%1) / NULLIF(%2 - 1, 0) AS \"variance\""_s.arg(ss, n);
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
                "  %5%9\n"
                "FROM %6\n"
                "WHERE %7\n"
                "GROUP BY %8%10"_s.arg(level(u"d"_s), n, c, s1, spread, from, where, groupBy, participantSelect, orderBy);
    }
    const QString what = twoLevel
        ? u"-- Contrast Bench summary query, two-level form: one row per participant and level (level, n, mean,\n"
          "-- ss: the sum of squared deviations, participant), each participant's cell mean over its replicate rows, the rows that\n"
          "-- contrast-bench-cli fit --participant analyses by participant. One SELECT; nothing is written.\n"_s
        : u"-- Contrast Bench summary query: one row per level (level, n, mean, variance), the summary\n"
          "-- table that contrast-bench-cli fit --summary reads. One SELECT; nothing is written.\n"_s;
    QString header = what
        + u"-- Rows with a missing factor%1 or response%2 are left out.\n"
          "-- %3\n"_s.arg(twoLevel ? u", participant"_s : QString(),
                          weighted ? u", or a weight that is missing or not above 0,"_s : QString(), commentText(q.formNote));
    q.sql = header + body;
    return q;
}

Result<DataSummary> participantSummaryFromRows(const std::vector<SummaryRow> &rows, const QString &sourceName,
                                               const QString &participantColumn)
{
    using R = Result<DataSummary>;
    DataSummary out;
    out.source = sourceName;
    out.fromSummaryTable = true;
    out.hasHeader = true;
    out.columns = summaryQueryColumns(true);
    out.columns[4] = participantColumn;
    out.factorIndex = 0;
    out.responseIndex = 2;
    out.participantIndex = 4;
    // Each participant's rows as a small summary table of its own: the checks of a summary file's
    // row (a level given once, n positive, mean finite, variance >= 0) and the cell's statistics.
    std::vector<DataSummary> cells;
    QHash<QString, int> participantIndex;
    for (const SummaryRow &row : rows) {
        ++out.records;
        if (row.participant.trimmed().isEmpty())
            return R::failure(u"%1: the participant (column %2) is missing; every row needs the participant it belongs to"_s.arg(
                row.place, quoted(participantColumn)));
        int p = participantIndex.value(row.participant, -1);
        if (p < 0) {
            p = int(cells.size());
            participantIndex.insert(row.participant, p);
            out.participants << row.participant;
            cells.emplace_back();
        }
        // The checks as a variance; the sum of squares itself kept (n may be 1 or less with weights).
        SummaryRow checked = row;
        checked.spreadIsVariance = true;
        if (!row.spread)
            return R::failure(u"%1: ss is missing; expected a number >= 0"_s.arg(row.place));
        const double ss = std::max(*row.spread, 0.0); // a tiny negative is rounding
        // With n <= 1 (weights) the variance is not defined; ss itself gets the variance's bounds.
        checked.spread = ss / std::max(row.n - 1.0, 1.0);
        DataSummary &mine = cells[size_t(p)];
        if (QString e = addSummaryRow(mine, checked); !e.isEmpty())
            return R::failure(e);
        mine.levels.back().stats.m2 = ss;
        if (out.levelIndex(row.level) < 0)
            out.levels.push_back({row.level, {}});
        ++out.usedRows;
    }
    if (rows.empty())
        return R::failure(u"%1 has no rows; expected one row per participant and level"_s.arg(sourceName));
    // [participant][level] in the order of out.levels; each level's pooled statistics merged from its cells.
    out.participantCells.assign(cells.size(), std::vector<RunningStats>(out.levels.size()));
    for (size_t p = 0; p < cells.size(); ++p)
        for (const LevelStats &cell : cells[p].levels) {
            const int l = out.levelIndex(cell.name);
            out.participantCells[p][size_t(l)] = cell.stats;
            out.levels[size_t(l)].stats.merge(cell.stats);
        }
    return out;
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
    if (spec.participantColumn.isEmpty()) {
        if (!spec.itemColumn.isEmpty())
            return Result<DataSummary>::failure(u"the by-item analysis needs a participant column beside the item column"_s, u"item"_s);
        return summaryFromRows(*rows, sourceName);
    }
    auto data = participantSummaryFromRows(*rows, sourceName, spec.participantColumn);
    if (!data || spec.itemColumn.isEmpty())
        return data;
    if (spec.itemColumn == spec.participantColumn)
        return Result<DataSummary>::failure(u"the item column is the participant column (%1); name the column that says which item "
                                            u"each row shows"_s.arg(quoted(spec.itemColumn)),
                                            u"item"_s);
    // The same two-level form with the items in the participants' place.
    SummaryQuerySpec byItem = spec;
    byItem.participantColumn = spec.itemColumn;
    byItem.itemColumn.clear();
    auto items = summaryFromSource(byItem, source, sourceName);
    if (!items)
        return items;
    data->columns << spec.itemColumn;
    data->itemIndex = int(data->columns.size()) - 1;
    data->items = items->participants;
    data->itemCells.assign(size_t(items->participants.size()), std::vector<RunningStats>(data->levels.size()));
    for (size_t i = 0; i < data->itemCells.size(); ++i)
        for (size_t l = 0; l < items->levels.size(); ++l) {
            const int mine = data->levelIndex(items->levels[l].name);
            if (mine < 0)
                return Result<DataSummary>::failure(u"the by-item answer has level %1, which the by-participant answer lacks"_s.arg(
                    quoted(items->levels[l].name)));
            data->itemCells[i][size_t(mine)] = items->participantCells[i][l];
        }
    return data;
}

} // namespace cb
