// contrast-bench-cli: the command line of Contrast Bench.
#include "app/cli/Commands.h"
#include "core/base/Version.h"

#include <QCoreApplication>
#ifdef CB_SHEET_PDF
#include <QGuiApplication>
#endif
#include <QTextStream>

#include <cstdio>
#include <memory>

using namespace Qt::StringLiterals;
using namespace cb::cli;

namespace {

struct Subcommand
{
    const char16_t *name;
    int (*run)(const QStringList &, Io &);
    const char16_t *summary;
};

// The dispatch table: one line per subcommand.
const Subcommand kSubcommands[] = {
    {u"analyze", runAnalyze, u"what a coding implies: hypotheses, sums, orthogonality, collinearity"},
    {u"compare", runCompare, u"one factor or design under two codings side by side: what each coefficient tests"},
    {u"design", runDesign, u"the coding that tests given hypotheses (weights on level means)"},
    {u"export", runExport, u"the coding or hypothesis matrix as CSV, C++, R, Python, Julia, MATLAB, LaTeX or Markdown"},
    {u"fit", runFit, u"fit a coding to a data file; estimates beside the comparisons they should be"},
    {u"power", runPower, u"power and sample size for each planned contrast and the omnibus F-test"},
    {u"sheet", runSheet, u"the study sheet for the record: HTML (self-contained) or PDF"},
};

void usage(QTextStream &s)
{
    s << "Usage: contrast-bench-cli COMMAND [options]\n\nCommands:\n";
    for (const Subcommand &c : kSubcommands)
        s << "  " << QString::fromUtf16(c.name).leftJustified(10) << QString::fromUtf16(c.summary) << '\n';
    s << "\nOptions:\n  -h, --help  show this help\n  --version   show the program's version\n"
      << "\nRun 'contrast-bench-cli COMMAND --help' for the options of a command.\n";
}

} // namespace

int main(int argc, char **argv)
{
    // A PDF sheet is drawn with Qt Gui: that one command gets a GUI application on the offscreen
    // platform, so it needs no display; every other command stays a core application.
    std::unique_ptr<QCoreApplication> application;
#ifdef CB_SHEET_PDF
    QStringList raw;
    for (int i = 1; i < argc; ++i)
        raw << QString::fromLocal8Bit(argv[i]);
    if (raw.value(0) == u"sheet"_s && sheetWritesPdf(raw.mid(1))) {
        qputenv("QT_QPA_PLATFORM", "offscreen");
        application = std::make_unique<QGuiApplication>(argc, argv);
    }
#endif
    if (!application)
        application = std::make_unique<QCoreApplication>(argc, argv);
    QCoreApplication::setApplicationName(u"contrast-bench-cli"_s);
    QCoreApplication::setApplicationVersion(QString::fromUtf16(cb::kVersion));
    QTextStream out(stdout);
    QTextStream err(stderr);
    Io io{out, err};
    QStringList args = QCoreApplication::arguments().mid(1);
    if (args.isEmpty() || args[0] == u"--help"_s || args[0] == u"-h"_s) {
        usage(args.isEmpty() ? err : out);
        return args.isEmpty() ? kExitBadInput : kExitOk;
    }
    if (args[0] == u"--version"_s) {
        out << "contrast-bench-cli " << QCoreApplication::applicationVersion() << '\n';
        return kExitOk;
    }
    const QString command = args.takeFirst();
    for (const Subcommand &c : kSubcommands)
        if (command == QString::fromUtf16(c.name))
            return c.run(args, io);
    err << "contrast-bench-cli: unknown command '" << command << "'\n\n";
    usage(err);
    return kExitBadInput;
}
