#pragma once

#include <QString>

class QWidget;

namespace cb {

// Every question the window asks the user goes through here, so tests can
// answer in advance instead of clicking dialogs.
class Prompter
{
public:
    enum class SaveChoice { Save, Discard, Cancel };

    virtual ~Prompter() = default;
    virtual SaveChoice askSaveChanges(QWidget *parent, const QString &documentName) = 0;
    // An empty path means the user cancelled.
    virtual QString askOpenPath(QWidget *parent, const QString &startDirectory) = 0;
    virtual QString askSavePath(QWidget *parent, const QString &suggestedPath) = 0;
    virtual bool askRestoreRecovery(QWidget *parent, const QString &description) = 0;
    virtual void tell(QWidget *parent, const QString &title, const QString &message) = 0;
};

// The real dialogs.
class DialogPrompter final : public Prompter
{
public:
    SaveChoice askSaveChanges(QWidget *parent, const QString &documentName) override;
    QString askOpenPath(QWidget *parent, const QString &startDirectory) override;
    QString askSavePath(QWidget *parent, const QString &suggestedPath) override;
    bool askRestoreRecovery(QWidget *parent, const QString &description) override;
    void tell(QWidget *parent, const QString &title, const QString &message) override;
};

} // namespace cb
