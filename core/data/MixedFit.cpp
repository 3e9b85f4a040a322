#include "core/data/MixedFit.h"

#include "core/analysis/Analysis.h"
#include "core/base/JsonArray.h"
#include "core/base/NumberText.h"
#include "core/base/Weight.h"
#include "core/power/MixedPower.h"

#include <QJsonArray>

#include <cmath>
#include <optional>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// A term of one part of a mixed design: its name and its columns in the part's scheme (first is
// the index among the columns, the intercept not counted).
struct PartTerm
{
    QString name;
    int first = 0;
    int count = 0;
};

struct Part
{
    Scheme scheme;
    std::vector<PartTerm> terms;
};

// The design's between factors (within = false) or within factors as one scheme over their
// cells (A-major, as mixedLayout numbers groups and within cells), with the terms among them;
// nullopt when there is no such factor. The within part always has an intercept: its first row
// is the participants' average.
Result<std::optional<Part>> partScheme(const Design &design, bool within)
{
    using R = Result<std::optional<Part>>;
    std::vector<int> chosen;
    for (size_t f = 0; f < design.factors.size(); ++f)
        if (design.factors[f].factor.isWithin() == within)
            chosen.push_back(int(f));
    const bool intercept = within || design.intercept;
    if (chosen.empty())
        return R(std::nullopt);
    if (chosen.size() == 1) {
        Part out;
        out.scheme = design.factors[size_t(chosen.front())];
        out.scheme.intercept = intercept;
        out.scheme.factor.plannedN.clear();
        out.terms.push_back({out.scheme.factor.name, 0, out.scheme.columnCount()});
        return R(std::optional(std::move(out)));
    }
    Design part;
    part.intercept = intercept;
    for (int f : chosen)
        part.factors.push_back(design.factors[size_t(f)]);
    const auto position = [&](int f) { return int(std::find(chosen.begin(), chosen.end(), f) - chosen.begin()); };
    for (const Term &t : design.terms) {
        Term mapped;
        bool inside = t.within < 0 || position(t.within) < int(chosen.size());
        for (int f : t.factors) {
            inside = inside && position(f) < int(chosen.size());
            mapped.factors.push_back(position(f));
        }
        mapped.within = t.within < 0 ? -1 : position(t.within);
        if (inside)
            part.terms.push_back(mapped);
    }
    auto cells = cellScheme(part);
    if (!cells)
        return R::failure(cells.error());
    Part out;
    out.scheme = cells.take();
    out.scheme.intercept = intercept;
    int first = 0;
    for (const Term &t : part.terms) {
        const int count = int(termColumns(part, t).size());
        out.terms.push_back({termName(part, t), first, count});
        first += count;
    }
    return R(std::optional(std::move(out)));
}

// The multivariate tests (MixedTest) over the participants with every within cell. hv: the within
// part's hypothesis rows (the average first); betweenTerms: null when the between part has no
// intercept or there is none (then only the within terms are tested, averaged over the groups).
std::vector<MixedTest> multivariateTests(const MixedFitResult &fit, const std::vector<int> &groupOf, const Eigen::MatrixXd &y,
                                         const Eigen::MatrixXd &hv, const Part &within, const std::vector<PartTerm> *betweenTerms)
{
    const Eigen::Index w = y.cols();
    const Eigen::MatrixXd &groupRows = fit.betweenDesign;
    std::vector<Eigen::Index> complete;
    for (Eigen::Index p = 0; p < y.rows(); ++p)
        if (groupOf[size_t(p)] >= 0 && y.row(p).allFinite())
            complete.push_back(p);
    Eigen::MatrixXd x(Eigen::Index(complete.size()), groupRows.cols());
    Eigen::MatrixXd yc(Eigen::Index(complete.size()), w);
    for (size_t i = 0; i < complete.size(); ++i) {
        x.row(Eigen::Index(i)) = groupRows.row(groupOf[size_t(complete[i])]);
        yc.row(Eigen::Index(i)) = y.row(complete[i]);
    }
    const bool grouped = fit.groups.size() > 1;
    const QString overGroups = grouped ? u", averaged over the groups with equal weight"_s : QString();
    std::vector<MixedTest> tests;
    const auto add = [&](QString name, QString hypothesis, Eigen::MatrixXd l, Eigen::MatrixXd m) {
        MixedTest t;
        t.name = std::move(name);
        t.hypothesis = std::move(hypothesis);
        t.participants = int(complete.size());
        t.contrast = std::move(l);
        t.transform = std::move(m);
        auto r = wilksTest(x, yc, t.contrast, t.transform);
        if (r)
            t.test = *r;
        else {
            t.refusal = r.error();
            t.test.wilks = t.test.f = t.test.p = kNaN;
            t.test.df1 = double(t.transform.cols() * t.contrast.rows());
            t.test.df2 = kNaN;
        }
        tests.push_back(std::move(t));
    };
    const Eigen::MatrixXd average = groupRows.colwise().mean();
    const bool saturated = hv.rows() == w;
    add(u"all within cells"_s,
        saturated ? u"the %1 within cells have equal means%2"_s.arg(w).arg(overGroups) : u"every within column is 0%1"_s.arg(overGroups), average,
        hv.bottomRows(hv.rows() - 1).transpose());
    const auto withinRows = [&](const PartTerm &t) { return Eigen::MatrixXd(hv.middleRows(1 + t.first, t.count).transpose()); };
    if (within.terms.size() > 1)
        for (const PartTerm &t : within.terms)
            add(t.name, u"every column of %1 is 0%2"_s.arg(t.name, overGroups), average, withinRows(t));
    if (!betweenTerms)
        return tests;
    const Eigen::MatrixXd averageOverCells = Eigen::VectorXd::Constant(w, 1.0 / double(w));
    for (const PartTerm &b : *betweenTerms) {
        Eigen::MatrixXd l = Eigen::MatrixXd::Zero(b.count, groupRows.cols());
        for (int i = 0; i < b.count; ++i)
            l(i, 1 + b.first + i) = 1.0;
        add(b.name, u"every column of %1 is 0 on the participants' averages over the within cells"_s.arg(b.name), l, averageOverCells);
        for (const PartTerm &t : within.terms) {
            const QString name = b.name + kCrossJoiner.toString() + t.name;
            add(name, u"every column of %1 is 0: %2's contrasts do not differ with %3"_s.arg(name, t.name, b.name), l, withinRows(t));
        }
    }
    return tests;
}

