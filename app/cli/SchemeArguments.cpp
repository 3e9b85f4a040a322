#include "app/cli/SchemeArguments.h"

#include "core/files/StudyFile.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/analysis/Settled.h"
#include "core/base/Limits.h"

#include "core/files/SchemeFile.h"
#include "core/model/SchemeEdits.h"
#include "core/power/MixedPower.h"
#include "core/files/InputFile.h"

using namespace Qt::StringLiterals;

namespace cb::cli {

void addFactorOptions(QCommandLineParser &p, SchemeOptionSet set)
{
    p.addOption({u"levels"_s, u"Level names, in order, separated by commas (%1 to %2 levels)."_s.arg(kMinLevels).arg(kMaxLevels),
                 u"a,b,c"_s});
    if (set == SchemeOptionSet::All)
        p.addOption({u"factor"_s, u"The factor's name (with --levels)."_s, u"name"_s});
    p.addOption({u"n"_s, u"Planned group size of each level; with --within, the number of participants (one number)."_s,
                 u"n1,n2,n3"_s});
    p.addOption({u"within"_s, u"The factor is measured within participants: every participant gives a value at every level "
                              u"(repeated measures). Without it, each level is a separate group."_s});
}

Result<Factor> factorFromOptions(const QCommandLineParser &p)
{
    using R = Result<Factor>;
    Factor f;
    f.name = p.value(u"factor"_s); // defined by the scheme options or, for fit, as the data column
    f.levels = splitList(p.value(u"levels"_s));
    if (QString e = f.validate(); !e.isEmpty())
        return R::failure(u"--"_s + e);
    if (p.isSet(u"within"_s))
        f.measure = Measure::Within;
    if (p.isSet(u"n"_s)) {
        QStringList items = splitList(p.value(u"n"_s));
        if (f.isWithin() && items.size() == 1) // one number of participants, at every level
            items = QStringList(f.levelCount(), items.front());
        auto n = parseSizes(items, f.levelCount(), u"--n"_s);
        if (!n)
            return R::failure(n.error());
        f.plannedN = n.take();
    }
    return R(std::move(f));
}

Result<std::vector<Weight>> weightRowFromText(const QString &text, const Factor &f, const QString &where)
{
    using R = Result<std::vector<Weight>>;
    const QStringList items = splitList(text);
    if (items.size() != f.levelCount())
        return R::failure(u"%1 has %2 weights for %3 levels; give one per level"_s.arg(where).arg(items.size()).arg(f.levelCount()));
    std::vector<Weight> row;
    for (qsizetype i = 0; i < items.size(); ++i) {
        auto w = parseWeight(items[i]);
        if (!w)
            return R::failure(u"%1, level %2 (%3): %4"_s.arg(where).arg(i + 1).arg(quoted(f.levels[i]), w.error()));
        row.push_back(*w);
    }
    return R(std::move(row));
}

void addSchemeOptions(QCommandLineParser &p, SchemeOptionSet set)
{
    p.addOption({u"file"_s,
                 u"Read the scheme from a scheme file (JSON): at most %1 levels per factor, and at most %2 cells "
                 "(the product of the level counts) in a design."_s.arg(kMaxLevels).arg(kMaxCells),
                 u"scheme.json"_s});
    addFactorOptions(p, set);
    p.addOption({u"scheme"_s, u"A standard scheme: %1."_s.arg(schemeIdList()), u"NAME"_s});
    p.addOption({u"reference"_s, u"Reference level (treatment, simple) or base level coded -1 (sum, weighted-effect)."_s, u"LEVEL"_s});
    p.addOption({u"spacing"_s, u"Numeric position of each level, for polynomial trends."_s, u"x,y,z"_s});
    p.addOption({u"columns"_s, u"Custom weights: one group of k weights per column, groups separated by ';'."_s, u"w,w,w;w,w,w"_s});
    p.addOption({u"no-intercept"_s, u"Fit without an intercept."_s});
    p.addOption({u"integer"_s, u"Polynomial trends as smallest integers instead of orthonormal columns."_s});
    p.addOption({u"poly-weighted"_s, u"Polynomial trends orthogonal under the planned n."_s});
}

std::optional<int> parseOrHelp(QCommandLineParser &p, const QString &command, const QStringList &args, Io &io)
{
    p.setApplicationDescription(u"contrast-bench-cli %1"_s.arg(command));
    p.addHelpOption();
    if (!p.parse(QStringList{u"contrast-bench-cli %1"_s.arg(command)} + args))
        return badInput(io, command, p.errorText());
    if (!p.positionalArguments().isEmpty())
        return badInput(io, command, u"unexpected argument %1"_s.arg(quoted(p.positionalArguments().first())));
    if (p.isSet(u"help"_s)) {
        io.out << p.helpText();
        return kExitOk;
    }
    return std::nullopt;
}

Result<Study> studyFromOptions(const QCommandLineParser &p)
{
    using R = Result<Study>;
    if (p.isSet(u"file"_s) == p.isSet(u"levels"_s))
        return R::failure(u"give either --file or --levels (with --scheme or --columns)"_s);
    if (!p.isSet(u"file"_s)) {
        auto scheme = schemeFromOptions(p);
        if (!scheme)
            return R::failure(scheme.error());
        return R(studyOf(scheme.take()));
    }
    for (const char16_t *opt : {u"scheme", u"columns", u"reference", u"spacing", u"n"})
        if (p.isSet(QString::fromUtf16(opt)))
            return R::failure(u"--%1 cannot be combined with --file; edit the scheme file instead"_s.arg(QString::fromUtf16(opt)));
    // The window's own reader: the same study, coded and settled the same way.
    auto loaded = loadStudy(p.value(u"file"_s));
    if (!loaded)
        return loaded;
    Study study = loaded.take();
    if (p.isSet(u"within"_s)) {
        if (study.isDesign())
            return R::failure(u"--within: %1 is a design; each of its factors says in the file whether it is measured "
                              u"within participants (\"measured\": \"within\")"_s.arg(inputLabel(p.value(u"file"_s))));
        auto within = edits::withMeasure(study.activeScheme(), Measure::Within);
        if (!within)
            return R::failure(u"--within: %1: %2"_s.arg(inputLabel(p.value(u"file"_s)), within.error()));
        study = settled(withActiveScheme(study, within.take()));
    }
    if (!p.isSet(u"no-intercept"_s))
        return R(std::move(study));
    return R(settled(withActiveScheme(study, edits::withIntercept(study.activeScheme(), false))));
}

Result<Scheme> schemeOrCellsFromOptions(const QCommandLineParser &p, const QString &what, std::optional<Design> *designOut)
{
    auto study = studyFromOptions(p);
    if (!study)
        return Result<Scheme>::failure(study.error());
    if (!study->isDesign())
        return Result<Scheme>(study->activeScheme());
    const Design &d = study->design;
    if (designOut)
        *designOut = d;
    const auto empty = std::find(d.cellN.begin(), d.cellN.end(), Rational(0));
    if (empty == d.cellN.end())
        return cellScheme(d);
    if (hasWithinFactor(d))
        return Result<Scheme>::failure(u"%1: cell %2 is empty (cell_n 0); with a factor measured within participants %3 needs "
                                       u"every cell, since each participant gives a value in every within cell"_s
                                           .arg(inputLabel(p.value(u"file"_s)), quoted(d.cellNames()[qsizetype(empty - d.cellN.begin())]), what));
    DesignAnalysis analysed = analyzeDesign(d);
    if (analysed.refused())
        return Result<Scheme>::failure(u"%1: %2"_s.arg(inputLabel(p.value(u"file"_s)), analysed.empty.refusal));
    return Result<Scheme>(std::move(analysed.cellScheme));
}

Result<SchemeChoice> schemeChoiceFromOptions(const QCommandLineParser &p, const QStringList &levels, const SchemeChoiceNames &names)
{
    using R = Result<SchemeChoice>;
    SchemeChoice c;
    const auto kind = schemeFromId(p.value(names.scheme));
    if (!kind || *kind == SchemeKind::Custom)
        return R::failure(u"--%1: unknown scheme %2; expected one of %3"_s.arg(names.scheme, quoted(p.value(names.scheme)), schemeIdList()));
    c.kind = *kind;
    if (p.isSet(names.reference)) {
        if (!schemeUsesReference(*kind))
            return R::failure(u"--%1: the %2 scheme has no reference level"_s.arg(names.reference, schemeId(*kind)));
        c.options.reference = int(levels.indexOf(p.value(names.reference)));
        if (c.options.reference < 0)
            return R::failure(u"--%1: %2 is not one of the levels (%3)"_s.arg(names.reference, quoted(p.value(names.reference)),
                                                                              shortenedInput(levels.join(u", "_s))));
    }
    if (p.isSet(names.integer))
        c.options.polynomialForm = PolynomialForm::Integer;
    c.options.polynomialWeighted = !names.weighted.isEmpty() && p.isSet(names.weighted);
    return R(std::move(c));
}

Result<Scheme> schemeFromOptions(const QCommandLineParser &p)
{
    using R = Result<Scheme>;
    if (p.isSet(u"file"_s) || !p.isSet(u"levels"_s))
        return R::failure(u"give --levels (with --scheme or --columns)"_s);
    Scheme s;
    auto factor = factorFromOptions(p);
    if (!factor)
        return R::failure(factor.error());
    Factor f = factor.take();
    if (p.isSet(u"spacing"_s)) {
        auto sp = parseSpacing(splitList(p.value(u"spacing"_s)), f.levelCount(), u"--spacing"_s);
        if (!sp)
            return R::failure(sp.error());
        f.spacing = sp.take();
    }
    if (QString e = f.validate(); !e.isEmpty())
        return R::failure(u"--"_s + e);

    const bool haveScheme = p.isSet(u"scheme"_s);
    const bool haveColumns = p.isSet(u"columns"_s);
    if (haveScheme == haveColumns)
        return R::failure(u"with --levels give either --scheme NAME or --columns \"w,w,w;w,w,w\""_s);
    if (haveScheme) {
        const auto choice = schemeChoiceFromOptions(p, f.levels);
        if (!choice)
            return R::failure(choice.error());
        auto made = makeScheme(f, choice->kind, choice->options);
        if (!made)
            return R::failure(u"--scheme: "_s + made.error());
        s = made.take();
    } else {
        s.factor = f;
        s.kind = SchemeKind::Custom;
        const QStringList groups = p.value(u"columns"_s).split(u';');
        for (qsizetype g = 0; g < groups.size(); ++g) {
            auto row = weightRowFromText(groups[g], f, u"--columns: column %1"_s.arg(g + 1));
            if (!row)
                return R::failure(row.error());
            s.columns.push_back(Column{u"c%1"_s.arg(g + 1), row.take()});
        }
    }
    if (p.isSet(u"no-intercept"_s))
        s.intercept = false;
    if (QString e = s.validate(); !e.isEmpty())
        return R::failure(u"--"_s + e);
    return R(std::move(s));
}

} // namespace cb::cli
