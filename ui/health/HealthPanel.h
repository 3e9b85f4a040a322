#pragma once

#include "ui/common/Look.h"

#include <QWidget>

class QLabel;
class QListView;
class QTableView;

namespace cb {

class Document;
class FindingsModel;
class VifModel;

// Design health, all from core's analysis: rank, condition number and
// indices, VIF per column, and the findings in plain words, with the
// thresholds that were used.
class HealthPanel : public QWidget
{
    Q_OBJECT

public:
    explicit HealthPanel(Document *document, QWidget *parent = nullptr);

    QString summaryText() const; // for tests and the status bar
    QTableView *vifView() const { return m_vifView; }
    QListView *findingsView() const { return m_findingsView; }

private:
    void follow();

    Document *m_document;
    VifModel *m_vif;
    FindingsModel *m_findings;
    // One plain label per line (rich text would be laid out again on every edit).
    enum Line { RankLine, ConditionLine, IndicesLine, ArithmeticLine, SizesLine, LineCount };
    QLabel *m_lines[LineCount];
    void setLine(Line line, look::State state, const QString &text);
    QTableView *m_vifView;
    QListView *m_findingsView;
};

} // namespace cb
