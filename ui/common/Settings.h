#pragma once

#include <QSettings>
#include <QString>

#include <memory>

namespace cb {

// The application's settings, or the INI file a test gives (the window's layout and the
// recent files read and write through this one function).
std::unique_ptr<QSettings> openSettings(const QString &file);

} // namespace cb
