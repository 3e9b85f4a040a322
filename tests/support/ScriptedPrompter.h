#pragma once

#include "ui/common/Prompter.h"

#include <QList>
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
    QList<cb::FileQuestion> fileQuestions; // every file asked for, in order

    SaveChoice askSaveChanges(QWidget *, const QString &) override
    {
        ++saveQuestions;
        return saveChoice;
    }
    QString askOpenPath(QWidget *, const cb::FileQuestion &question) override
    {
        fileQuestions << question;
        return openPath;
    }
    QString askSavePath(QWidget *, const cb::FileQuestion &question) override
    {
        fileQuestions << question;
        return savePath;
    }
    bool askRestoreRecovery(QWidget *, const QString &) override
    {
        ++restoreQuestions;
        return restore;
    }
    void tell(QWidget *, const QString &title, const QString &message) override { told << title + QStringLiteral(": ") + message; }

    // The summary-query form: the answers given (empty fields keep what the panel filled in);
    // summaryCancel answers Cancel. Every question asked is kept.
    cb::SummaryQuestion summaryAnswer;
    bool summaryCancel = false;
    QList<cb::SummaryQuestion> summaryQuestions;
    bool askSummaryQuery(QWidget *, cb::SummaryQuestion &question) override
    {
        summaryQuestions << question;
        if (summaryCancel)
            return false;
        const auto take = [](QString &field, const QString &answer) {
            if (!answer.isEmpty())
                field = answer;
        };
        take(question.url, summaryAnswer.url);
        take(question.table, summaryAnswer.table);
        take(question.response, summaryAnswer.response);
        take(question.weight, summaryAnswer.weight);
        take(question.participant, summaryAnswer.participant);
        take(question.item, summaryAnswer.item);
        if (!summaryAnswer.factorColumns.isEmpty())
            question.factorColumns = summaryAnswer.factorColumns;
        return true;
    }
};
