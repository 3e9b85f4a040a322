#include "ui/export/ExportDialog.h"
#include "ui/common/WrapLabel.h"

#include "ui/document/Document.h"
#include "ui/common/Look.h"
#include "ui/common/Prompter.h"
#include "core/files/SchemeFile.h"

#include <QApplication>
#include <QButtonGroup>
#include <QCheckBox>
#include <QClipboard>
#include <QComboBox>
#include <QDialogButtonBox>
#include <QDir>
#include <QFileInfo>
#include <QFontDatabase>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QLabel>
#include <QLineEdit>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QRadioButton>
#include <QVBoxLayout>

using namespace Qt::StringLiterals;

namespace cb {

ExportDialog::ExportDialog(Document *document, QWidget *parent)
    : QDialog(parent)
    , m_document(document)
    , m_prompter(&dialogPrompter())
    , m_format(new QComboBox(this))
    , m_coding(new QRadioButton(tr("C&oding (one row per level)"), this))
    , m_hypotheses(new QRadioButton(tr("&Hypotheses (one row per coefficient)"), this))
    , m_exact(new QCheckBox(tr("&Exact fractions where the weights are exact"), this))
    , m_variable(new QLineEdit(this))
    , m_preview(new QPlainTextEdit(this))
    , m_status(new WrapLabel(this))
    , m_copyButton(new QPushButton(tr("&Copy to clipboard"), this))
    , m_saveButton(new QPushButton(tr("&Save\u2026"), this))
{
    setObjectName(u"exportDialog"_s);
    setWindowTitle(tr("Export a matrix"));
    for (ExportFormat f : exportFormats())
        m_format->addItem(exportFormatTitle(f), QVariant::fromValue(int(f)));
    m_coding->setChecked(true);
    auto *matrixGroup = new QButtonGroup(this);
    matrixGroup->addButton(m_coding);
    matrixGroup->addButton(m_hypotheses);
    m_exact->setChecked(true);
    m_variable->setPlaceholderText(tr("name used in code (default: from the matrix)"));
    m_preview->setReadOnly(true);
    m_preview->setObjectName(u"exportPreview"_s);
    m_preview->setLineWrapMode(QPlainTextEdit::NoWrap);
    m_preview->setFont(QFontDatabase::systemFont(QFontDatabase::FixedFont));
    m_status->setObjectName(u"exportStatus"_s);

    auto *matrixBox = new QVBoxLayout;
    matrixBox->addWidget(m_coding);
    matrixBox->addWidget(m_hypotheses);
    auto *form = new QFormLayout;
    form->addRow(tr("&Format:"), m_format);
    form->addRow(tr("Matrix:"), matrixBox);
    form->addRow(tr("Numbers:"), m_exact);
    form->addRow(tr("&Variable:"), m_variable);

    auto *buttons = new QDialogButtonBox(QDialogButtonBox::Close, this);
    buttons->addButton(m_copyButton, QDialogButtonBox::ActionRole);
    buttons->addButton(m_saveButton, QDialogButtonBox::ActionRole);
    connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);
    connect(m_copyButton, &QPushButton::clicked, this, &ExportDialog::copyToClipboard);
    connect(m_saveButton, &QPushButton::clicked, this, &ExportDialog::save);

    auto *layout = new QVBoxLayout(this);
    layout->addLayout(form);
    layout->addWidget(new QLabel(tr("Preview \u2014 exactly the text that is copied or saved:"), this));
    layout->addWidget(m_preview, 1);
    layout->addWidget(m_status);
    layout->addWidget(buttons);

    connect(m_format, &QComboBox::currentIndexChanged, this, &ExportDialog::refresh);
    connect(m_coding, &QRadioButton::toggled, this, &ExportDialog::refresh);
    connect(m_exact, &QCheckBox::toggled, this, &ExportDialog::refresh);
    connect(m_variable, &QLineEdit::textChanged, this, &ExportDialog::refresh);
    connect(document, &Document::changed, this, &ExportDialog::refresh);
    resize(720, 560);
    refresh();
}

