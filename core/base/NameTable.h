#pragma once

#include <QString>
#include <QStringList>
#include <QStringView>

#include <cstddef>
#include <optional>

// Enum values with their names: each table is a constexpr array of rows that have at least
// `value` (the enum value) and `id` (the stable name used in files and on the command line,
// a char16_t string). One rule reads an id wherever a person or a file gives one: spaces around
// it and letter case do not count ("Treatment", " sum " are read as treatment and sum).
namespace cb {

inline bool idMatches(const QString &text, QStringView id)
{
    return QStringView(text).trimmed().compare(id, Qt::CaseInsensitive) == 0;
}

template <typename Row, std::size_t N>
std::optional<decltype(Row::value)> valueFromId(const Row (&rows)[N], const QString &text)
{
    for (const Row &r : rows)
        if (idMatches(text, r.id))
            return r.value;
    return std::nullopt;
}

// The row of a value; the first row when the value is not in the table.
template <typename Row, std::size_t N>
const Row &rowOf(const Row (&rows)[N], decltype(Row::value) value)
{
    for (const Row &r : rows)
        if (r.value == value)
            return r;
    return rows[0];
}

// The ids of the rows that `keep` accepts, in table order, for help texts and messages:
// "a, b, c", or "a, b or c" with lastSeparator " or ".
template <typename Row, std::size_t N, typename Keep>
QString idList(const Row (&rows)[N], Keep keep, const QString &lastSeparator = QStringLiteral(", "))
{
    QStringList ids;
    for (const Row &r : rows)
        if (keep(r.value))
            ids << QString::fromUtf16(r.id);
    if (ids.size() < 2)
        return ids.join(QString());
    const QString last = ids.takeLast();
    return ids.join(QStringLiteral(", ")) + lastSeparator + last;
}

template <typename Row, std::size_t N>
QString idList(const Row (&rows)[N], const QString &lastSeparator = QStringLiteral(", "))
{
    return idList(rows, [](auto) { return true; }, lastSeparator);
}

} // namespace cb
