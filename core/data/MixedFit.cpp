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

// The design's between factors (within = false) or within factors as one scheme over their
// cells (A-major, as mixedLayout numbers groups and within cells), with the terms among them;
// nullopt when there is no such factor. The within part always has an intercept: its first row
// is the participants' average.
Result<std::optional<Scheme>> partScheme(const Design &design, bool within)
{
    using R = Result<std::optional<Scheme>>;
    std::vector<int> chosen;
    for (size_t f = 0; f < design.factors.size(); ++f)
        if (design.factors[f].factor.isWithin() == within)
            chosen.push_back(int(f));
    const bool intercept = within || design.intercept;
    if (chosen.empty())
        return R(std::nullopt);
    if (chosen.size() == 1) {
        Scheme s = design.factors[size_t(chosen.front())];
        s.intercept = intercept;
        s.factor.plannedN.clear();
        return R(std::optional(std::move(s)));
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
    Scheme s = cells.take();
    s.intercept = intercept;
    return R(std::optional(std::move(s)));
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
    const Analysis withinAnalysis = analyze(**withinPart);
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
    overall.omnibusHypothesis = u"no one test of all cells for a mixed design; see each within row's test of the groups"_s;
    out.betweenDesign = *betweenPart ? designRows(**betweenPart) : Eigen::MatrixXd::Ones(1, 1);
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
            if (*betweenPart)
                return fitScheme(**betweenPart, scores, options);
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
        if (*betweenPart && r.fit.fDf1 > 1)
            overall.notes << u"%1: do the groups differ? F(%2, %3) = %4, %5 (%6 participants)"_s.arg(r.name, numberText(r.fit.fDf1, 10),
                                                                                                  numberText(r.fit.fDf2, 10),
                                                                                                  numberText(r.fit.f), pClause(r.fit.fP))
                                 .arg(r.participants);
    if (!incomplete.isEmpty())
        overall.notes << u"%1 participants lack a within cell and are left out of the rows that need it: %2"_s.arg(incomplete.size())
                             .arg(incomplete.join(u"; "_s));
    return R(std::move(out));
}

QJsonObject mixedFitToJson(const MixedFitResult &fit, const DataSummary &data)
{
    QJsonObject out = fitResultToJson(fit.overall, data);
    QJsonObject omnibus = out[u"omnibus"_s].toObject();
    omnibus[u"test"_s] = u"none"_s;
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
