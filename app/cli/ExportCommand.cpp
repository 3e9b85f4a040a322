// The export subcommand: a scheme's coding or hypothesis matrix as CSV, code or a table.
#include "app/cli/Commands.h"
#include "app/cli/SchemeArguments.h"
#include "app/cli/SummaryQueryArguments.h"

#include "core/analysis/Analysis.h"
#include "core/data/SummaryQuery.h"
#include "core/export/Export.h"
#include "core/files/SchemeFile.h"

#include <QCommandLineParser>

using namespace Qt::StringLiterals;

namespace cb::cli {

namespace {

int exportError(Io &io, int code, const QString &message)
{
    io.err << "contrast-bench-cli export: " << message << '\n';
    return code;
}

// Not a matrix: the SQL that summarises a table per level (core/data/SummaryQuery.h).
const QString kSummaryQueryFormat = u"sql-summary"_s;

QString formatIds()
{
    QStringList ids;
    for (ExportFormat f : exportFormats())
        ids.append(exportFormatId(f));
    ids.append(kSummaryQueryFormat);
    return ids.join(u", "_s);
}

bool asksForSummaryQuery(const QStringList &args)
{
    for (qsizetype i = 0; i < args.size(); ++i)
        if ((args[i] == u"--format"_s && args.value(i + 1) == kSummaryQueryFormat)
            || args[i] == u"--format="_s + kSummaryQueryFormat)
            return true;
    return false;
}

int writeText(const QCommandLineParser &p, Io &io, const QString &text)
{
    if (!p.isSet(u"output"_s)) {
        io.out << text;
        io.out.flush();
        return kExitOk;
    }
    if (p.value(u"output"_s).isEmpty())
        return exportError(io, kExitBadInput, u"-o: empty file name"_s);
    if (QString e = writeFileAtomically(p.value(u"output"_s), text.toUtf8()); !e.isEmpty())
        return exportError(io, kExitFailure, e);
    return kExitOk;
}

void addOutputOption(QCommandLineParser &p)
{
    p.addOption({{u"o"_s, u"output"_s}, u"Write to this file (replaced atomically) instead of standard output."_s, u"FILE"_s});
}

// export --format sql-summary: the query that returns the summary table fit --summary reads.
// Here --factor names the table's column (and a design file's factors give the default).
int runExportSummaryQuery(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addSchemeOptions(p, SchemeOptionSet::WithoutFactorName);
    p.addOption({u"format"_s, u"Output format: %1."_s.arg(formatIds()), u"FORMAT"_s});
    p.addOption({u"factor"_s, u"The column that holds the levels; once per factor of a design file, in its order "
                             "(default: columns named as the design's factors)."_s,
                 u"COL"_s});
    p.addOption({u"response"_s, u"The column that holds the measurements."_s, u"COL"_s});
    p.addOption({u"weight"_s, u"A column of case weights (a row of weight w counts as w rows)."_s, u"COL"_s});
    addSummaryQueryOptions(p);
    addOutputOption(p);
    if (const auto done = parseOrHelp(p, u"export"_s, args, io))
        return *done;
    QStringList factorColumns = p.values(u"factor"_s);
    if (p.isSet(u"file"_s) || p.isSet(u"levels"_s)) { // a scheme or design checks the factors' count
        std::optional<Design> design;
        auto scheme = schemeOrCellsFromOptions(p, u"the summary query"_s, &design);
        if (!scheme)
            return exportError(io, kExitBadInput, scheme.error());
        const qsizetype factors = design ? qsizetype(design->factors.size()) : 1;
        if (design && factorColumns.isEmpty())
            for (const Scheme &f : design->factors)
                factorColumns << f.factor.name;
        if (factorColumns.size() != factors)
            return exportError(io, kExitBadInput, u"--factor: given %1 times for %2 factor(s); give it once per factor"_s
                                                      .arg(factorColumns.size())
                                                      .arg(factors));
    }
    auto spec = summaryQuerySpec(p, factorColumns);
    if (!spec)
        return exportError(io, kExitBadInput, spec.error());
    auto query = summaryQuery(*spec);
    if (!query)
        return exportError(io, kExitBadInput, query.error());
    return writeText(p, io, query->sql + u";\n"_s);
}


int runMatrixExport(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addSchemeOptions(p);
    p.addOption({u"format"_s, u"Output format: %1."_s.arg(formatIds()), u"FORMAT"_s});
    p.addOption({u"matrix"_s, u"Which matrix: coding (levels x columns, the default) or hypotheses (coefficients x level means)."_s,
                 u"coding|hypotheses"_s, u"coding"_s});
    p.addOption({u"exact"_s, u"Write exact weights as fractions (-2/3) instead of decimals."_s});
    p.addOption({u"variable"_s, u"Variable name in code formats (made into a safe identifier)."_s, u"NAME"_s});
    addOutputOption(p);
    if (const auto done = parseOrHelp(p, u"export"_s, args, io))
        return *done;
    if (!p.isSet(u"format"_s))
        return exportError(io, kExitBadInput, u"--format: missing; expected one of %1"_s.arg(formatIds()));
    const auto format = exportFormatFromId(p.value(u"format"_s));
    if (!format)
        return exportError(io, kExitBadInput,
                           u"--format: unknown format %1; expected one of %2"_s.arg(quoted(p.value(u"format"_s)), formatIds()));
    const QString matrix = p.value(u"matrix"_s);
    if (matrix != u"coding"_s && matrix != u"hypotheses"_s)
        return exportError(io, kExitBadInput, u"--matrix: unknown matrix %1; expected coding or hypotheses"_s.arg(quoted(matrix)));
    if (p.isSet(u"output"_s) && p.value(u"output"_s).isEmpty())
        return exportError(io, kExitBadInput, u"-o: empty file name"_s);

    // A design file is exported over its cells (one row per cell, the first factor varying slowest).
    auto scheme = schemeOrCellsFromOptions(p, u"the export"_s);
    if (!scheme)
        return exportError(io, kExitBadInput, scheme.error());
    auto table = matrix == u"coding"_s ? codingTable(*scheme) : hypothesisTable(analyze(*scheme));
    if (!table)
        return exportError(io, kExitBadInput, u"--matrix %1: "_s.arg(matrix) + table.error());

    ExportOptions options;
    options.exact = p.isSet(u"exact"_s);
    options.variableName = p.value(u"variable"_s);
    auto text = exportTable(*table, *format, options);
    if (!text)
        return exportError(io, kExitBadInput, text.error()); // what the input made cannot be written

    return writeText(p, io, *text);
}

} // namespace

int runExport(const QStringList &args, Io &io)
{
    if (asksForSummaryQuery(args))
        return runExportSummaryQuery(args, io);
    return runMatrixExport(args, io);
}

} // namespace cb::cli
