// The compare subcommand: one factor (or design) under two codings side by side.
#include "app/cli/Commands.h"
#include "core/files/StudyFile.h"
#include "app/cli/SchemeArguments.h"

#include "core/analysis/Compare.h"
#include "core/report/AnalysisReport.h"

#include <QCommandLineParser>

using namespace Qt::StringLiterals;

namespace cb::cli {

namespace {

int badInput(Io &io, const QString &message)
{
    return cli::badInput(io, u"compare"_s, message);
}

// The second coding: a standard scheme (--with and its options) or a study file (--with-file).
Result<Study> secondStudy(const QCommandLineParser &p, const Study &first)
{
    using R = Result<Study>;
    if (p.isSet(u"with"_s) == p.isSet(u"with-file"_s))
        return R::failure(u"give either --with SCHEME or --with-file FILE for the second coding"_s);
    if (p.isSet(u"with-file"_s)) {
        for (const char16_t *opt : {u"with-reference", u"with-spacing", u"with-integer"})
            if (p.isSet(QString::fromUtf16(opt)))
                return R::failure(u"--%1 cannot be combined with --with-file"_s.arg(QString::fromUtf16(opt)));
        return loadStudy(p.value(u"with-file"_s));
    }
    const Factor &f = first.activeScheme().factor;
    const auto choice = schemeChoiceFromOptions(p, f.levels, {u"with"_s, u"with-reference"_s, u"with-integer"_s, QString()});
    if (!choice)
        return R::failure(choice.error());
    std::optional<std::vector<Weight>> spacing;
    if (p.isSet(u"with-spacing"_s)) {
        if (p.value(u"with-spacing"_s).trimmed().compare(u"equal"_s, Qt::CaseInsensitive) == 0) {
            spacing = std::vector<Weight>{};
        } else {
            auto sp = parseSpacing(splitList(p.value(u"with-spacing"_s)), f.levelCount(), u"--with-spacing"_s);
            if (!sp)
                return R::failure(sp.error());
            spacing = sp.take();
        }
    }
    auto recoded = recodedStudy(first, choice->kind, choice->options, spacing);
    if (!recoded)
        return R::failure(u"--with: "_s + recoded.error());
    return recoded;
}

} // namespace

int runCompare(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addSchemeOptions(p);
    p.addOption({u"with"_s, u"The second coding: a standard scheme for the same factor (in a design, the factor the file makes active): %1."_s
                                .arg(schemeIdList()),
                 u"NAME"_s});
    p.addOption({u"with-reference"_s, u"Reference or base level of the second coding."_s, u"LEVEL"_s});
    p.addOption({u"with-spacing"_s, u"Level positions for the second coding's polynomial trends, or 'equal' for 1, 2, ..., k."_s, u"x,y,z"_s});
    p.addOption({u"with-integer"_s, u"The second coding's polynomial trends as smallest integers."_s});
    p.addOption({u"with-file"_s, u"The second coding from a scheme or design file with the same levels (or cells)."_s, u"other.json"_s});
    if (const auto done = parseOrHelp(p, u"compare"_s, args, io))
        return *done;
    auto first = studyFromOptions(p);
    if (!first)
        return badInput(io, first.error());
    auto second = secondStudy(p, first.value());
    if (!second)
        return badInput(io, second.error());
    auto comparison = compareStudies(first.value(), second.value());
    if (!comparison)
        return badInput(io, comparison.error());
    io.out << comparisonReport(comparison.value());
    return kExitOk;
}

} // namespace cb::cli
