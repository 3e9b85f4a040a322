#include "core/report/TextTable.h"

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
constexpr qsizetype kGap = 2;
}

TextTable::TextTable(QStringList header, int indent)
    : m_header(std::move(header))
    , m_indent(indent)
{
}

void TextTable::setAlign(int column, Align align)
{
    while (m_align.size() <= column)
        m_align << (m_align.isEmpty() ? Align::Left : Align::Right);
    m_align[column] = align;
}

void TextTable::addRow(QStringList cells)
{
    m_rows.append(Row{std::move(cells), {}});
}

void TextTable::addNote(QString text)
{
    if (m_rows.isEmpty())
        m_rows.append(Row{});
    m_rows.last().notes << std::move(text);
}

QString TextTable::text() const
{
    QList<qsizetype> width;
    auto measure = [&](const QStringList &cells) {
        for (qsizetype c = 0; c < cells.size(); ++c) {
            if (width.size() <= c)
                width << 0;
            width[c] = std::max(width[c], cells[c].size());
        }
    };
    measure(m_header);
    for (const Row &r : m_rows)
        measure(r.cells);
    auto align = [&](qsizetype c) { return c < m_align.size() ? m_align[c] : (c == 0 ? Align::Left : Align::Right); };

    const QString indent(m_indent, u' ');
    QString out;
    auto line = [&](const QStringList &cells) {
        QString l = indent;
        for (qsizetype c = 0; c < width.size(); ++c) {
            const QString cell = cells.value(c);
            if (c > 0)
                l += QString(kGap, u' ');
            l += align(c) == Align::Left ? cell.leftJustified(width[c]) : cell.rightJustified(width[c]);
        }
        while (l.endsWith(u' '))
            l.chop(1);
        out += l + u'\n';
    };
    const QString noteIndent = indent + QString(width.isEmpty() ? 0 : width.front() + kGap, u' ');
    if (!m_header.isEmpty())
        line(m_header);
    for (const Row &r : m_rows) {
        if (!r.cells.isEmpty())
            line(r.cells);
        for (const QString &n : r.notes)
            out += noteIndent + n + u'\n';
    }
    return out;
}

} // namespace cb
