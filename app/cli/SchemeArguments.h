#pragma once

#include "app/cli/Commands.h"
#include "core/model/Design.h"
#include "core/files/StudyFile.h"
#include "core/base/Result.h"
#include "core/model/Scheme.h"
#include "core/model/Study.h"

#include <QCommandLineParser>

#include <optional>

namespace cb::cli {

// Options shared by every subcommand that works on one scheme:
// --file, --levels, --scheme, --reference, --spacing, --n, --columns, --no-intercept,
// --poly-form, --poly-weighted.
enum class SchemeOptionSet { All, WithoutFactorName };
void addSchemeOptions(QCommandLineParser &parser, SchemeOptionSet set = SchemeOptionSet::All);
// The study the options describe: the file's (--file, read by loadStudy exactly as the window
// reads it) or one factor from --levels; --no-intercept applied. The message names the argument
// (or the file's field) and what was wrong.
Result<Study> studyFromOptions(const QCommandLineParser &parser);
// One factor from --levels with --scheme or --columns.
Result<Scheme> schemeFromOptions(const QCommandLineParser &parser);

// The study's scheme or, for a design, the equivalent one-factor scheme over its cells (the cells
// as levels, the first factor varying slowest; the design's columns; the cell n as planned sizes).
// With empty cells it is the scheme the window uses too (analyzeDesign's cellScheme): over the
// cells with observations, when the terms can be estimated from them; otherwise refused with the
// reason. A design with a factor measured within participants needs every cell: `what` ("power")
// names who needs them. design, when given, receives the design (empty for a one-factor scheme).
Result<Scheme> schemeOrCellsFromOptions(const QCommandLineParser &parser, const QString &what,
                                        std::optional<Design> *design = nullptr);

// The options that choose a standard scheme and its options: --scheme, --reference, --integer,
// --poly-weighted for a study's coding; compare's second coding uses --with, --with-reference,
// --with-integer (an empty name: no such option).
struct SchemeChoiceNames
{
    QString scheme = QStringLiteral("scheme");
    QString reference = QStringLiteral("reference");
    QString integer = QStringLiteral("integer");
    QString weighted = QStringLiteral("poly-weighted");
};
struct SchemeChoice
{
    SchemeKind kind = SchemeKind::Custom;
    SchemeOptions options;
};
Result<SchemeChoice> schemeChoiceFromOptions(const QCommandLineParser &parser, const QStringList &levels,
                                             const SchemeChoiceNames &names = {});

// The factor alone: --levels, --factor (unless left out), --n.
void addFactorOptions(QCommandLineParser &parser, SchemeOptionSet set = SchemeOptionSet::All);
Result<Factor> factorFromOptions(const QCommandLineParser &parser);
// One row of k weights from "w, w, w"; where names the argument ("--columns: column 2").
Result<std::vector<Weight>> weightRowFromText(const QString &text, const Factor &factor, const QString &where);

// Parses a subcommand's args (without program name and subcommand word) into parser, with
// --help added. Returns the exit code when that already ends the command: a bad argument
// (kExitBadInput, "contrast-bench-cli COMMAND: message" on stderr) or --help (its text
// printed, kExitOk); nothing when the command goes on. Every subcommand starts with it.
std::optional<int> parseOrHelp(QCommandLineParser &parser, const QString &command, const QStringList &args, Io &io);

} // namespace cb::cli
