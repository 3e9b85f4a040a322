#pragma once

#include "core/base/Result.h"
#include "core/model/Study.h"

#include <QDateTime>
#include <QString>

#include <memory>

class QLockFile;

namespace cb {

// The recovery file: unsaved work written every few seconds, so that a crash
// or a kill loses little. It lives under the application's data directory
// (tests give their own) and is written atomically with cb::writeFileAtomically.
//
// Each open window has a slot of its own (recovery.json, recovery-2.json, ...), held with a lock
// file while the window lives, so that two windows never overwrite or discard each other's work.
// A window takes, first, the slot of a window that is gone and left work behind (its lock is
// free and its file is there: path() then names that file, and exists() is true, so the window
// offers it), else the first slot with no file and no owner. The slot is taken on first use.
class RecoveryStore
{
public:
    struct Recovered
    {
        Study study; // one factor's scheme or a design
        QString originalPath; // the file the work belonged to, empty when it was new
        QDateTime savedAt;
    };

    // An empty directory means QStandardPaths::AppDataLocation.
    explicit RecoveryStore(QString directory = {});
    ~RecoveryStore();
    RecoveryStore(const RecoveryStore &) = delete;
    RecoveryStore &operator=(const RecoveryStore &) = delete;

    QString path() const;
    bool exists() const;
    // Writes the study; returns an error message or an empty string.
    QString save(const Study &study, const QString &originalPath) const;
    Result<Recovered> load() const;
    // Moves an unreadable recovery file out of the way and returns its new path.
    QString setAside() const;
    void discard() const;

private:
    void claimSlot() const;
    QString slotPath(int slot) const;

    QString m_directory;
    mutable int m_slot = 0; // 0 until claimed
    mutable std::unique_ptr<QLockFile> m_lock;
};

} // namespace cb
