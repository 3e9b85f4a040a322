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

// The multivariate tests (mixedTerms' list, core/power/MixedPower.h) over the participants with
// every within cell.
std::vector<MixedTest> multivariateTests(const MixedFitResult &fit, const std::vector<int> &groupOf, const Eigen::MatrixXd &y,
                                         const std::vector<MixedTermTest> &terms)
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
    std::vector<MixedTest> tests;
    for (const MixedTermTest &term : terms) {
        MixedTest t;
        t.name = term.name;
        t.hypothesis = term.hypothesis;
        t.participants = int(complete.size());
        t.contrast = term.contrast;
        t.transform = term.transform;
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
    if (!hasWithinFactor(design))
        return R::failure(u"the design has no factor measured within participants; fit it without --participant"_s);
    auto terms = mixedTerms(design);
    if (!terms)
        return R::failure(terms.error());
    const Scheme *betweenScheme = terms->between ? &*terms->between : nullptr;
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
    const Eigen::MatrixXd &withinRows = terms->withinRows;
    FitResult &overall = out.overall;
    overall = pooled.take();
    overall.coefficients.clear();
    overall.byParticipant = true;
    overall.participants = participants;
    overall.incompleteParticipants = incomplete;
    overall.completeParticipants = participants - int(incomplete.size());
    overall.f = overall.fP = overall.fDf1 = overall.fDf2 = kNaN;
    out.betweenDesign = terms->betweenDesign;
    std::vector<double> pFamily;
    for (Eigen::Index r = 0; r < withinRows.rows(); ++r) {
        MixedFitRow row;
        const bool average = r == 0;
        row.name = average ? u"average"_s : terms->withinNames.value(qsizetype(r - 1));
        row.weights.resize(size_t(w));
        for (int j = 0; j < w; ++j)
            row.weights[size_t(j)] = average ? 1.0 / w : withinRows(r, j);
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
    out.tests = multivariateTests(out, groupOf, y, terms->tests);
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
    overall.notes << (layout.groups() > 1 ? u"by participant, mixed design: %1 participants in %2 groups (%3), each at %4 within cells (%5)"_s
                                              .arg(participants)
                                              .arg(layout.groups())
                                              .arg(layout.groupNames.join(u", "_s))
                                        : u"by participant, every factor within participants: %1 participants, each at %2 cells (%3)"_s
                                              .arg(participants))
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
