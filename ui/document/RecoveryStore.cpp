#include "ui/document/RecoveryStore.h"

#include "core/files/StudyFile.h"
#include "core/files/InputFile.h"
#include "core/files/SchemeFile.h"

#include <QDir>
#include <QFile>
#include <QJsonDocument>
#include <QJsonObject>
#include <QLockFile>
#include <QStandardPaths>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
const QString kFormat = u"contrast-bench-recovery"_s;
constexpr int kVersion = 1;
// More windows at once than anyone opens; beyond it the last slot is shared, as before slots.
constexpr int kMaxSlots = 64;
} // namespace

RecoveryStore::RecoveryStore(QString directory)
    : m_directory(directory.isEmpty() ? QStandardPaths::writableLocation(QStandardPaths::AppDataLocation) : std::move(directory))
{
}

RecoveryStore::~RecoveryStore() = default;

QString RecoveryStore::slotPath(int slot) const
{
    return QDir(m_directory).filePath(slot == 1 ? u"recovery.json"_s : u"recovery-%1.json"_s.arg(slot));
}

void RecoveryStore::claimSlot() const
{
    if (m_slot > 0)
        return;
    QDir().mkpath(m_directory);
    // First the work of windows that are gone (file present, lock free), then an empty free slot.
    for (const bool orphans : {true, false}) {
        for (int slot = 1; slot <= kMaxSlots; ++slot) {
            if (QFile::exists(slotPath(slot)) != orphans)
                continue;
            auto lock = std::make_unique<QLockFile>(slotPath(slot) + u".lock"_s);
            // Only a lock whose process is gone is stale, however long a window stays open.
            lock->setStaleLockTime(0);
            if (lock->tryLock(0)) {
                m_slot = slot;
                m_lock = std::move(lock);
                return;
            }
        }
    }
    m_slot = kMaxSlots; // no lock could be taken (an unwritable directory): save() reports it
}

QString RecoveryStore::path() const
{
    claimSlot();
    return slotPath(m_slot);
}

bool RecoveryStore::exists() const
{
    return QFile::exists(path());
}

QString RecoveryStore::save(const Study &study, const QString &originalPath) const
{
    if (!QDir().mkpath(m_directory))
        return u"%1: cannot create the directory for the recovery file"_s.arg(m_directory);
    QJsonObject root;
    root[u"format"_s] = kFormat;
    root[u"version"_s] = kVersion;
    root[u"original_path"_s] = originalPath;
    root[u"saved_at"_s] = QDateTime::currentDateTimeUtc().toString(Qt::ISODate);
    // The same object as a scheme or design file.
    root[u"scheme"_s] = QJsonDocument::fromJson(studyToJson(study)).object();
    return writeFileAtomically(path(), QJsonDocument(root).toJson(QJsonDocument::Compact));
}

Result<RecoveryStore::Recovered> RecoveryStore::load() const
{
    using R = Result<Recovered>;
    const QString where = path();
    auto data = readInput(where);
    if (!data)
        return R::failure(data.error());
    QJsonParseError error;
    const QJsonDocument doc = QJsonDocument::fromJson(*data, &error);
    if (error.error != QJsonParseError::NoError || !doc.isObject())
        return R::failure(u"%1: not valid JSON (%2)"_s.arg(where, error.errorString()));
    const QJsonObject root = doc.object();
    if (root.value(u"format"_s).toString() != kFormat)
        return R::failure(u"%1: field 'format': expected \"%2\""_s.arg(where, kFormat));
    if (root.value(u"version"_s).toInt() != kVersion)
        return R::failure(u"%1: field 'version': expected %2"_s.arg(where).arg(kVersion));
    if (!root.value(u"scheme"_s).isObject())
        return R::failure(u"%1: field 'scheme': expected an object"_s.arg(where));
    auto study = studyFromJson(QJsonDocument(root.value(u"scheme"_s).toObject()).toJson(), where);
    if (!study)
        return R::failure(study.error());
    Recovered r;
    r.study = study.take();
    r.originalPath = root.value(u"original_path"_s).toString();
    r.savedAt = QDateTime::fromString(root.value(u"saved_at"_s).toString(), Qt::ISODate);
    return R(std::move(r));
}

QString RecoveryStore::setAside() const
{
    const QString target = QDir(m_directory).filePath(
        u"recovery-unreadable-%1.json"_s.arg(QDateTime::currentDateTimeUtc().toString(u"yyyyMMdd-HHmmss-zzz"_s)));
    QFile::remove(target);
    return QFile::rename(path(), target) ? target : QString();
}

void RecoveryStore::discard() const
{
    QFile::remove(path());
}

} // namespace cb
