#include "ui/document/RecentFiles.h"

#include "ui/common/Settings.h"

#include <QFileInfo>
#include <QSettings>

#include <memory>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

const QString kKey = u"files/recent"_s;

} // namespace

RecentFiles::RecentFiles(QString settingsFile)
    : m_settingsFile(std::move(settingsFile))
{
}

QStringList RecentFiles::paths() const
{
    return openSettings(m_settingsFile)->value(kKey).toStringList();
}

void RecentFiles::store(const QStringList &paths)
{
    openSettings(m_settingsFile)->setValue(kKey, paths);
}

void RecentFiles::add(const QString &path)
{
    const QString absolute = QFileInfo(path).absoluteFilePath();
    QStringList p = paths();
    p.removeAll(absolute);
    p.prepend(absolute);
    while (p.size() > kMaxEntries)
        p.removeLast();
    store(p);
}

void RecentFiles::remove(const QString &path)
{
    QStringList p = paths();
    p.removeAll(QFileInfo(path).absoluteFilePath());
    p.removeAll(path);
    store(p);
}

void RecentFiles::clear()
{
    store({});
}

} // namespace cb
