// The power subcommand: power and sample size for the planned contrasts of a scheme.
#include "app/cli/Commands.h"
#include "app/cli/SchemeArguments.h"

#include "core/analysis/Analysis.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/base/NumberText.h"
#include "core/files/InputFile.h"
#include "core/model/Design.h"
#include "core/power/MixedPower.h"
#include "core/power/PowerPlanSettings.h"
#include "core/power/Power.h"
#include "core/report/TextTable.h"

#include <QCommandLineParser>
#include <QJsonArray>
#include <QJsonDocument>

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb::cli {

namespace {

const QString kCommand = u"power"_s;

int badInput(Io &io, const QString &message)
{
    io.err << "contrast-bench-cli " << kCommand << ": " << message << '\n';
    return kExitBadInput;
}

void addPowerOptions(QCommandLineParser &p)
{
    p.addOption({u"means"_s, u"Expected mean of each level, in level order. Without --means or --differences, a --file saved "
                             u"with the window's Power tab inputs plans with them."_s,
                 u"m1,m2,..."_s});
    p.addOption({u"differences"_s, u"Instead of --means: expected difference of each other level from the baseline level."_s, u"d2,d3,..."_s});
    p.addOption({u"baseline"_s, u"The level --differences are measured from (default: the first level)."_s, u"LEVEL"_s});
    p.addOption({u"sd"_s, u"Expected common standard deviation within levels."_s, u"S"_s});
    p.addOption({u"sds"_s, u"Instead of --sd: expected SD of each level (Welch-Satterthwaite df)."_s, u"s1,s2,..."_s});
    p.addOption({u"ratios"_s, u"Allocation ratios, with --total (instead of --n)."_s, u"r1,r2,..."_s});
    p.addOption({u"total"_s, u"Total N, split by --ratios (equal groups without them)."_s, u"N"_s});
    p.addOption({u"alpha"_s, u"Family-wise alpha (default 0.05)."_s, u"A"_s, u"0.05"_s});
    p.addOption({u"one-sided"_s, u"One-sided tests of psi > 0, in the direction each contrast is written."_s});
    p.addOption({u"target"_s, u"Target power for the sample-size search (default 0.8)."_s, u"P"_s, u"0.8"_s});
    p.addOption({u"adjust"_s, u"Adjustment across the contrasts: %1 (default none)."_s.arg(adjustmentIdList(true)), u"METHOD"_s, u"none"_s});
    p.addOption({u"correlation"_s, u"With --within (or a within factor in --file): the expected correlation between a "
                                   u"participant's values at any two levels."_s,
                 u"R"_s});
    p.addOption({u"correlations"_s, u"Instead of --correlation: a file with the full correlation matrix of the levels, one row per "
                                    u"line, numbers separated by commas or spaces."_s,
                 u"FILE"_s});
    p.addOption({u"json"_s, u"Print one JSON object instead of the report."_s});
}

// One number from an option; where names the option.
Result<double> singleNumber(const QCommandLineParser &p, const QString &name)
{
    const QString where = u"--"_s + name;
    auto values = parseNumberList(p.value(name), where);
    if (!values)
        return Result<double>::failure(values.error());
    if (values->size() != 1)
        return Result<double>::failure(u"%1: give one number, got %2"_s.arg(where).arg(values->size()));
    return Result<double>(values->front());
}

// Fills the means from --means or --differences/--baseline.
QString readMeans(const QCommandLineParser &p, const QStringList &levels, PowerSettings &s)
{
    const bool haveMeans = p.isSet(u"means"_s);
    const bool haveDifferences = p.isSet(u"differences"_s);
    if (haveMeans == haveDifferences)
        return u"give the expected level means with --means, or differences from a baseline with --differences"_s;
    if (p.isSet(u"baseline"_s) && !haveDifferences)
        return u"--baseline: only used with --differences"_s;
    if (haveMeans) {
        auto means = parseNumberList(p.value(u"means"_s), u"--means"_s);
        if (!means)
            return means.error();
        s.means = means.take();
        return {};
    }
    int baseline = 0;
    if (p.isSet(u"baseline"_s)) {
        baseline = int(levels.indexOf(p.value(u"baseline"_s)));
        if (baseline < 0)
            return u"--baseline: %1 is not one of the levels (%2)"_s.arg(quoted(p.value(u"baseline"_s)), shortenedInput(levels.join(u", "_s)));
    }
    auto differences = parseNumberList(p.value(u"differences"_s), u"--differences"_s);
    if (!differences)
        return differences.error();
    if (differences->size() != size_t(levels.size() - 1))
        return u"--differences: %1 value(s) for %2 levels; give one for each level other than the baseline '%3' (%4)"_s
            .arg(differences->size())
            .arg(levels.size())
            .arg(levels[baseline])
            .arg(levels.size() - 1);
    s.means = meansFromDifferences(*differences, baseline);
    return {};
}

QString readSpread(const QCommandLineParser &p, PowerSettings &s)
{
    const bool haveSd = p.isSet(u"sd"_s);
    const bool haveSds = p.isSet(u"sds"_s);
    if (haveSd && haveSds)
        return u"--sd and --sds: give a common SD or one per level, not both"_s;
    if (!haveSd && !haveSds)
        return u"give the expected SD with --sd, or one per level with --sds"_s;
    if (haveSd) {
        auto sd = singleNumber(p, u"sd"_s);
        if (!sd)
            return sd.error();
        s.sd = *sd;
        return {};
    }
    auto sds = parseNumberList(p.value(u"sds"_s), u"--sds"_s);
    if (!sds)
        return sds.error();
    s.sds = sds.take();
    return {};
}

// Planned sizes: the scheme's (from --n or the file), or --ratios with --total.
QString readSizes(const QCommandLineParser &p, const Scheme &scheme, bool within, PowerSettings &s)
{
    const bool haveRatios = p.isSet(u"ratios"_s);
    const bool haveTotal = p.isSet(u"total"_s);
    if (scheme.factor.hasPlannedN()) {
        if (haveRatios || haveTotal)
            return u"--%1: the planned sizes are already given (--n or the scheme file); give sizes or ratios with a total, not both"_s
                .arg(haveRatios ? u"ratios"_s : u"total"_s);
        s.n = scheme.factor.sizesAsDouble();
        return {};
    }
    if (!haveTotal)
        return haveRatios            ? u"--ratios: give the total N with --total"_s
               : within ? u"give the number of participants with -n P (a mixed design: --total, split equally over the groups)"_s
                                          : u"give planned sizes per level with --n, or a total N with --total (and --ratios)"_s;
    auto total = singleNumber(p, u"total"_s);
    if (!total)
        return total.error();
    s.total = *total;
    if (haveRatios) {
        auto ratios = parseNumberList(p.value(u"ratios"_s), u"--ratios"_s);
        if (!ratios)
            return ratios.error();
        s.ratios = ratios.take();
    }
    return {};
}

// Within participants: the correlation between a participant's values, one or a matrix.
QString readCorrelation(const QCommandLineParser &p, bool within, PowerSettings &s)
{
    const bool haveOne = p.isSet(u"correlation"_s);
    const bool haveMatrix = p.isSet(u"correlations"_s);
    if (!within) {
        if (haveOne || haveMatrix)
            return u"--%1: a correlation is used only when the factor is measured within participants (--within, or "
                   u"\"measured\": \"within\" in the file)"_s.arg(haveOne ? u"correlation"_s : u"correlations"_s);
        return {};
    }
    s.measure = Measure::Within;
    if (haveOne == haveMatrix)
        return u"within participants, give the expected correlation between a participant's values at two levels with "
               u"--correlation, or the full matrix with --correlations FILE"_s;
    if (haveOne) {
        auto r = singleNumber(p, u"correlation"_s);
        if (!r)
            return r.error();
        s.correlation = *r;
        return {};
    }
    const QString path = p.value(u"correlations"_s);
    auto bytes = readInput(path);
    if (!bytes)
        return u"--correlations: "_s + bytes.error();
    auto matrix = parseCorrelationMatrix(QString::fromUtf8(*bytes), u"--correlations: "_s + inputLabel(path));
    if (!matrix)
        return matrix.error();
    s.correlations = matrix.take();
    return {};
}

// The test's settings from --alpha, --target, --adjust and --one-sided (their defaults when not
// given); with onlyGiven, the options not given leave `s` as it is (a study file's power plan).
QString readTest(const QCommandLineParser &p, PowerSettings &s, bool onlyGiven = false)
{
    const auto read = [&](const QString &name) { return !onlyGiven || p.isSet(name); };
    if (read(u"alpha"_s)) {
        auto alpha = singleNumber(p, u"alpha"_s);
        if (!alpha)
            return alpha.error();
        s.alpha = *alpha;
    }
    if (read(u"target"_s)) {
        auto target = singleNumber(p, u"target"_s);
        if (!target)
            return target.error();
        s.target = *target;
    }
    if (read(u"adjust"_s)) {
        const auto adjustment = adjustmentFromId(p.value(u"adjust"_s));
        if (!adjustment || !adjustsPower(*adjustment))
            return u"--adjust: unknown adjustment %1; expected %2 (Holm's step-down needs the observed p-values and is "
                   u"applied in the data check)"_s.arg(quoted(p.value(u"adjust"_s)), adjustmentIdList(true));
        s.adjustment = *adjustment;
    }
    if (read(u"one-sided"_s))
        s.oneSided = p.isSet(u"one-sided"_s);
    return {};
}

// A study file that holds the window's power inputs ("power", core/model/PowerPlan.h) plans with
// them when the command line types no means: the same numbers as the window's Power tab, with
// --alpha, --target, --adjust and --one-sided taking the place of the plan's when given. Empty
// when the file holds none or the means are typed here; otherwise the settings or a message.
std::optional<Result<PowerSettings>> settingsFromFilePlan(const QCommandLineParser &p, const Scheme &scheme,
                                                          const std::optional<MixedLayout> &mixed)
{
    using R = Result<PowerSettings>;
    if (!p.isSet(u"file"_s) || p.isSet(u"means"_s) || p.isSet(u"differences"_s))
        return std::nullopt;
    auto study = studyFromOptions(p);
    if (!study || study->power.isDefault())
        return std::nullopt;
    const QString where = inputLabel(p.value(u"file"_s));
    for (const QString &name : {u"sd"_s, u"sds"_s, u"ratios"_s, u"total"_s, u"correlation"_s, u"correlations"_s, u"baseline"_s})
        if (p.isSet(name))
            return R::failure(u"--%1: %2 holds the power inputs of the window's Power tab (field 'power'); change them there, "
                              u"or give every input here, starting with --means or --differences"_s.arg(name, where));
    auto s = settingsFromPlan(study->power, scheme.factor, mixed);
    if (!s)
        return R::failure(u"%1: field 'power' (the window's Power tab): %2"_s.arg(where, s.error()));
    if (const QString e = readTest(p, s.value(), true); !e.isEmpty())
        return R::failure(e);
    return s;
}

// With ratios and no planned sizes, the ratios stand for the sizes wherever the
// coding depends on them (weighted effect, weighted polynomial, fewer than k - 1 columns).
void useRatiosAsSizes(const QCommandLineParser &p, Scheme &scheme)
{
    if (!p.isSet(u"ratios"_s) || scheme.factor.hasPlannedN())
        return;
    auto sizes = parseSizes(splitList(p.value(u"ratios"_s)), scheme.levelCount(), u"--ratios"_s);
    if (!sizes) // already validated as positive numbers; a failure here leaves the scheme as it is
        return;
    scheme.factor.plannedN = sizes.take();
    const bool weighted = scheme.kind == SchemeKind::WeightedEffect
                          || (scheme.kind == SchemeKind::Polynomial && scheme.polynomialWeighted);
    if (!weighted)
        return;
    SchemeOptions options;
    options.reference = scheme.reference;
    options.polynomialForm = scheme.polynomialForm;
    options.polynomialWeighted = scheme.polynomialWeighted;
    if (auto columns = standardColumns(scheme.factor, scheme.kind, options))
        scheme.columns = columns.take();
}

QString number(double x)
{
    return numberText(x);
}

QString degrees(double df)
{
    // Whole degrees of freedom as an integer while one holds them (planned n of 1e100 give df beyond it).
    if (df == std::floor(df) && std::abs(df) < 1e15)
        return QString::number(qint64(df));
    return std::abs(df) < 1e15 ? QString::number(df, 'f', 2) : numberText(df);
}

// mixed: the sizes are participants per group of a mixed design.
QString sizesText(const SampleSize &s, bool within, bool mixed = false)
{
    if (!s.reachable)
        return u"not reached"_s;
    if (within && !mixed)
        return u"%1 participants"_s.arg(s.total);
    const bool equal = std::adjacent_find(s.perLevel.begin(), s.perLevel.end(), std::not_equal_to<>()) == s.perLevel.end();
    QStringList items;
    for (long long v : s.perLevel)
        items << QString::number(v);
    const QString per = equal ? u"%1 per %2"_s.arg(s.perLevel.front()).arg(mixed ? u"group"_s : u"level"_s) : items.join(u", "_s);
    return u"%1 (%2 = %3)"_s.arg(per, mixed ? u"participants"_s : u"N"_s).arg(s.total);
}

QString neededText(const ContrastPower &c, bool oneSided, const PowerReport &r)
{
    if (c.zeroEstimate)
        return u"none (estimate 0)"_s;
    if (oneSided && c.estimate < 0.0)
        return u"none (estimate < 0, one-sided)"_s;
    return sizesText(c.required, r.within, !r.groups.isEmpty());
}

QString sizesLine(const std::vector<double> &n)
{
    QStringList items;
    double total = 0;
    for (double v : n) {
        items << number(v);
        total += v;
    }
    return u"%1 (N = %2)"_s.arg(items.join(u", "_s), number(total));
}

void bullets(QString &out, const QString &title, const QStringList &items)
{
    if (items.isEmpty())
        return;
    out += u'\n' + title + u":\n"_s;
    for (const QString &i : items)
        out += u"  - "_s + i + u'\n';
}

QString humanReport(const Scheme &scheme, const PowerSettings &s, const PowerReport &r)
{
    QString out;
    const QString factor = scheme.factor.name.isEmpty() ? u"the factor"_s : u"factor '%1'"_s.arg(scheme.factor.name);
    out += u"Power for planned contrasts: %1 with %2 levels (%3), %4 coding\n"_s.arg(factor)
               .arg(r.levelCount)
               .arg(scheme.factor.levels.join(u", "_s), schemeTitle(scheme.kind));
    QStringList means;
    for (int i = 0; i < r.levelCount; ++i)
        means << u"%1 %2"_s.arg(scheme.factor.levels[i], number(s.means[size_t(i)]));
    out += u"Expected means: %1\n"_s.arg(means.join(u", "_s));
    if (s.perLevelSds() && r.within) {
        QStringList sds;
        for (double v : s.sds)
            sds << number(v);
        out += u"SD per level: %1\n"_s.arg(sds.join(u", "_s));
    } else if (s.perLevelSds()) {
        QStringList sds;
        for (double v : s.sds)
            sds << number(v);
        out += u"SD per level: %1 (Welch\u2013Satterthwaite df for the contrasts)\n"_s.arg(sds.join(u", "_s));
    } else {
        out += u"Common SD: %1\n"_s.arg(number(s.sd));
    }
    if (!r.groups.isEmpty()) {
        out += r.correlation ? u"Correlation between a participant's values in two within cells: %1\n"_s.arg(number(*r.correlation))
                             : u"Correlations between within cells: the matrix given\n"_s;
        out += u"Groups between participants: %1; participants: %2 in all\n"_s.arg(r.groups.join(u", "_s), number(r.plannedTotal));
    } else if (r.within) {
        out += r.correlation ? u"Correlation between a participant's values at two levels: %1\n"_s.arg(number(*r.correlation))
                             : u"Correlations between levels: the matrix given\n"_s;
        out += u"Participants (each at every level): %1\n"_s.arg(number(r.plannedTotal));
    } else {
        out += u"Planned n: %1\n"_s.arg(sizesLine(r.plannedN));
    }
    out += u"Alpha %1 %2-sided, adjustment %3: %4 per contrast; target power %5\n"_s.arg(number(r.alpha))
               .arg(r.oneSided ? u"one"_s : u"two"_s)
               .arg(adjustmentTitle(r.adjustment))
               .arg(number(r.perTestAlpha))
               .arg(number(r.target));

    TextTable table({u"contrast"_s, u"estimate"_s, u"SE"_s, u"effect"_s, u"noncentrality"_s, u"df"_s, u"power"_s,
                     r.within ? u"participants for target"_s : u"n for target"_s});
    table.setAlign(7, TextTable::Align::Left);
    for (const ContrastPower &c : r.contrasts)
        table.addRow({c.part.isEmpty() ? c.name : u"%1 [%2]"_s.arg(c.name, c.part), number(c.estimate), number(c.se),
                      number(c.effectSize), number(c.noncentrality), degrees(c.df), number(c.power), neededText(c, r.oneSided, r)});
    out += u'\n' + table.text();

    const OmnibusPower &o = r.omnibus;
    out += u"\nOmnibus %1 (df %2 and %3, alpha %4): f = %5, lambda = %6, power %7, %8 for target %9\n"_s
               .arg(!r.groups.isEmpty() ? u"Hotelling's T\u00b2 as F, within cells averaged over the groups"_s
                    : o.hotelling       ? u"Hotelling's T\u00b2 as F"_s
                                        : u"F-test"_s)
               .arg(o.df1)
               .arg(degrees(o.df2), number(o.alpha), number(o.effectSize), number(o.noncentrality), number(o.power),
                    r.within ? u"needed"_s : u"n"_s,
                    o.noncentrality == 0.0 ? u"none (all means equal)"_s : sizesText(o.required, r.within, !r.groups.isEmpty()));

    QStringList contrastNotes;
    if (!r.terms.empty()) {
        TextTable terms({u"test (Wilks' Λ as F)"_s, u"df1"_s, u"df2"_s, u"noncentrality"_s, u"power"_s, u"for target"_s});
        terms.setAlign(5, TextTable::Align::Left);
        for (const TermPower &t : r.terms) {
            terms.addRow({t.exact ? t.name : t.name + u" (approximate)"_s, QString::number(t.df1), degrees(t.df2), number(t.noncentrality),
                          number(t.power), t.noncentrality == 0.0 ? u"none (hypothesis true)"_s : sizesText(t.required, true, true)});
            for (const QString &n : t.notes)
                contrastNotes << t.name + u": "_s + n;
        }
        out += u"\nMultivariate tests of the data check, each at alpha %1 (not adjusted for multiplicity):\n"_s.arg(number(r.alpha))
               + terms.text();
    }
    for (const ContrastPower &c : r.contrasts)
        for (const QString &n : c.notes)
            contrastNotes << c.name + u": "_s + n;
    for (const QString &n : o.notes)
        contrastNotes << u"omnibus: "_s + n;
    if (const QString why = withinExplanation(r); !why.isEmpty())
        out += u'\n' + why + u'\n';
    bullets(out, u"Notes"_s, r.notes + contrastNotes);
    bullets(out, u"Cautions"_s, r.cautions);
    return out;
}

} // namespace

int runPower(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addSchemeOptions(p);
    addPowerOptions(p);
    if (const auto done = parseOrHelp(p, kCommand, args, io))
        return *done;
    // For a design file its cells act as the levels and its coding columns as the contrasts.
    std::optional<Design> design;
    auto loaded = schemeOrCellsFromOptions(p, u"power"_s, &design);
    if (!loaded)
        return badInput(io, loaded.error());
    Scheme &scheme = loaded.value();
    // A design with a factor measured within participants: a mixed design (MixedPower.h).
    const std::optional<MixedLayout> mixed = design && hasWithinFactor(*design) ? std::optional(mixedLayout(*design)) : std::nullopt;
    const bool within = mixed || scheme.factor.isWithin();
    QStringList designNotes;
    if (design && !mixed)
        designNotes << u"a design of %1 cells: each cell is a group here (%2, the first factor varying slowest), and each "
                       "coding column of the design is a contrast over the cell means"_s
                           .arg(scheme.levelCount()).arg(scheme.factor.levels.join(u", "_s));
    if (design && scheme.levelCount() < design->cellCount()) // empty cells, left out as in the window
        designNotes << u"empty cells (cell_n 0) are left out, so give means for the other %1 cells; %2"_s.arg(scheme.levelCount()).arg(
            analyzeDesign(*design).empty.summary);

    PowerSettings s;
    if (auto fromFile = settingsFromFilePlan(p, scheme, mixed)) {
        if (!*fromFile)
            return badInput(io, fromFile->error());
        s = fromFile->take();
        designNotes << u"the inputs are the study file's (the window's Power tab)"_s;
    } else {
        for (const QString &e : {readMeans(p, scheme.factor.levels, s), readSpread(p, s), readSizes(p, scheme, within, s),
                                 readCorrelation(p, within, s), readTest(p, s)})
            if (!e.isEmpty())
                return badInput(io, e);
    }
    if (Problem e = mixed ? validateMixedPowerSettings(s, *mixed, u"--"_s) : validatePowerSettings(s, scheme.levelCount(), u"--"_s);
        !e.isEmpty())
        return badInput(io, e.message);

    useRatiosAsSizes(p, scheme);
    const Analysis analysis = analyze(scheme);
    auto rows = contrastRowsOf(analysis);
    if (!rows)
        return badInput(io, rows.error());
    auto report = mixed ? computeMixedPower(rows->rows, rows->names, s, *design) : computePower(rows->rows, rows->names, s);
    if (!report)
        return badInput(io, report.error());
    report->notes = designNotes + report->notes;
    if (analysis.dependsOnSizes)
        report->notes << u"the coding has fewer than k - 1 columns: its hypotheses are least-squares combinations "
                         u"under the planned sizes and change with them"_s;

    if (p.isSet(u"json"_s)) {
        QJsonObject o = powerReportToJson(*report);
        o[u"scheme"_s] = schemeId(scheme.kind);
        o[u"level_names"_s] = QJsonArray::fromStringList(scheme.factor.levels);
        io.out << QString::fromUtf8(QJsonDocument(o).toJson(QJsonDocument::Indented));
    } else {
        io.out << humanReport(scheme, s, *report);
    }
    return kExitOk;
}

} // namespace cb::cli
