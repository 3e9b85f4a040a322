#pragma once

#include <QString>

class QWidget;

namespace cb {

// Which file to ask for: the dialog's title, where it starts (a folder, or the suggested file
// when saving), the filter ("Delimited text (*.csv *.tsv);;All files (*)") and the suffix a
// saved name without one receives (empty: none).
struct FileQuestion
{
    QString title;
    QString start;
    QString filter;
    QString suffix;
};

// A study to open from, or save to (.cbstudy, .json opens too).
FileQuestion studyToOpen(const QString &startDirectory);
FileQuestion studyToSave(const QString &suggestedPath);

// Every question the window asks the user goes through here, file dialogs included, so tests
// can answer in advance instead of clicking dialogs.
class Prompter
{
public:
    enum class SaveChoice { Save, Discard, Cancel };

    virtual ~Prompter() = default;
    virtual SaveChoice askSaveChanges(QWidget *parent, const QString &documentName) = 0;
    // An empty path means the user cancelled.
    virtual QString askOpenPath(QWidget *parent, const FileQuestion &question) = 0;
    virtual QString askSavePath(QWidget *parent, const FileQuestion &question) = 0;
    virtual bool askRestoreRecovery(QWidget *parent, const QString &description) = 0;
    virtual void tell(QWidget *parent, const QString &title, const QString &message) = 0;
};

// The real dialogs.
class DialogPrompter final : public Prompter
{
public:
    SaveChoice askSaveChanges(QWidget *parent, const QString &documentName) override;
    QString askOpenPath(QWidget *parent, const FileQuestion &question) override;
    QString askSavePath(QWidget *parent, const FileQuestion &question) override;
    bool askRestoreRecovery(QWidget *parent, const QString &description) override;
    void tell(QWidget *parent, const QString &title, const QString &message) override;
};

// The real dialogs, for panels that no window has given a prompter.
Prompter &dialogPrompter();

} // namespace cb
