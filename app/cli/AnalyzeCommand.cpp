// The analyze and design subcommands.
#include "app/cli/Commands.h"
#include "core/analysis/DesignAnalysis.h"
#include "app/cli/SchemeArguments.h"

#include "core/analysis/Analysis.h"
#include "core/files/InputFile.h"
#include "core/report/AnalysisJson.h"
#include "core/report/AnalysisReport.h"
#include "core/model/Design.h"

#include <QFile>

#include <QCommandLineParser>
#include <QJsonDocument>

using namespace Qt::StringLiterals;

namespace cb::cli {

namespace {

int report(const Scheme &scheme, bool json, Io &io)
{
    const Analysis a = analyze(scheme);
    if (json)
        io.out << QString::fromUtf8(QJsonDocument(analysisToJson(scheme, a)).toJson(QJsonDocument::Indented));
    else
        io.out << analysisReport(scheme, a);
    return kExitOk;
}

} // namespace

int runAnalyze(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addSchemeOptions(p);
    p.addOption({u"json"_s, u"Print one JSON object instead of the report."_s});
    if (const auto done = parseOrHelp(p, u"analyze"_s, args, io))
        return *done;
    auto study = studyFromOptions(p);
    if (!study)
        return badInput(io, u"analyze"_s, study.error());
    if (!study->isDesign())
        return report(study->activeScheme(), p.isSet(u"json"_s), io);
    // A design of several crossed factors is analysed over its cells.
    const Design &design = study->design;
    const DesignAnalysis da = analyzeDesign(design);
    // Empty cells are analysed over the others; refused, with the reason, only when the terms
    // cannot be estimated from them.
    if (!da.empty.estimable)
        return badInput(io, u"analyze"_s, inputLabel(p.value(u"file"_s)) + u": "_s + da.empty.refusal);
    if (p.isSet(u"json"_s))
        io.out << QString::fromUtf8(QJsonDocument(designAnalysisToJson(design, da)).toJson(QJsonDocument::Indented));
    else
        io.out << designReport(design, da);
    return kExitOk;
}

int runDesign(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addFactorOptions(p);
    p.addOption({u"hypotheses"_s, u"One row of k weights on the level means per coefficient, rows separated by ';'."_s, u"h,h,h;h,h,h"_s});
    p.addOption({u"intercept-row"_s, u"The intercept's weights on the level means (default: the unweighted mean)."_s, u"h,h,h"_s});
    p.addOption({u"no-intercept"_s, u"No intercept: one row per coefficient, k rows for a full set."_s});
    p.addOption({u"json"_s, u"Print one JSON object instead of the report."_s});
    if (const auto done = parseOrHelp(p, u"design"_s, args, io))
        return *done;
    if (!p.isSet(u"levels"_s) || !p.isSet(u"hypotheses"_s))
        return badInput(io, u"design"_s, u"give --levels and --hypotheses"_s);
    auto factor = factorFromOptions(p);
    if (!factor)
        return badInput(io, u"design"_s, factor.error());
    const Factor f = factor.take();
    std::vector<std::vector<Weight>> rows;
    const QStringList groups = p.value(u"hypotheses"_s).split(u';');
    for (qsizetype g = 0; g < groups.size(); ++g) {
        auto row = weightRowFromText(groups[g], f, u"--hypotheses: row %1"_s.arg(g + 1));
        if (!row)
            return badInput(io, u"design"_s, row.error());
        rows.push_back(row.take());
    }
    std::optional<std::vector<Weight>> interceptRow;
    if (p.isSet(u"intercept-row"_s)) {
        auto row = weightRowFromText(p.value(u"intercept-row"_s), f, u"--intercept-row"_s);
        if (!row)
            return badInput(io, u"design"_s, row.error());
        interceptRow = row.take();
    }
    const bool intercept = !p.isSet(u"no-intercept"_s);
    auto cols = codingFromHypotheses(f, rows, intercept, interceptRow);
    if (!cols) // core names the rows ("hypotheses: row 1 ..."); the options are --hypotheses and --intercept-row
        return badInput(io, u"design"_s, (cols.error().startsWith(u"intercept:"_s) ? u"--intercept-row: "_s : u"--"_s) + cols.error());
    Scheme s;
    s.factor = f;
    s.kind = SchemeKind::Custom;
    s.intercept = intercept;
    s.columns = cols.take();
    return report(s, p.isSet(u"json"_s), io);
}

} // namespace cb::cli
