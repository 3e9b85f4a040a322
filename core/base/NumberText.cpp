#include "core/base/NumberText.h"

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

QString numberText(double v, int significant)
{
    if (std::isnan(v))
        return kMissingMark.toString();
    if (std::isinf(v))
        return v > 0 ? u"\u221e"_s : u"-\u221e"_s;
    return QString::number(v, 'g', significant);
}

QString numberText(const std::optional<double> &v, int significant)
{
    return v ? numberText(*v, significant) : kMissingMark.toString();
}

QString pValueText(double p)
{
    if (!std::isfinite(p))
        return kMissingMark.toString();
    if (p < kSmallestShownP)
        return u"< "_s + QString::number(kSmallestShownP, 'f', 4);
    return QString::number(p, 'f', 4);
}

QString pClause(double p)
{
    const QString v = pValueText(p);
    return v.startsWith(u'<') ? u"p "_s + v : u"p = "_s + v;
}

QJsonValue jsonNumber(double v)
{
    return std::isfinite(v) ? QJsonValue(v) : QJsonValue(QJsonValue::Null);
}

QJsonValue jsonNumber(const std::optional<double> &v)
{
    return v ? jsonNumber(*v) : QJsonValue(QJsonValue::Null);
}

} // namespace cb
