#pragma once

#include "core/report/StudySheet.h"

#include <QDialog>

class QComboBox;
class QTextBrowser;
class QWidget;

namespace cb {

class Document;
class Prompter;

// The study sheet of the window's study: the options the window gives (title and checksum from
// the saved file when the study is unchanged since it was saved, else the study as it would be
// written), and the three ways out of File > Study sheet: HTML, PDF, print (with a preview).
SheetOptions documentSheetOptions(const Document &document);
// Asks for a file (through the prompter) and writes the sheet there; says what went wrong.
void saveSheetAs(QWidget *parent, const Document &document, Prompter &prompter, const SheetOptions &options, bool pdf);
void previewSheet(QWidget *parent, const Document &document, const SheetOptions &options);

// The window's study beside the same factor (or design) under a second coding: a standard scheme
// chosen in the dialog, or a saved file. The page is core's (comparisonPage), shown as rich text.
class CompareDialog : public QDialog
{
    Q_OBJECT

public:
    CompareDialog(const Document *document, Prompter *prompter, QWidget *parent = nullptr);
    // The second coding: a standard scheme (its id) with a reference level (-1: the default).
    void compareWith(SchemeKind kind, int reference = -1);
    void compareWithFile(const QString &path);
    QTextBrowser *page() const { return m_page; }

private:
    void showComparison(const Result<Study> &second);
    void fillReferences();

    const Document *m_document;
    Prompter *m_prompter;
    QComboBox *m_scheme;
    QComboBox *m_reference;
    QTextBrowser *m_page;
};

} // namespace cb
