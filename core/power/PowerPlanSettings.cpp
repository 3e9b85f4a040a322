#include "core/power/PowerPlanSettings.h"

#include "core/base/Weight.h"

#include <cmath>
#include <tuple>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

Result<double> scalar(const QString &typed, const QString &field)
{
    const QString text = typed.trimmed();
    if (text.isEmpty())
        return Result<double>::failure(u"%1: no value; type a number"_s.arg(field), field);
    const Result<Weight> w = parseWeight(text);
    if (!w)
        return Result<double>::failure(u"%1: %2"_s.arg(field, w.error()), field);
    return w->value();
}

} // namespace

bool planUsesRatios(const PowerPlan &plan, const Factor &levels)
{
    switch (plan.sizes) {
    case PowerPlan::Sizes::FromFactor:
        return !levels.hasPlannedN();
    case PowerPlan::Sizes::PlannedN:
        return false;
    case PowerPlan::Sizes::Ratios:
        return true;
    }
    return false;
}

Result<PowerSettings> settingsFromPlan(const PowerPlan &plan, const Factor &levels, const std::optional<MixedLayout> &mixed)
{
    using R = Result<PowerSettings>;
    PowerSettings s;
    const QStringList &names = levels.levels;
    const int k = int(names.size());
    const int baseline = std::max(0, int(names.indexOf(plan.baseline)));
    // One number per level from the plan's levels; the message names the level.
    auto column = [&](QString PowerPlanLevel::*member, const QString &key, const QString &field, int skip) -> Result<std::vector<double>> {
        using C = Result<std::vector<double>>;
        std::vector<double> out;
        for (int r = 0; r < k; ++r) {
            if (r == skip)
                continue;
            const QString text = (plan.levels.value(names[r]).*member).trimmed();
            if (text.isEmpty())
                return C::failure(u"%1, level \u2018%2\u2019: no value; type a number"_s.arg(field, names[r]), key);
            const Result<Weight> w = parseWeight(text);
            if (!w)
                return C::failure(u"%1, level \u2018%2\u2019: %3"_s.arg(field, names[r], w.error()), key);
            out.push_back(w->value());
        }
        return out;
    };
    auto expected = column(&PowerPlanLevel::expected, u"means"_s, plan.differences ? u"means (differences)"_s : u"means"_s,
                           plan.differences ? baseline : -1);
    if (!expected)
        return R::failure(expected.problem());
    s.means = plan.differences ? meansFromDifferences(*expected, baseline) : *expected;
    if (plan.perLevelSd) {
        auto sds = column(&PowerPlanLevel::sd, u"sds"_s, u"sds"_s, -1);
        if (!sds)
            return R::failure(sds.problem());
        s.sds = *sds;
    } else {
        auto sd = scalar(plan.sd, u"sd"_s);
        if (!sd)
            return R::failure(sd.problem());
        s.sd = *sd;
    }
    if (mixed || levels.isWithin()) {
        s.measure = Measure::Within;
        if (levels.hasPlannedN()) {
            s.n = levels.sizesAsDouble();
        } else {
            auto participants = scalar(plan.total, u"total"_s);
            if (!participants)
                return R::failure(participants.problem());
            s.total = *participants;
        }
        if (plan.fullMatrix) {
            // Read by the reader --correlations uses; the validation below checks it against the
            // levels, naming the cell.
            auto matrix = parseCorrelationMatrix(plan.correlations, u"correlations"_s);
            if (!matrix)
                return R::failure(matrix.error(), u"correlations"_s);
            s.correlations = matrix.take();
        } else {
            auto correlation = scalar(plan.correlation, u"correlation"_s);
            if (!correlation)
                return R::failure(correlation.problem());
            s.correlation = *correlation;
        }
    } else if (!planUsesRatios(plan, levels)) {
        if (!levels.hasPlannedN())
            return R::failure(u"n: the levels have no planned group sizes yet; enter them in the levels panel, "
                              u"or choose ratios with a total N"_s, u"n"_s);
        s.n = levels.sizesAsDouble();
    } else {
        auto ratios = column(&PowerPlanLevel::ratio, u"ratios"_s, u"ratios"_s, -1);
        if (!ratios)
            return R::failure(ratios.problem());
        s.ratios = *ratios;
        auto total = scalar(plan.total, u"total"_s);
        if (!total)
            return R::failure(total.problem());
        s.total = *total;
    }
    for (const auto &[text, field, into] : {std::tuple{&plan.alpha, u"alpha"_s, &s.alpha}, {&plan.target, u"target"_s, &s.target}}) {
        auto value = scalar(*text, field);
        if (!value)
            return R::failure(value.problem());
        *into = *value;
    }
    s.oneSided = plan.oneSided;
    const std::optional<Adjustment> adjustment = adjustmentFromId(plan.adjustment);
    if (!adjustment || !adjustsPower(*adjustment))
        return R::failure(u"adjustment: %1 is not one for power; expected %2"_s.arg(quoted(plan.adjustment), adjustmentIdList(true)),
                          u"adjustment"_s);
    s.adjustment = *adjustment;
    if (Problem problem = mixed ? validateMixedPowerSettings(s, *mixed) : validatePowerSettings(s, k); !problem.isEmpty())
        return R::failure(std::move(problem));
    return s;
}

} // namespace cb
