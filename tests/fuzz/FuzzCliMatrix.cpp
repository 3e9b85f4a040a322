// Fuzz target: the command line's matrix arguments (--levels, --columns,
// --hypotheses, --intercept-row, --n, --spacing, --scheme, --reference) through
// the analyze, design and power subcommands' own parsing, then their output.
// Input: lines; the first holds flags (d: design subcommand, p: power subcommand,
// j: --json, i: --no-intercept, g: --integer, w: --poly-weighted, o: --one-sided),
// the next ones the values of
//   analyze: --levels, --columns, --n, --spacing, --scheme, --reference
//   design:  --levels, --hypotheses, --n, (unused x3), --intercept-row
//   power:   --levels, --columns, --n, --means, --scheme, --sd, --alpha, --target, --adjust
// (an empty line leaves the option out).
#include "tests/fuzz/FuzzChecks.h"

#include "app/cli/Commands.h"

#include "core/model/Factor.h"

#include <QTextStream>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

constexpr int kMaxFuzzLevels = 48;

} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t *data, std::size_t size)
{
    const QStringList lines = fuzz::textOf(data, size).split(u'\n');
    auto line = [&](int i) { return i < lines.size() ? lines[i] : QString(); };
    const QString flags = line(0);
    const bool design = flags.contains(u'd');
    const bool power = !design && flags.contains(u'p');
    if (splitList(line(1)).size() > kMaxFuzzLevels)
        return 0;

    QStringList args;
    auto option = [&](const QString &name, int i) {
        if (i < lines.size() && !lines[i].isEmpty())
            args << name << lines[i];
    };
    option(u"--levels"_s, 1);
    option(design ? u"--hypotheses"_s : u"--columns"_s, 2);
    option(u"--n"_s, 3);
    if (design) {
        option(u"--intercept-row"_s, 7);
    } else if (power) {
        option(u"--means"_s, 4);
        option(u"--scheme"_s, 5);
        option(u"--sd"_s, 6);
        option(u"--alpha"_s, 7);
        option(u"--target"_s, 8);
        option(u"--adjust"_s, 9);
        if (flags.contains(u'o'))
            args << u"--one-sided"_s;
    } else {
        option(u"--spacing"_s, 4);
        option(u"--scheme"_s, 5);
        option(u"--reference"_s, 6);
        if (flags.contains(u'g'))
            args << u"--integer"_s;
        if (flags.contains(u'w'))
            args << u"--poly-weighted"_s;
    }
    if (flags.contains(u'i'))
        args << u"--no-intercept"_s;
    const bool json = flags.contains(u'j');
    if (json)
        args << u"--json"_s;

    QString out, err;
    QTextStream os(&out), es(&err);
    cli::Io io{os, es};
    const int code = design ? cli::runDesign(args, io) : power ? cli::runPower(args, io) : cli::runAnalyze(args, io);
    os.flush();
    es.flush();
    fuzz::require(code == cli::kExitOk || code == cli::kExitBadInput ? QString() : u"exit code %1"_s.arg(code), "exit code");
    fuzz::require(code == cli::kExitOk || !err.isEmpty() ? QString() : u"bad input without a message"_s, "message");
    if (code == cli::kExitOk && !lines.join(u' ').contains(u"nan"_s, Qt::CaseInsensitive)
        && !lines.join(u' ').contains(u"inf"_s, Qt::CaseInsensitive))
        fuzz::require(fuzz::checkNoNonFiniteNumber(out, json), "output");
    return 0;
}
