#include "core/analysis/Adjustment.h"

#include "core/base/NameTable.h"

using namespace Qt::StringLiterals;

namespace cb {

namespace {

struct AdjustmentName
{
    Adjustment value;
    const char16_t *id;
    const char16_t *title;
};

constexpr AdjustmentName kAdjustments[] = {
    {Adjustment::None, u"none", u"None"},
    {Adjustment::Bonferroni, u"bonferroni", u"Bonferroni"},
    {Adjustment::Holm, u"holm", u"Holm (step-down)"},
    {Adjustment::Sidak, u"sidak", u"\u0160id\u00e1k"},
};

} // namespace

QString adjustmentId(Adjustment adjustment)
{
    return QString::fromUtf16(rowOf(kAdjustments, adjustment).id);
}

QString adjustmentTitle(Adjustment adjustment)
{
    return QString::fromUtf16(rowOf(kAdjustments, adjustment).title);
}

std::optional<Adjustment> adjustmentFromId(const QString &id)
{
    return valueFromId(kAdjustments, id);
}

bool adjustsPower(Adjustment adjustment)
{
    return adjustment != Adjustment::Holm;
}

QString adjustmentIdList(bool forPower)
{
    return idList(kAdjustments, [forPower](Adjustment a) { return !forPower || adjustsPower(a); }, u" or "_s);
}

} // namespace cb
