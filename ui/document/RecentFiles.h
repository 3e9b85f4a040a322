#pragma once

#include <QString>
#include <QStringList>

namespace cb {

// The recently opened or saved scheme files, newest first, kept in QSettings.
// Tests give their own settings file.
class RecentFiles
{
public:
    // An empty settingsFile means the application's usual settings.
    explicit RecentFiles(QString settingsFile = {});

    QStringList paths() const;
    void add(const QString &path);
    void remove(const QString &path);
    void clear();

    static constexpr int kMaxEntries = 8;

private:
    void store(const QStringList &paths);
    QString m_settingsFile;
};

} // namespace cb
