#pragma once

#include "Result.h"
#include "Scheme.h"

#include <QCommandLineParser>

namespace cb::cli {

// Options shared by every subcommand that works on one scheme:
// --file, --levels, --scheme, --reference, --spacing, --n, --columns, --no-intercept,
// --poly-form, --poly-weighted.
enum class SchemeOptionSet { All, WithoutFactorName };
void addSchemeOptions(QCommandLineParser &parser, SchemeOptionSet set = SchemeOptionSet::All);
// The scheme the options describe; the message names the argument and what was wrong.
Result<Scheme> schemeFromOptions(const QCommandLineParser &parser);

// Parses args (without program name and subcommand) into parser; on failure returns
// the message. Adds --help handling: returns an empty Result error with helpRequested.
QString parseArguments(QCommandLineParser &parser, const QString &command, const QStringList &args);

} // namespace cb::cli
