#pragma once

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
    QLabel *m_summary;
    QTableView *m_vifView;
    QListView *m_findingsView;
};

} // namespace cb
