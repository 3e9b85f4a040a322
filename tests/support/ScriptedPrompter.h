#pragma once

#include "ui/common/Prompter.h"

#include <QStringList>

// Answers the window's questions from a script, and records what was asked.
class ScriptedPrompter final : public cb::Prompter
{
public:
    SaveChoice saveChoice = SaveChoice::Cancel;
    QString openPath;
    QString savePath;
    bool restore = true;

    int saveQuestions = 0;
    int restoreQuestions = 0;
    QStringList told; // titles and messages of the warnings shown

    SaveChoice askSaveChanges(QWidget *, const QString &) override
    {
        ++saveQuestions;
        return saveChoice;
    }
    QString askOpenPath(QWidget *, const QString &) override { return openPath; }
    QString askSavePath(QWidget *, const QString &) override { return savePath; }
    bool askRestoreRecovery(QWidget *, const QString &) override
    {
        ++restoreQuestions;
        return restore;
    }
    void tell(QWidget *, const QString &title, const QString &message) override { told << title + QStringLiteral(": ") + message; }
};
