#pragma once

#include "Result.h"
#include "Study.h"

#include <QDateTime>
#include <QString>

namespace cb {

// The recovery file: unsaved work written every few seconds, so that a crash
// or a kill loses little. It lives under the application's data directory
// (tests give their own) and is written atomically with cb::writeFileAtomically.
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

    QString path() const;
    bool exists() const;
    // Writes the study; returns an error message or an empty string.
    QString save(const Study &study, const QString &originalPath) const;
    Result<Recovered> load() const;
    // Moves an unreadable recovery file out of the way and returns its new path.
    QString setAside() const;
    void discard() const;

private:
    QString m_directory;
};

} // namespace cb
