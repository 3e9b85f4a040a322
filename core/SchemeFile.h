#pragma once

#include "Result.h"
#include "Scheme.h"

#include <QByteArray>
#include <QIODevice>
#include <QString>

namespace cb {

// The scheme file: versioned JSON of our own (see DEVELOPERS.md, "Scheme files").
inline constexpr int kSchemeFormatVersion = 1;
inline constexpr auto kSchemeFormatTag = "contrast-bench-scheme";

QByteArray schemeToJson(const Scheme &scheme);
// `where` names the source in messages (a path, "recovery file", ...).
Result<Scheme> schemeFromJson(const QByteArray &data, const QString &where);

Result<Scheme> loadScheme(const QString &path);
// Atomic: writes through QSaveFile, so a crash never leaves half a file. Returns an error message or empty.
QString saveScheme(const Scheme &scheme, const QString &path);

// The one atomic-save mechanism: writes data to path through QSaveFile and
// reports the path and the system's reason on failure. Returns an error message or empty.
QString writeFileAtomically(const QString &path, const QByteArray &data);
// Writes to an already open device (a test seam for devices that fail).
QString writeAll(QIODevice &device, const QByteArray &data, const QString &where);

} // namespace cb
