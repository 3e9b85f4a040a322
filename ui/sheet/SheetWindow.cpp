#include "ui/sheet/SheetWindow.h"

#include "core/files/StudyFile.h"
#include "core/analysis/Compare.h"
#include "core/files/InputFile.h"
#include "core/files/SchemeFile.h"
#include "ui/common/Prompter.h"
#include "ui/document/Document.h"
#include "ui/sheet/SheetDocument.h"

#include <QComboBox>
#include <QDialogButtonBox>
#include <QFileInfo>
#include <QHBoxLayout>
#include <QLabel>
#include <QPrintPreviewDialog>
#include <QPrinter>
#include <QPushButton>
#include <QSignalBlocker>
#include <QTextCursor>
#include <QTextBrowser>
#include <QTextDocument>
#include <QVBoxLayout>

using namespace Qt::StringLiterals;

namespace cb {

SheetOptions documentSheetOptions(const Document &document)
{
    SheetOptions o;
    const QString path = document.filePath();
    o.title = path.isEmpty() ? QObject::tr("Untitled study") : QFileInfo(path).fileName();
    if (!path.isEmpty() && !document.isModified()) {
        if (auto bytes = readInput(path)) {
            o.fileBytes = bytes.take();
            o.fileName = QFileInfo(path).fileName();
        }
    }
    return o;
}

void saveSheetAs(QWidget *parent, const Document &document, Prompter &prompter, const SheetOptions &options, bool pdf)
{
    const QString base = document.filePath().isEmpty() ? u"study"_s : QFileInfo(document.filePath()).completeBaseName();
    FileQuestion q;
    q.title = pdf ? QObject::tr("Save the study sheet as PDF") : QObject::tr("Save the study sheet as HTML");
    q.start = (document.filePath().isEmpty() ? QString() : QFileInfo(document.filePath()).absolutePath() + u"/"_s) + base
              + (pdf ? u"-sheet.pdf"_s : u"-sheet.html"_s);
    q.filter = pdf ? QObject::tr("PDF (*.pdf)") : QObject::tr("Web page (*.html *.htm)");
    q.suffix = pdf ? u"pdf"_s : u"html"_s;
    const QString path = prompter.askSavePath(parent, q);
    if (path.isEmpty())
        return;
    const QString error = pdf ? writeSheetPdf(studySheet(document.study(), options, SheetPictures::ImageReferences), path)
                              : writeFileAtomically(path, studySheet(document.study(), options).html.toUtf8());
    if (!error.isEmpty())
        prompter.tell(parent, QObject::tr("Study sheet"), error);
}

void previewSheet(QWidget *parent, const Document &document, const SheetOptions &options)
{
    const auto doc = sheetTextDocument(studySheet(document.study(), options, SheetPictures::ImageReferences));
    QPrinter printer(QPrinter::HighResolution);
    printer.setPageSize(QPageSize(QPageSize::A4));
    printer.setPageMargins(QMarginsF(18, 18, 18, 18), QPageLayout::Millimeter);
    QPrintPreviewDialog preview(&printer, parent);
    preview.setWindowTitle(QObject::tr("Study sheet \u2014 print preview"));
    QObject::connect(&preview, &QPrintPreviewDialog::paintRequested, &preview, [&doc](QPrinter *p) { doc->print(p); });
    preview.exec();
}

CompareDialog::CompareDialog(const Document *document, Prompter *prompter, QWidget *parent)
    : QDialog(parent)
    , m_document(document)
    , m_prompter(prompter)
    , m_scheme(new QComboBox(this))
    , m_reference(new QComboBox(this))
    , m_page(new QTextBrowser(this))
{
    setWindowTitle(tr("Compare with another coding"));
    auto *pick = new QHBoxLayout;
    pick->addWidget(new QLabel(tr("Second coding:"), this));
    for (SchemeKind k : standardSchemes())
        m_scheme->addItem(schemeTitle(k), int(k));
    pick->addWidget(m_scheme, 1);
    pick->addWidget(new QLabel(tr("reference:"), this));
    pick->addWidget(m_reference, 1);
    auto *fromFile = new QPushButton(tr("From a file\u2026"), this);
    pick->addWidget(fromFile);
    auto *buttons = new QDialogButtonBox(QDialogButtonBox::Close, this);
    auto *layout = new QVBoxLayout(this);
    layout->addLayout(pick);
    layout->addWidget(m_page, 1);
    layout->addWidget(buttons);
    connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);
    connect(m_scheme, &QComboBox::currentIndexChanged, this, [this] {
        fillReferences();
        compareWith(SchemeKind(m_scheme->currentData().toInt()), m_reference->currentData().toInt());
    });
    connect(m_reference, &QComboBox::activated, this, [this] {
        compareWith(SchemeKind(m_scheme->currentData().toInt()), m_reference->currentData().toInt());
    });
    connect(fromFile, &QPushButton::clicked, this, [this] {
        const QString path = m_prompter->askOpenPath(this, studyToOpen(QFileInfo(m_document->filePath()).absolutePath()));
        if (!path.isEmpty())
            compareWithFile(path);
    });
    // Start with the question people ask most: the other of treatment and sum.
    const SchemeKind now = m_document->study().activeScheme().kind;
    m_scheme->setCurrentIndex(m_scheme->findData(int(now == SchemeKind::Sum ? SchemeKind::Treatment : SchemeKind::Sum)));
    resize(1100, 760);
}

void CompareDialog::fillReferences()
{
    const SchemeKind kind = SchemeKind(m_scheme->currentData().toInt());
    m_reference->clear();
    m_reference->setEnabled(schemeUsesReference(kind));
    if (!schemeUsesReference(kind))
        return;
    const QStringList levels = m_document->study().activeScheme().factor.levels;
    const int standard = defaultReference(kind, int(levels.size()));
    for (qsizetype i = 0; i < levels.size(); ++i)
        m_reference->addItem(levels[i], int(i));
    m_reference->setCurrentIndex(standard);
}

void CompareDialog::compareWith(SchemeKind kind, int reference)
{
    // The choosers show what is compared, also when a caller chose it.
    if (SchemeKind(m_scheme->currentData().toInt()) != kind) {
        const QSignalBlocker block(m_scheme);
        m_scheme->setCurrentIndex(m_scheme->findData(int(kind)));
        fillReferences();
    }
    if (reference >= 0 && m_reference->currentIndex() != reference)
        m_reference->setCurrentIndex(reference);
    SchemeOptions options;
    options.reference = reference;
    showComparison(recodedStudy(m_document->study(), kind, options));
}

void CompareDialog::compareWithFile(const QString &path)
{
    showComparison(loadStudy(path));
}

void CompareDialog::showComparison(const Result<Study> &second)
{
    if (!second) {
        m_page->setPlainText(second.error());
        return;
    }
    auto comparison = compareStudies(m_document->study(), second.value());
    if (!comparison) {
        m_page->setPlainText(comparison.error());
        return;
    }
    loadSheet(*m_page->document(), comparisonPage(comparison.value(), SheetPictures::ImageReferences));
    m_page->moveCursor(QTextCursor::Start);
}

} // namespace cb
