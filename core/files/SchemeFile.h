#pragma once

#include "core/base/Result.h"
#include "core/model/Scheme.h"

#include <QByteArray>
#include <QIODevice>
#include <QJsonObject>
#include <QString>

namespace cb {

// The scheme file: versioned JSON of our own (see DEVELOPERS.md, "Scheme files").
// Version 1: one factor. Version 2: also designs of several crossed factors (core/Design.h).
inline constexpr int kSchemeFormatVersion = 2;
inline constexpr auto kSchemeFormatTag = "contrast-bench-scheme";

QByteArray schemeToJson(const Scheme &scheme);
// The whole file as an object (format and version with the body), for files that add to it.
QJsonObject schemeDocument(const Scheme &scheme);
// The body of a scheme (factor, scheme, intercept, columns, notes) without format and version;
// designs hold one per factor.
QJsonObject schemeToObject(const Scheme &scheme);
// Reads a body; messages name fields as "<prefix><field>", e.g. "design.factors[1].columns[0]".
Result<Scheme> schemeFromObject(const QJsonObject &object, const QString &where, const QString &prefix);
// Parses a file and checks its format tag and version.
Result<QJsonObject> schemeDocumentRoot(const QByteArray &data, const QString &where);
// `where` names the source in messages (a path, "recovery file", ...).
Result<Scheme> schemeFromJson(const QByteArray &data, const QString &where);

// Atomic: writes through QSaveFile, so a crash never leaves half a file. Returns an error message or empty.
QString saveScheme(const Scheme &scheme, const QString &path);

// The one atomic-save mechanism: writes data to path through QSaveFile and
// reports the path and the system's reason on failure. Returns an error message or empty.
QString writeFileAtomically(const QString &path, const QByteArray &data);
// Writes to an already open device (a test seam for devices that fail).
QString writeAll(QIODevice &device, const QByteArray &data, const QString &where);

} // namespace cb
