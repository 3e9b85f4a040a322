// The export subcommand: a scheme's coding or hypothesis matrix as CSV, code or a table.
#include "app/cli/Commands.h"
#include "app/cli/SchemeArguments.h"

#include "core/analysis/Analysis.h"
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

QString formatIds()
{
    QStringList ids;
    for (ExportFormat f : exportFormats())
        ids.append(exportFormatId(f));
    return ids.join(u", "_s);
}

} // namespace

int runExport(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addSchemeOptions(p);
    p.addOption({u"format"_s, u"Output format: %1."_s.arg(formatIds()), u"FORMAT"_s});
    p.addOption({u"matrix"_s, u"Which matrix: coding (levels x columns, the default) or hypotheses (coefficients x level means)."_s,
                 u"coding|hypotheses"_s, u"coding"_s});
    p.addOption({u"exact"_s, u"Write exact weights as fractions (-2/3) instead of decimals."_s});
    p.addOption({u"variable"_s, u"Variable name in code formats (made into a safe identifier)."_s, u"NAME"_s});
    p.addOption({{u"o"_s, u"output"_s}, u"Write to this file (replaced atomically) instead of standard output."_s, u"FILE"_s});
    if (QString e = parseArguments(p, u"export"_s, args); !e.isEmpty())
        return exportError(io, kExitBadInput, e);
    if (p.isSet(u"help"_s)) {
        io.out << p.helpText();
        return kExitOk;
    }
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

    if (!p.isSet(u"output"_s)) {
        io.out << *text;
        io.out.flush();
        return kExitOk;
    }
    if (QString e = writeFileAtomically(p.value(u"output"_s), text->toUtf8()); !e.isEmpty())
        return exportError(io, kExitFailure, e);
    return kExitOk;
}

} // namespace cb::cli
