#pragma once

#include "core/export/Export.h"

#include <QDialog>

class QCheckBox;
class QComboBox;
class QLabel;
class QLineEdit;
class QPlainTextEdit;
class QPushButton;
class QRadioButton;

namespace cb {

class Document;
class Prompter;

// File ▸ Export…: the coding or hypothesis matrix as text for another
// program, in one of core's formats. The preview is exactly what is copied or
// saved; it follows the options and the document as they change.
class ExportDialog : public QDialog
{
    Q_OBJECT

public:
    enum class Matrix { Coding, Hypotheses };

    explicit ExportDialog(Document *document, QWidget *parent = nullptr);

    void setFormat(ExportFormat format);
    ExportFormat format() const;
    void setMatrix(Matrix matrix);
    void setExact(bool exact);
    void setVariableName(const QString &name);

    // The text that Copy and Save use; empty when the matrix cannot be written.
    QString text() const { return m_text; }
    // Core's message when there is no text (a rank-deficient coding, ...).
    QString problem() const { return m_problem; }
    QPlainTextEdit *preview() const { return m_preview; }

    // Who answers "save where?" (the window's prompter; the real dialog by default).
    void setPrompter(Prompter *prompter) { m_prompter = prompter; }

public slots:
    void copyToClipboard();
    // Asks for a path and saves there. Returns whether the file was written.
    bool save();
    // Writes the text to path atomically; returns an error message naming the path, or empty.
    QString saveTo(const QString &path);

private:
    void refresh();
    QString suggestedPath() const;

    Document *m_document;
    Prompter *m_prompter;
    QComboBox *m_format;
    QRadioButton *m_coding;
    QRadioButton *m_hypotheses;
    QCheckBox *m_exact;
    QLineEdit *m_variable;
    QPlainTextEdit *m_preview;
    QLabel *m_status;
    QPushButton *m_copyButton;
    QPushButton *m_saveButton;
    QString m_text;
    QString m_problem;
    QString m_lastDirectory;
};

} // namespace cb
