#pragma once

#include <QWidget>

class QComboBox;
class QLabel;
class QLineEdit;
class QPlainTextEdit;

namespace cb {

class Document;
class LevelsModel;
class LevelsView;

// The factor: its name, whether it is measured between or within participants, its levels (name, planned n, position) with buttons to
// add, remove and reorder them, and free notes about the study.
class LevelsPanel : public QWidget
{
    Q_OBJECT

public:
    explicit LevelsPanel(Document *document, QWidget *parent = nullptr);

    LevelsModel *model() const { return m_model; }
    LevelsView *view() const { return m_view; }
    QPlainTextEdit *notesEdit() const { return m_notes; }

public slots:
    void addLevel();
    void removeLevel();

signals:
    void message(const QString &text);

private:
    void follow();

    Document *m_document;
    LevelsModel *m_model;
    LevelsView *m_view;
    QLineEdit *m_factorName;
    QComboBox *m_measure; // between or within participants
    QPlainTextEdit *m_notes;
    QLabel *m_notice;
};

} // namespace cb
