#pragma once

#include "core/base/NumberText.h"

#include <QJsonArray>
#include <QJsonValue>

namespace cb {

// The one way a list becomes a JSON array: f(value) for each value, in order (f returns
// anything a QJsonValue is made from: jsonNumber, a string, a nested array).
template <typename Values, typename F>
QJsonArray jsonArray(const Values &values, F f)
{
    QJsonArray a;
    for (const auto &v : values)
        a.append(QJsonValue(f(v)));
    return a;
}

// JSON numbers (doubles or optional doubles), non-finite ones and nullopt as null (jsonNumber).
template <typename Values>
QJsonArray jsonNumbers(const Values &values)
{
    return jsonArray(values, [](const auto &v) { return jsonNumber(v); });
}

} // namespace cb
