#include "ui/common/Prompter.h"

#include <QCoreApplication>
#include <QAbstractButton>
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

} // namespace cb
