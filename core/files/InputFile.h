#pragma once

#include "core/base/Result.h"

#include <QByteArray>
#include <QString>

namespace cb {

// The most any whole-file input (a scheme, design or recovery file) may hold.
inline constexpr qint64 kMaxInputBytes = 64 * 1024 * 1024;

// The one reader of whole-file inputs. Reads the input named by path once, as a stream, and
// stops beyond limit bytes whatever the file reports (a device or pipe reports 0). "-" is
// standard input; pipes and FIFOs are read as they come. A folder or a device (/dev/zero,
// /dev/null) is refused with a message naming the path and what was expected.
Result<QByteArray> readInput(const QString &path, qint64 limit = kMaxInputBytes);

// Why path cannot be read as an input, or empty: missing, a folder, a device. "-" (standard
// input) and FIFOs pass. expected names what was wanted ("a data file").
QString inputPathProblem(const QString &path, const QString &expected);

// How messages name an input: the path, or "standard input" for "-".
QString inputLabel(const QString &path);

} // namespace cb
