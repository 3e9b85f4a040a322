#pragma once

#include <QList>
#include <QString>
#include <QStringList>

namespace cb {

// The one builder of plain-text tables for the command-line reports: columns padded to
// their widest cell and two spaces apart, the first column left-aligned and the others
// right-aligned (numbers) unless set otherwise, trailing spaces trimmed.
class TextTable
{
public:
    enum class Align { Left, Right };

    // An empty header prints no header line.
    explicit TextTable(QStringList header = {}, int indent = 2);

    void setAlign(int column, Align align);
    void addRow(QStringList cells);
    // A line of text under the last row, starting where the second column starts; it does not
    // widen the columns (for a long description of the row).
    void addNote(QString text);

    QString text() const;

private:
    struct Row
    {
        QStringList cells;
        QStringList notes;
    };
    QStringList m_header;
    QList<Row> m_rows;
    QList<Align> m_align;
    int m_indent = 2;
};

} // namespace cb