QString joinedName(const QString &between, const QString &row, bool averageRow, bool interceptColumn)
{
    if (averageRow)
        return between;
    if (interceptColumn)
        return row;
    return between + kCrossJoiner.toString() + row;
}

} // namespace

Result<MixedFitResult> fitMixedParticipants(const Design &design, const DataSummary &data, const FitOptions &options,
                                            const LevelMapping &mapping)
{
    using R = Result<MixedFitResult>;
    if (data.participantIndex < 0)
        return R::failure(u"no participant column was read; name the column that says whose each row is"_s);
    auto cells = cellScheme(design);
    if (!cells)
        return R::failure(cells.error());
    // The pooled fit over the cells matches the data's cells to the design and checks them.
    auto pooled = fitScheme(*cells, data, options, mapping);
    if (!pooled)
        return R::failure(pooled.error());
    auto betweenPart = partScheme(design, false);
    auto withinPart = partScheme(design, true);
    if (!betweenPart || !withinPart)
        return R::failure(!betweenPart ? betweenPart.error() : withinPart.error());
    if (!*withinPart)
        return R::failure(u"the design has no factor measured within participants; fit it without --participant"_s);
    const Scheme *betweenScheme = *betweenPart ? &(*betweenPart)->scheme : nullptr;
    const MixedLayout layout = mixedLayout(design);
    const ParticipantCells cellsOf = participantCells(*cells, data, mapping);
    const int participants = int(data.participants.size());
    const int w = layout.withinCells();

    MixedFitResult out;
    out.groups = layout.groupNames;
    out.withinCells = layout.withinNames;
    // Each participant's group and within-cell means.
    std::vector<int> groupOf(size_t(participants), -1);
    Eigen::MatrixXd y = Eigen::MatrixXd::Constant(participants, w, kNaN);
    QStringList incomplete;
    for (int p = 0; p < participants; ++p) {
        int firstCell = -1;
        for (int cell = 0; cell < cells->levelCount(); ++cell) {
            const double v = cellsOf.means(p, cell);
            if (std::isnan(v))
                continue;
            const int g = layout.groupOf[size_t(cell)];
            if (groupOf[size_t(p)] >= 0 && g != groupOf[size_t(p)]) {
                return R::failure(u"participant %1 has rows in two between groups, %2 (line %3) and %4 (line %5); measured between "
                                  u"participants, each belongs to one group (is a participant code used twice, or is a factor "
                                  u"measured within participants?)"_s
                                      .arg(quoted(data.participants[p]), quoted(layout.groupNames[groupOf[size_t(p)]]))
                                      .arg(cellsOf.firstLines[size_t(p)][size_t(firstCell)])
                                      .arg(quoted(layout.groupNames[g]))
                                      .arg(cellsOf.firstLines[size_t(p)][size_t(cell)]));
            }
            groupOf[size_t(p)] = g;
            if (firstCell < 0)
                firstCell = cell;
            y(p, layout.withinOf[size_t(cell)]) = v;
        }
        QStringList lacks;
        for (int j = 0; j < w; ++j)
            if (std::isnan(y(p, j)))
                lacks << quoted(layout.withinNames[j]);
        if (groupOf[size_t(p)] >= 0 && lacks.size() >= w - 1)
            return R::failure(u"participant %1 has values in one within cell only; measured within participants, each gives a value "
                              u"in every within cell (%2)"_s.arg(quoted(data.participants[p]), layout.withinNames.join(u", "_s)));
        if (!lacks.isEmpty())
            incomplete << u"%1 (no %2)"_s.arg(data.participants[p], lacks.join(u", "_s));
    }

    // The within rows: the average, then the within coding's hypothesis rows.
    const Analysis withinAnalysis = analyze((*withinPart)->scheme);
    if (withinAnalysis.hypothesisValues.size() == 0)
        return R::failure(u"the within factors' coding is rank deficient, so its columns have no unique contrasts to test"_s);
    FitResult &overall = out.overall;
    overall = pooled.take();
    overall.coefficients.clear();
    overall.byParticipant = true;
    overall.participants = participants;
    overall.incompleteParticipants = incomplete;
    overall.completeParticipants = participants - int(incomplete.size());
    overall.f = overall.fP = overall.fDf1 = overall.fDf2 = kNaN;
    out.betweenDesign = betweenScheme ? designRows(*betweenScheme) : Eigen::MatrixXd::Ones(1, 1);
    std::vector<double> pFamily;
    for (Eigen::Index r = 0; r < withinAnalysis.hypothesisValues.rows(); ++r) {
        MixedFitRow row;
        const bool average = r == 0;
        row.name = average ? u"average"_s : withinAnalysis.columnNames.value(qsizetype(r - 1));
        row.weights.resize(size_t(w));
        for (int j = 0; j < w; ++j)
            row.weights[size_t(j)] = average ? 1.0 / w : withinAnalysis.hypothesisValues(r, j);
        // The scores per group.
        std::vector<RunningStats> groups(size_t(layout.groups()));
        for (int p = 0; p < participants; ++p) {
            if (groupOf[size_t(p)] < 0)
                continue;
            double score = 0.0;
            bool usable = true;
            for (int j = 0; j < w && usable; ++j) {
                if (row.weights[size_t(j)] == 0.0)
                    continue;
                usable = !std::isnan(y(p, j));
                score += row.weights[size_t(j)] * y(p, j);
            }
            if (usable) {
                groups[size_t(groupOf[size_t(p)])].add(score);
                ++row.participants;
            }
        }
        DataSummary scores;
        scores.source = data.source;
        for (int g = 0; g < layout.groups(); ++g)
            scores.levels.push_back({layout.groupNames[g], groups[size_t(g)]});
        Result<FitResult> fit = [&] {
            if (betweenScheme)
                return fitScheme(*betweenScheme, scores, options);
            // No between factor: the intercept alone, a one-sample t on the scores.
            const Eigen::MatrixXd one = Eigen::MatrixXd::Ones(1, 1);
            auto matched = matchLevels(layout.groupNames, scores.levels);
            if (!matched)
                return Result<FitResult>::failure(matched.error());
            return fitLevels(*matched, one, one, {kInterceptName.toString()}, true, options);
        }();
        if (!fit)
            return R::failure(u"within row %1: %2"_s.arg(quoted(row.name), fit.error()));
        row.fit = fit.take();
        const bool intercept = row.fit.intercept;
        for (size_t c = 0; c < row.fit.coefficients.size(); ++c) {
            FitCoefficient &coef = row.fit.coefficients[c];
            coef.df = row.fit.df;
            coef.participants = row.participants;
            FitCoefficient flat = coef;
            flat.name = joinedName(coef.name, row.name, average, intercept && c == 0);
            flat.hypothesis = average ? u"%1, on each participant's average over the within cells"_s.arg(coef.hypothesis)
                                      : u"%1, on each participant's '%2' score"_s.arg(coef.hypothesis, row.name);
            // The intercept of the average row (the grand mean) stays out of the family, as in every fit.
            flat.inFamily = !(average && intercept && c == 0);
            pFamily.push_back(flat.inFamily ? flat.p : kNaN);
            overall.coefficients.push_back(flat);
        }
        out.rows.push_back(std::move(row));
    }
    const std::vector<double> adjusted = adjustPValues(pFamily, options.adjust);
    for (size_t c = 0; c < overall.coefficients.size(); ++c)
        overall.coefficients[c].pAdjusted = adjusted[c];
    out.tests = multivariateTests(out, groupOf, y, withinAnalysis.hypothesisValues, **withinPart,
                                  betweenScheme && betweenScheme->intercept ? &(*betweenPart)->terms : nullptr);
    const MixedTest &omnibus = out.tests.front();
    overall.mixedDesign = true;
    overall.completeParticipants = omnibus.participants;
    overall.f = omnibus.test.f;
    overall.fDf1 = omnibus.test.df1;
    overall.fDf2 = omnibus.test.df2;
    overall.fP = omnibus.test.p;
    overall.omnibusHypothesis = u"%1 (Hotelling's T\u00b2 over the %2 participants with every within cell)"_s.arg(omnibus.hypothesis)
                                    .arg(omnibus.participants);
    overall.notes.clear();
    overall.notes << u"by participant, mixed design: %1 participants in %2 groups (%3), each at %4 within cells (%5)"_s.arg(participants)
                         .arg(layout.groups())
                         .arg(layout.groupNames.join(u", "_s))
                         .arg(w)
                         .arg(layout.withinNames.join(u", "_s));
    overall.notes << u"for each within row (the participants' average, then each within column) the between coding is fitted "
                     u"on the participants' scores: each test has the pooled within-group variance of its scores as error, "
                     u"with N - g df (N the participants it used)"_s;
    for (const MixedFitRow &r : out.rows)
        if (betweenScheme && r.fit.fDf1 > 1)
            overall.notes << u"%1: do the groups differ? F(%2, %3) = %4, %5 (%6 participants)"_s.arg(r.name, numberText(r.fit.fDf1, 10),
                                                                                                  numberText(r.fit.fDf2, 10),
                                                                                                  numberText(r.fit.f), pClause(r.fit.fP))
                                 .arg(r.participants);
    overall.notes << u"multivariate tests over the %1 participants with every within cell (Wilks' \u039b with Rao's F, exact "
                     u"unless marked approximate; each at \u03b1 = %2, not adjusted for multiplicity):"_s.arg(omnibus.participants)
                         .arg(numberText(options.alpha));
    for (const MixedTest &t : out.tests)
        overall.notes << (t.refusal.isEmpty() ? u"%1: \u039b = %2, F(%3, %4) = %5, %6%7"_s.arg(t.name, numberText(t.test.wilks), numberText(t.test.df1, 10),
                                                                                    numberText(t.test.df2, 10), numberText(t.test.f),
                                                                                    pClause(t.test.p), t.test.exact ? QString() : u" (approximate F)"_s)
                                              : u"%1: not computed, %2"_s.arg(t.name, t.refusal));
    if (!incomplete.isEmpty())
        overall.notes << (incomplete.size() == 1 ? u"1 participant lacks a within cell and is left out of the rows that need it: %1"_s
                                                 : u"%1 participants lack a within cell and are left out of the rows that need it: %2"_s.arg(
                                                       incomplete.size()))
                             .arg(incomplete.join(u"; "_s));
    return R(std::move(out));
}

