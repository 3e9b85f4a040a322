#include "core/model/PowerPlan.h"

#include "core/base/NameTable.h"

using namespace Qt::StringLiterals;

namespace cb {

namespace {

struct SizesRow
{
    PowerPlan::Sizes value;
    const char16_t *id;
};

constexpr SizesRow kSizes[] = {
    {PowerPlan::Sizes::FromFactor, u"factor"},
    {PowerPlan::Sizes::PlannedN, u"planned"},
    {PowerPlan::Sizes::Ratios, u"ratios"},
};

} // namespace

QString powerPlanSizesId(PowerPlan::Sizes sizes)
{
    return QString::fromUtf16(rowOf(kSizes, sizes).id);
}

std::optional<PowerPlan::Sizes> powerPlanSizesFromId(const QString &id)
{
    return valueFromId(kSizes, id);
}

QString powerPlanSizesIdList()
{
    return idList(kSizes, u" or "_s);
}

PowerPlan prunedPlan(PowerPlan plan, const QStringList &levels)
{
    for (auto it = plan.levels.begin(); it != plan.levels.end();)
        it = levels.contains(it.key()) && !it->isDefault() ? std::next(it) : plan.levels.erase(it);
    if (!levels.contains(plan.baseline))
        plan.baseline.clear();
    return plan;
}

} // namespace cb
