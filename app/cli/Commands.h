#pragma once

#include <QStringList>
#include <QTextStream>

namespace cb::cli {

// Exit codes of contrast-bench-cli.
inline constexpr int kExitOk = 0;
inline constexpr int kExitFailure = 1;  // the work could not be done (e.g. a file could not be written)
inline constexpr int kExitBadInput = 2; // bad arguments or input; a message on stderr names it

struct Io
{
    QTextStream &out;
    QTextStream &err;
};

// Writes "contrast-bench-cli COMMAND: message" to stderr and returns kExitBadInput.
inline int badInput(Io &io, const QString &command, const QString &message)
{
    io.err << "contrast-bench-cli " << command << ": " << message << '\n';
    return kExitBadInput;
}

// Each subcommand gets its arguments without the program name and the
// subcommand word, e.g. {"--levels", "a,b,c", "--json"}.
int runAnalyze(const QStringList &args, Io &io);
int runCompare(const QStringList &args, Io &io);
int runDesign(const QStringList &args, Io &io);
int runExport(const QStringList &args, Io &io);
int runFit(const QStringList &args, Io &io);
int runPower(const QStringList &args, Io &io);
int runSheet(const QStringList &args, Io &io);
// Whether the sheet command's arguments ask for a PDF (which needs Qt Gui, offscreen).
bool sheetWritesPdf(const QStringList &args);

} // namespace cb::cli