QJsonObject mixedFitToJson(const MixedFitResult &fit, const DataSummary &data)
{
    QJsonObject out = fitResultToJson(fit.overall, data);
    QJsonObject omnibus = out[u"omnibus"_s].toObject();
    QJsonArray tests;
    for (const MixedTest &t : fit.tests) {
        QJsonObject o{{u"name"_s, t.name},
                      {u"hypothesis"_s, t.hypothesis},
                      {u"wilks"_s, jsonNumber(t.test.wilks)},
                      {u"f"_s, jsonNumber(t.test.f)},
                      {u"df1"_s, jsonNumber(t.test.df1)},
                      {u"df2"_s, jsonNumber(t.test.df2)},
                      {u"p"_s, jsonNumber(t.test.p)},
                      {u"exact"_s, t.test.exact},
                      {u"participants"_s, t.participants}};
        if (!t.refusal.isEmpty())
            o.insert(u"refusal"_s, t.refusal);
        tests.append(o);
    }
    omnibus[u"tests"_s] = tests;
    out[u"omnibus"_s] = omnibus;
    out[u"groups"_s] = QJsonArray::fromStringList(fit.groups);
    out[u"within_cells"_s] = QJsonArray::fromStringList(fit.withinCells);
    QJsonArray rows;
    for (const MixedFitRow &r : fit.rows) {
        const QJsonObject one = fitResultToJson(r.fit, data);
        QJsonObject o{{u"name"_s, r.name}, {u"weights"_s, jsonNumbers(r.weights)}, {u"participants"_s, r.participants}};
        for (const QString &key : {u"sigma"_s, u"df"_s, u"f"_s, u"f_df1"_s, u"f_df2"_s, u"f_p"_s, u"coefficients"_s})
            o[key] = one[key];
        rows.append(o);
    }
    out[u"within_rows"_s] = rows;
    return out;
}

} // namespace cb
