// The fit subcommand: a scheme fitted to a data file, estimates beside their hypotheses.
#include "app/cli/Commands.h"
#include "app/cli/SchemeArguments.h"
#include "app/cli/SummaryQueryArguments.h"
#include "app/database/DatabaseSource.h"

#include "core/data/DataFit.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/data/DesignFit.h"
#include "core/data/MixedFit.h"
#include "core/report/AnalysisJson.h"
#include "core/data/DataReader.h"
#include "core/data/ItemFit.h"
#include "core/model/Design.h"
#include "core/model/Scheme.h"
#include "core/report/FitReport.h"
#include "core/report/ItemReport.h"

#include <QCommandLineParser>
#include <QJsonArray>
#include <QJsonDocument>

using namespace Qt::StringLiterals;

namespace cb::cli {

namespace {

int badInput(Io &io, const QString &message)
{
    return cli::badInput(io, u"fit"_s, message);
}

// The data options, read before the scheme's so that --factor names the data column
// (and with it the factor).
void addDataOptions(QCommandLineParser &p)
{
    p.addOption({u"data"_s, u"The data file: CSV or TSV in long format, or '-' for standard input."_s, u"file"_s});
    p.addOption({u"database"_s, u"Read the data from a database instead: sqlite:///path/to/file.db, "
                               "postgresql://user@host:5432/dbname (the password from PGPASSWORD or ~/.pgpass) or odbc:DSN. "
                               "The engine summarises the table (--table) per level in one SELECT, read-only."_s,
                 u"URL"_s});
    p.addOption({u"factor"_s, u"The data column that holds the levels (name, or number from 1). For a design file, "
                             "once per factor in the design's order (default: columns named as the factors)."_s, u"COL"_s});
    p.addOption({u"response"_s, u"The data column that holds the measurements (name, or number from 1)."_s, u"COL"_s});
    p.addOption({u"weight"_s, u"A column of case weights (a row of weight w counts as w rows)."_s, u"COL"_s});
    p.addOption({u"participant"_s, u"The data column naming each row's participant, for a factor measured within participants: "
                                  u"the by-participant analysis (each contrast on the participants' contrast scores, Hotelling's "
                                  u"T\u00b2 for all levels). It is not a mixed-effects model."_s,
                 u"COL"_s});
    p.addOption({u"item"_s, u"With --participant: the data column naming each row's item (sentence, word, picture): the by-item "
                           u"analysis beside the by-participant one, and Clark's (1973) min F\u2032 for each coefficient. "
                           u"Not a mixed-effects model with crossed random effects."_s,
                 u"COL"_s});
    p.addOption({u"summary"_s, u"The data file is a summary table with columns level, n, mean, sd."_s});
    p.addOption({u"delimiter"_s, u"comma, tab, semicolon, bar, or one character (default: detected)."_s, u"NAME"_s});
    p.addOption({u"header"_s, u"Whether the first row is a header: auto, yes or no (default auto)."_s, u"auto|yes|no"_s});
    p.addOption({u"map"_s, u"Rename data levels to scheme levels: \"data=scheme,other=scheme2\"."_s, u"pairs"_s});
    p.addOption({u"alpha"_s, u"Confidence intervals at 1 - alpha (default 0.05)."_s, u"a"_s});
    p.addOption({u"adjust"_s, u"Adjust the contrasts' p-values: %1 (default none)."_s.arg(adjustmentIdList(false)), u"METHOD"_s});
    p.addOption({u"json"_s, u"Print one JSON object instead of the report."_s});
    addSummaryQueryOptions(p, false);
}

struct DataArguments
{
    char delimiter = 0;
    HeaderMode header = HeaderMode::Detect;
    FitOptions fit;
    LevelMapping mapping;
};

Result<DataArguments> dataArguments(const QCommandLineParser &p)
{
    using R = Result<DataArguments>;
    DataArguments a;
    if (p.isSet(u"data"_s) && p.isSet(u"database"_s))
        return R::failure(u"--data and --database: give one source of data"_s);
    if (!p.isSet(u"data"_s) && !p.isSet(u"database"_s))
        return R::failure(u"--data: no data file given; name a CSV or TSV file, or '-' for standard input (or give "
                          "--database)"_s);
    if (p.isSet(u"database"_s)) {
        for (const QString &o : {u"summary"_s, u"delimiter"_s, u"header"_s})
            if (p.isSet(o))
                return R::failure(u"--%1 cannot be combined with --database; the engine returns the summary itself"_s.arg(o));
    } else {
        for (const QString &o : summaryQueryOnlyOptions())
            if (p.isSet(o))
                return R::failure(u"--%1 is read only with --database"_s.arg(o));
    }
    if (!p.isSet(u"summary"_s)) {
        // --factor is checked with the scheme: a design's columns default to its factors' names.
        if (p.value(u"response"_s).trimmed().isEmpty())
            return R::failure(u"--response: missing; name the data column (or give --summary for a summary table)"_s);
    } else if (p.isSet(u"item"_s)) {
        return R::failure(u"--item cannot be combined with --summary; a summary table has its own columns"_s);
    } else if (p.isSet(u"weight"_s) || p.isSet(u"response"_s) || p.isSet(u"participant"_s)) {
        return R::failure(u"--%1 cannot be combined with --summary; a summary table has its own columns"_s.arg(
            p.isSet(u"weight"_s) ? u"weight"_s : p.isSet(u"response"_s) ? u"response"_s : u"participant"_s));
    }
    if (p.isSet(u"item"_s) && !p.isSet(u"participant"_s))
        return R::failure(u"--item needs --participant: the by-item analysis sits beside the by-participant one"_s);
    if (p.isSet(u"delimiter"_s)) {
        const auto d = delimiterFromName(p.value(u"delimiter"_s));
        if (!d)
            return R::failure(u"--delimiter: %1 is not a delimiter; expected comma, tab, semicolon, bar or one punctuation character"_s
                                  .arg(quoted(p.value(u"delimiter"_s))));
        a.delimiter = *d;
    }
    if (p.isSet(u"header"_s)) {
        const QString h = p.value(u"header"_s).trimmed().toLower();
        if (h == u"yes"_s)
            a.header = HeaderMode::Present;
        else if (h == u"no"_s)
            a.header = HeaderMode::Absent;
        else if (h != u"auto"_s)
            return R::failure(u"--header: %1; expected auto, yes or no"_s.arg(quoted(p.value(u"header"_s))));
    }
    if (p.isSet(u"alpha"_s)) {
        bool ok = false;
        a.fit.alpha = p.value(u"alpha"_s).toDouble(&ok);
        if (!ok || !(a.fit.alpha > 0.0 && a.fit.alpha < 1.0))
            return R::failure(u"--alpha: %1; expected a number between 0 and 1, such as 0.05"_s.arg(quoted(p.value(u"alpha"_s))));
    }
    if (p.isSet(u"adjust"_s)) {
        const auto m = adjustmentFromId(p.value(u"adjust"_s));
        if (!m)
            return R::failure(u"--adjust: %1; expected %2"_s.arg(quoted(p.value(u"adjust"_s)), adjustmentIdList(false)));
        a.fit.adjust = *m;
    }
    if (p.isSet(u"map"_s)) {
        auto m = parseLevelMapping(p.value(u"map"_s));
        if (!m)
            return R::failure(u"--map: "_s + m.error());
        a.mapping = m.take();
    }
    return a;
}

// factorColumns: one per factor (a design's cells are the joined values, "grass·early").
Result<DataSummary> readData(const QCommandLineParser &p, const DataArguments &a, const QStringList &factorColumns)
{
    if (p.isSet(u"database"_s)) {
        auto spec = summaryQuerySpec(p, factorColumns);
        if (!spec)
            return Result<DataSummary>::failure(spec.error(), spec.field());
        spec->itemColumn = p.value(u"item"_s);
        return readDatabaseSummary(p.value(u"database"_s), *spec);
    }
    if (p.isSet(u"summary"_s))
        return readSummaryTable(p.value(u"data"_s), SummaryReadOptions{a.delimiter, a.header});
    DataReadOptions o;
    o.factorColumn = factorColumns.value(0);
    o.moreFactorColumns = factorColumns.mid(1);
    o.responseColumn = p.value(u"response"_s);
    o.weightColumn = p.value(u"weight"_s);
    o.participantColumn = p.value(u"participant"_s);
    o.itemColumn = p.value(u"item"_s);
    o.delimiter = a.delimiter;
    o.header = a.header;
    return readLevelData(p.value(u"data"_s), o);
}

} // namespace

int runFit(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addDataOptions(p);
    // Here --factor is the data column (it names the factor as well), so the scheme
    // options leave their own --factor out.
    addSchemeOptions(p, SchemeOptionSet::WithoutFactorName);
    if (const auto done = parseOrHelp(p, u"fit"_s, args, io))
        return *done;
    auto arguments = dataArguments(p);
    if (!arguments)
        return badInput(io, arguments.error());
    auto study = studyFromOptions(p);
    if (!study)
        return badInput(io, study.error());
    std::optional<Design> design;
    if (study->isDesign())
        design = study->design;
    // The data columns of the factors: a design's default to the factors' names.
    QStringList factorColumns = p.values(u"factor"_s);
    if (design && !p.isSet(u"summary"_s)) {
        QStringList names;
        for (const Scheme &f : design->factors)
            names << f.factor.name;
        if (factorColumns.isEmpty())
            factorColumns = names;
        else if (factorColumns.size() != names.size())
            return badInput(io, u"--factor: given %1 times for a design of %2 factors (%3); give it once per factor, in that "
                                "order, or leave it out to use columns named as the factors"_s
                                    .arg(factorColumns.size())
                                    .arg(names.size())
                                    .arg(names.join(u", "_s)));
    } else if (factorColumns.size() > 1) {
        return badInput(io, u"--factor: given %1 times; a one-factor scheme reads one column (give a design file to fit "
                            "crossed factors)"_s.arg(factorColumns.size()));
    } else if (!p.isSet(u"summary"_s) && factorColumns.value(0).trimmed().isEmpty()) {
        return badInput(io, u"--factor: missing; name the data column (or give --summary for a summary table)"_s);
    }
    auto data = readData(p, *arguments, factorColumns);
    if (!data)
        return badInput(io, data.error());
    if (design && p.isSet(u"participant"_s)) { // a mixed design, or a design of within factors only
        auto mixed = fitMixedParticipants(*design, *data, arguments->fit, arguments->mapping);
        if (!mixed)
            return badInput(io, data->source + u": "_s + mixed.error());
        std::optional<ItemAnalysis> items;
        if (p.isSet(u"item"_s)) {
            auto byItem = fitItems(*design, *data, mixed->overall, arguments->fit, arguments->mapping);
            if (!byItem)
                return badInput(io, data->source + u": "_s + byItem.error());
            items = byItem.take();
        }
        if (p.isSet(u"json"_s)) {
            QJsonObject o = mixedFitToJson(*mixed, *data);
            if (items)
                addItemAnalysisToJson(o, *items);
            io.out << QString::fromUtf8(QJsonDocument(o).toJson(QJsonDocument::Indented));
        } else {
            io.out << fitReport(analyzeDesign(*design).cellScheme, true, *data, mixed->overall);
            if (items)
                io.out << itemReport(mixed->overall, *items);
        }
        return kExitOk;
    }
    // A design is fitted over the cells that have data (refused, with the reason, when its terms
    // cannot be estimated from them); a one-factor scheme as it stands.
    Result<DesignFit> fit = design ? fitDesign(*design, *data, arguments->fit, arguments->mapping)
                                   : Result<DesignFit>::failure(QString());
    if (!design) {
        auto one = p.isSet(u"participant"_s) ? fitParticipants(study->activeScheme(), *data, arguments->fit, arguments->mapping)
                                             : fitScheme(study->activeScheme(), *data, arguments->fit, arguments->mapping);
        fit = one ? Result<DesignFit>(DesignFit{one.take(), {}}) : Result<DesignFit>::failure(one.error());
    }
    if (!fit) // named by the data it could not fit
        return badInput(io, data->source + u": "_s + fit.error());
    const Scheme &scheme = design ? fit->design.cellScheme : study->activeScheme();
    std::optional<ItemAnalysis> items;
    if (p.isSet(u"item"_s)) {
        auto byItem = fitItems(scheme, *data, fit->fit, arguments->fit, arguments->mapping);
        if (!byItem)
            return badInput(io, data->source + u": "_s + byItem.error());
        items = byItem.take();
    }
    if (p.isSet(u"json"_s)) {
        QJsonObject o = fitResultToJson(fit->fit, *data);
        const QJsonObject empty = emptyCellsToJson(fit->design.empty);
        for (auto it = empty.constBegin(); it != empty.constEnd(); ++it)
            o[it.key()] = it.value();
        if (!fit->design.emptyCells.isEmpty())
            o[u"empty_cells"_s] = QJsonArray::fromStringList(fit->design.emptyCells);
        if (items)
            addItemAnalysisToJson(o, *items);
        io.out << QString::fromUtf8(QJsonDocument(o).toJson(QJsonDocument::Indented));
    } else {
        io.out << fitReport(scheme, design.has_value(), *data, fit->fit);
        if (items)
            io.out << itemReport(fit->fit, *items);
    }
    return kExitOk;
}

} // namespace cb::cli
