#pragma once
// The summary query: the SQL that asks a database engine for each level's count, mean and
// variance, so that millions of rows are summarised where they live and only one row per level
// comes back. What comes back is the summary table `fit --summary` reads (level, n, mean,
// variance) and goes through the same checks (summaryFromRows, core/data/DataReader.h) and the
// same fit. Running the query needs a database driver, which core does not link: the programs
// hand a SummaryRowSource in (app/database/ runs it through Qt SQL).

#include "core/base/Result.h"
#include "core/data/DataReader.h"

#include <QString>
#include <QStringList>

#include <functional>
#include <optional>
#include <vector>

namespace cb {

// How the query computes the variance.
enum class VarianceForm {
    // Sums of squares about a centre subtracted first: each level's own midrange from a first
    // pass (a WITH clause; MIN and MAX are exact, so every row of a level sees the same centre
    // even when a parallel engine computes the pass in several workers) or a constant the user gives. Stays accurate when the mean is large
    // relative to the SD (the corrected two-pass formula, Chan, Golub & LeVeque 1983,
    // Am. Statistician 37:242-247). Standard SQL that every engine runs (SQLite included).
    Centred,
    // The engine's own VAR_SAMP aggregate (not in SQLite; no case weights).
    Engine,
};

struct SummaryQuerySpec
{
    QString table;             // may be schema-qualified only by giving the parts separately: not supported
    QStringList factorColumns; // one per factor; a design's cells are joined with kCellJoiner
    QString responseColumn;
    QString weightColumn;      // empty: every row counts once
    // The two-level form, for factors measured within participants: GROUP BY this column too, so
    // each row is one participant's cell (replicate trials averaged); empty: the one-level form.
    QString participantColumn;
    // With participantColumn, for the by-item analysis: summaryFromSource runs the two-level form a
    // second time grouped by this column instead, so each row is one item's cell (its mean over the
    // participants' rows), and fills DataSummary's items. The query text is the participants' one.
    QString itemColumn;
    VarianceForm form = VarianceForm::Centred;
    std::optional<double> centre; // Centred only: subtract this constant instead of a first pass
};

struct SummaryQuery
{
    QString sql;       // one SELECT statement (comments first, no semicolon)
    QString formNote;  // which variance form is used, in words (also a comment in sql)
};

// Standard SQL identifier quoting: the name in double quotes, each double quote doubled. A
// hostile name ("x\"; DROP TABLE t; --") stays one inert identifier.
QString quoteSqlIdentifier(const QString &name);

// Writes the query. Fails, naming the option, on an empty name, a name with a NUL character,
// a column used twice, a non-finite centre, or the engine form with weights.
Result<SummaryQuery> summaryQuery(const SummaryQuerySpec &spec);

// The names of the columns the query returns, in order; the two-level form returns the sum of
// squared deviations "ss" instead of the variance (a cell's case weights may add up to 1 or less)
// and adds "participant".
inline QStringList summaryQueryColumns(bool twoLevel = false)
{
    QStringList names = {QStringLiteral("level"), QStringLiteral("n"), QStringLiteral("mean"), QStringLiteral("variance")};
    if (twoLevel) {
        names[3] = QStringLiteral("ss");
        names << QStringLiteral("participant");
    }
    return names;
}

// A source of summary rows: runs the query and returns its rows, or a message that names the
// place (the database, the table, the column) and what was expected.
using SummaryRowSource = std::function<Result<std::vector<SummaryRow>>(const SummaryQuerySpec &, const SummaryQuery &)>;

// The two-level form's rows (each participant's cell: SummaryRow::participant set, spread the sum
// of squared deviations) as the data the
// by-participant analysis reads (fitParticipants, core/data/DataFit.h): participantCells from the
// rows, each level's pooled statistics merged from its cells. Each row gets the checks of a
// summary file's row (addSummaryRow); a row without a participant, a participant's level given
// twice, or no rows is an error naming the row. participantColumn names the column in reports.
Result<DataSummary> participantSummaryFromRows(const std::vector<SummaryRow> &rows, const QString &sourceName,
                                               const QString &participantColumn);

// Writes the query, runs it through the source and reads the rows as a summary table (the same
// checks as a summary file), or, with a participant column, through participantSummaryFromRows;
// with an item column as well, a second query grouped by the item gives the items' cells.
// sourceName names the data in messages and in the fit's JSON.
Result<DataSummary> summaryFromSource(const SummaryQuerySpec &spec, const SummaryRowSource &source,
                                      const QString &sourceName);

// What the programs hand the window: reads the summary of a table in the database at url
// (app/database's readDatabaseSummary). The window itself never links a database driver.
using DatabaseReader = std::function<Result<DataSummary>(const QString &url, const SummaryQuerySpec &spec)>;

} // namespace cb
