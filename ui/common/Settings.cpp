#include "ui/common/Settings.h"

namespace cb {

std::unique_ptr<QSettings> openSettings(const QString &file)
{
    return file.isEmpty() ? std::make_unique<QSettings>() : std::make_unique<QSettings>(file, QSettings::IniFormat);
}

} // namespace cb
