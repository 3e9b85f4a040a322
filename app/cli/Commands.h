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

// Each subcommand gets its arguments without the program name and the
// subcommand word, e.g. {"--levels", "a,b,c", "--json"}.
int runAnalyze(const QStringList &args, Io &io);
int runDesign(const QStringList &args, Io &io);
int runExport(const QStringList &args, Io &io);
int runFit(const QStringList &args, Io &io);
int runPower(const QStringList &args, Io &io);

} // namespace cb::cli