ExportFormat ExportDialog::format() const
{
    return ExportFormat(m_format->currentData().toInt());
}

void ExportDialog::setFormat(ExportFormat format)
{
    m_format->setCurrentIndex(m_format->findData(QVariant::fromValue(int(format))));
}

void ExportDialog::setMatrix(Matrix matrix)
{
    (matrix == Matrix::Coding ? m_coding : m_hypotheses)->setChecked(true);
}

void ExportDialog::setExact(bool exact)
{
    m_exact->setChecked(exact);
}

void ExportDialog::setVariableName(const QString &name)
{
    m_variable->setText(name);
}

void ExportDialog::refresh()
{
    // A design is exported over its cells: one row per cell, the first factor varying slowest.
    const bool design = m_document->isDesign();
    const Result<ExportTable> table = m_coding->isChecked()
        ? codingTable(design ? m_document->designAnalysis().cellScheme : m_document->scheme())
        : hypothesisTable(design ? m_document->designAnalysis().analysis : m_document->analysis());
    Result<QString> text = table ? exportTable(*table, format(), ExportOptions{m_exact->isChecked(), m_variable->text().trimmed()})
                                 : Result<QString>::failure(table.error());
    m_text = text ? *text : QString();
    m_problem = text ? QString() : text.error();
    if (text) {
        m_preview->setPlainText(m_text);
        m_preview->setEnabled(true);
        QStringList status;
        if (design)
            status << tr("A design: one row per cell, the first factor varying slowest.");
        if (m_text.contains(u"\r\n"_s))
            status << tr("Lines end in CR LF, as RFC 4180 asks.");
        m_status->setText(status.join(u' '));
    } else {
        m_preview->setPlainText(look::mark(look::State::Problem) + u" "_s + m_problem);
        m_preview->setEnabled(false);
        m_status->setText(tr("Nothing to copy or save until this is resolved."));
    }
    m_copyButton->setEnabled(text.ok());
    m_saveButton->setEnabled(text.ok());
}

void ExportDialog::copyToClipboard()
{
    if (m_text.isEmpty())
        return;
    QApplication::clipboard()->setText(m_text);
    m_status->setText(tr("Copied %1 characters to the clipboard.").arg(m_text.size()));
}

QString ExportDialog::suggestedPath() const
{
    const QString name = m_variable->text().trimmed().isEmpty() ? (m_coding->isChecked() ? u"coding"_s : u"hypotheses"_s)
                                                                : exportIdentifier(m_variable->text());
    QString dir = m_lastDirectory;
    if (dir.isEmpty() && !m_document->filePath().isEmpty())
        dir = QFileInfo(m_document->filePath()).absolutePath();
    const QString file = name + u"."_s + exportFormatSuffix(format());
    return dir.isEmpty() ? file : QDir(dir).filePath(file);
}

bool ExportDialog::save()
{
    if (m_text.isEmpty())
        return false;
    const QString path = m_prompter->askSavePath(
        this, {tr("Save the matrix"), suggestedPath(),
               tr("%1 (*.%2);;All files (*)").arg(exportFormatTitle(format()), exportFormatSuffix(format())), {}});
    if (path.isEmpty())
        return false;
    const QString error = saveTo(path);
    return error.isEmpty();
}

QString ExportDialog::saveTo(const QString &path)
{
    if (m_text.isEmpty()) {
        m_status->setText(m_problem);
        return m_problem;
    }
    const QString error = writeFileAtomically(path, m_text.toUtf8());
    if (!error.isEmpty()) {
        m_status->setText(look::markedLine(look::State::Problem, error));
        return error;
    }
    m_lastDirectory = QFileInfo(path).absolutePath();
    m_status->setText(tr("Saved %1").arg(QDir::toNativeSeparators(path)));
    return {};
}

} // namespace cb
