#pragma once

#include <QString>
#include <QStringList>

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

// Where the data live and which columns hold what, for the summary query (Check on data):
// filled in with what the panel knows, changed by the user. The database URL is asked for only
// when the query is to be run (withDatabase).
struct SummaryQuestion
{
    QString title;
    bool withDatabase = false;
    QString url;
    QString table;
    QStringList factorLabels;  // one per factor: "Level column", or the design's factor names
    QStringList factorColumns; // one per factor
    QString response;
    QString weight;
    QString participant; // empty: every row counts as its own (no participant column)
    QString item;        // with a participant column, reading from a database: the by-item analysis too
};

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
    // False when the user cancelled; otherwise the question holds the answers.
    virtual bool askSummaryQuery(QWidget *parent, SummaryQuestion &question) = 0;
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
    bool askSummaryQuery(QWidget *parent, SummaryQuestion &question) override;
};

// The real dialogs, for panels that no window has given a prompter.
Prompter &dialogPrompter();

} // namespace cb
