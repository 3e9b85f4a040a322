#include "app/cli/SummaryQueryArguments.h"

#include "core/base/Weight.h"

using namespace Qt::StringLiterals;

namespace cb::cli {

void addSummaryQueryOptions(QCommandLineParser &p, bool participantOption)
{
    p.addOption({u"table"_s, u"The database table that holds the rows (matched exactly, case included)."_s, u"T"_s});
    p.addOption({u"variance"_s, u"How the query computes the variance: centred (sums of squares about each level's midrange "
                               "from a first pass, or about --centre; accurate when the mean is large relative to the SD; "
                               "the default) or engine (the engine's VAR_SAMP)."_s,
                 u"centred|engine"_s});
    p.addOption({u"centre"_s, u"With the centred form, subtract this constant (such as a known typical value) instead of "
                             "running a first pass."_s,
                 u"VALUE"_s});
    if (participantOption)
        p.addOption({u"participant"_s, u"The column naming each row's participant, for factors measured within participants: "
                                  "the two-level form, one row per participant and level (each participant's cell mean over "
                                  "its replicate rows), which fit --participant analyses by participant."_s,
                 u"COL"_s});
}

QStringList summaryQueryOnlyOptions()
{
    return {u"table"_s, u"variance"_s, u"centre"_s};
}

Result<SummaryQuerySpec> summaryQuerySpec(const QCommandLineParser &p, const QStringList &factorColumns)
{
    using R = Result<SummaryQuerySpec>;
    SummaryQuerySpec spec;
    if (!p.isSet(u"table"_s))
        return R::failure(u"--table: missing; name the table that holds the rows"_s, u"table"_s);
    spec.table = p.value(u"table"_s);
    spec.factorColumns = factorColumns;
    if (p.value(u"response"_s).isEmpty())
        return R::failure(u"--response: missing; name the column that holds the measurements"_s, u"response"_s);
    spec.responseColumn = p.value(u"response"_s);
    spec.weightColumn = p.value(u"weight"_s);
    if (p.isSet(u"participant"_s)) {
        spec.participantColumn = p.value(u"participant"_s);
        if (spec.participantColumn.isEmpty())
            return R::failure(u"--participant: empty name; expected the column that names the participants"_s, u"participant"_s);
    }
    if (p.isSet(u"variance"_s)) {
        const QString v = p.value(u"variance"_s).trimmed().toLower();
        if (v == u"engine"_s)
            spec.form = VarianceForm::Engine;
        else if (v != u"centred"_s && v != u"centered"_s)
            return R::failure(u"--variance: %1; expected centred or engine"_s.arg(quoted(p.value(u"variance"_s))),
                              u"variance"_s);
    }
    if (p.isSet(u"centre"_s)) {
        bool ok = false;
        const double c = p.value(u"centre"_s).toDouble(&ok);
        if (!ok)
            return R::failure(u"--centre: %1; expected a number"_s.arg(quoted(p.value(u"centre"_s))), u"centre"_s);
        spec.centre = c;
    }
    return spec;
}

} // namespace cb::cli
