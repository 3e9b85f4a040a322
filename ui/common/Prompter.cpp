#include "ui/common/Prompter.h"

#include <QCoreApplication>
#include <QAbstractButton>
#include <QDialog>
#include <QDialogButtonBox>
#include <QFormLayout>
#include <QLabel>
#include <QLineEdit>
#include <QFileDialog>
#include <QMessageBox>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
QString tr(const char *text)
{
    return QCoreApplication::translate("cb::Prompter", text);
}
QString studyFilter()
{
    // New studies are saved as .cbstudy (a MIME type of our own, so that they open with a double-click);
    // the same JSON saved as .json opens too.
    return tr("Contrast Bench studies (*.cbstudy *.json);;All files (*)");
}
} // namespace

FileQuestion studyToOpen(const QString &startDirectory)
{
    return {tr("Open a scheme"), startDirectory, studyFilter(), {}};
}

FileQuestion studyToSave(const QString &suggestedPath)
{
    return {tr("Save the scheme"), suggestedPath, studyFilter(), u"cbstudy"_s};
}

Prompter &dialogPrompter()
{
    static DialogPrompter prompter;
    return prompter;
}

Prompter::SaveChoice DialogPrompter::askSaveChanges(QWidget *parent, const QString &documentName)
{
    QMessageBox box(QMessageBox::Warning, tr("Unsaved changes"),
                    tr("%1 has changes that are not saved.").arg(documentName),
                    QMessageBox::Save | QMessageBox::Discard | QMessageBox::Cancel, parent);
    box.setInformativeText(tr("Save them before going on?"));
    // Alt+S and Alt+D answer from the keyboard (the platform's own texts carry no mnemonic); Escape cancels.
    box.button(QMessageBox::Save)->setText(tr("&Save"));
    box.button(QMessageBox::Discard)->setText(tr("&Discard"));
    box.setDefaultButton(QMessageBox::Save);
    switch (box.exec()) {
    case QMessageBox::Save: return SaveChoice::Save;
    case QMessageBox::Discard: return SaveChoice::Discard;
    default: return SaveChoice::Cancel;
    }
}

QString DialogPrompter::askOpenPath(QWidget *parent, const FileQuestion &question)
{
    return QFileDialog::getOpenFileName(parent, question.title, question.start, question.filter);
}

QString DialogPrompter::askSavePath(QWidget *parent, const FileQuestion &question)
{
    QString path = QFileDialog::getSaveFileName(parent, question.title, question.start, question.filter);
    if (!path.isEmpty() && !question.suffix.isEmpty() && !path.contains(u'.'))
        path += u"."_s + question.suffix;
    return path;
}

bool DialogPrompter::askRestoreRecovery(QWidget *parent, const QString &description)
{
    QMessageBox box(QMessageBox::Question, tr("Restore unsaved work?"), description, QMessageBox::Yes | QMessageBox::No, parent);
    box.button(QMessageBox::Yes)->setText(tr("&Restore"));
    box.button(QMessageBox::No)->setText(tr("&Discard it"));
    box.setDefaultButton(QMessageBox::Yes);
    return box.exec() == QMessageBox::Yes;
}

void DialogPrompter::tell(QWidget *parent, const QString &title, const QString &message)
{
    QMessageBox::warning(parent, title, message);
}

bool DialogPrompter::askSummaryQuery(QWidget *parent, SummaryQuestion &question)
{
    QDialog dialog(parent);
    dialog.setWindowTitle(question.title);
    auto *form = new QFormLayout(&dialog);
    const auto field = [&](const QString &label, const QString &text, const QString &placeholder = {}) {
        auto *edit = new QLineEdit(text, &dialog);
        edit->setPlaceholderText(placeholder);
        edit->setMinimumWidth(320);
        form->addRow(label, edit);
        return edit;
    };
    QLineEdit *url = nullptr;
    if (question.withDatabase) {
        url = field(tr("Database:"), question.url, u"sqlite:///path/file.db, postgresql://user@host:5432/db, odbc:DSN"_s);
        auto *note = new QLabel(tr("A password is never typed here: PostgreSQL reads PGPASSWORD or ~/.pgpass, ODBC its "
                                   "data source. The connection only reads."), &dialog);
        note->setWordWrap(true);
        form->addRow(note);
    }
    QLineEdit *table = field(tr("Table:"), question.table);
    QList<QLineEdit *> factors;
    for (qsizetype i = 0; i < question.factorLabels.size(); ++i)
        factors << field(question.factorLabels[i] + u":"_s, question.factorColumns.value(i));
    QLineEdit *response = field(tr("Response column:"), question.response);
    QLineEdit *weight = field(tr("Case weight column:"), question.weight, tr("none"));
    QLineEdit *participant = field(tr("Participant column:"), question.participant, tr("none: separate groups"));
    participant->setToolTip(tr("For a factor measured within participants: the database first averages each participant's "
                               "trials per level, and the check is by participant."));
    QLineEdit *item = nullptr;
    if (question.withDatabase) {
        item = field(tr("Item column:"), question.item, tr("none: no by-item analysis"));
        item->setToolTip(tr("With a participant column: a second query averages each item's rows per level, for the by-item "
                            "analysis and min F\u2032 beside the by-participant one."));
    }
    auto *buttons = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel, &dialog);
    QObject::connect(buttons, &QDialogButtonBox::accepted, &dialog, &QDialog::accept);
    QObject::connect(buttons, &QDialogButtonBox::rejected, &dialog, &QDialog::reject);
    form->addRow(buttons);
    if (dialog.exec() != QDialog::Accepted)
        return false;
    if (url)
        question.url = url->text().trimmed();
    question.table = table->text();
    question.factorColumns.clear();
    for (QLineEdit *f : factors)
        question.factorColumns << f->text();
    question.response = response->text();
    question.weight = weight->text();
    question.participant = participant->text();
    if (item)
        question.item = item->text();
    return true;
}

} // namespace cb
