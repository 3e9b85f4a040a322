#include "core/files/InputFile.h"

#include <QFile>

#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <system_error>

using namespace Qt::StringLiterals;

namespace cb {

QString inputLabel(const QString &path)
{
    return path == u"-"_s ? u"standard input"_s : path;
}

namespace {

QString sizeText(qint64 bytes)
{
    constexpr qint64 kMiB = 1024 * 1024;
    return bytes % kMiB == 0 ? u"%1 MiB"_s.arg(bytes / kMiB) : u"%1 bytes"_s.arg(bytes);
}

} // namespace

QString inputPathProblem(const QString &path, const QString &expected)
{
    if (path == u"-"_s)
        return {};
    if (path.isEmpty())
        return u"no file given; expected a path, or - for standard input"_s;
    if (path.startsWith(u':'))
        return QFile::exists(path) ? QString() : u"%1: no such file"_s.arg(path); // a Qt resource (the demos)
    namespace fs = std::filesystem;
    std::error_code ec;
    switch (fs::status(fs::path(path.toStdU16String()), ec).type()) {
    case fs::file_type::not_found:
        return u"%1: no such file"_s.arg(path);
    case fs::file_type::directory:
        return u"%1 is a folder; expected %2"_s.arg(path, expected);
    case fs::file_type::character:
    case fs::file_type::block:
    case fs::file_type::socket:
        return u"%1 is a device, not a file; expected %2, a pipe, or - for standard input"_s.arg(path, expected);
    default:
        return {}; // a regular file, a FIFO, or one whose type the system would not tell: opening it says why
    }
}

Result<QByteArray> readInput(const QString &path, qint64 limit)
{
    using R = Result<QByteArray>;
    const QString where = inputLabel(path);
    QFile f;
    if (path == u"-"_s) {
        if (!f.open(stdin, QIODevice::ReadOnly))
            return R::failure(u"%1: cannot be read: %2"_s.arg(where, f.errorString()));
    } else {
        if (const QString problem = inputPathProblem(path, u"a file"_s); !problem.isEmpty())
            return R::failure(problem);
        f.setFileName(path);
        if (!f.open(QIODevice::ReadOnly))
            return R::failure(u"%1: cannot open the file: %2"_s.arg(where, f.errorString()));
    }
    // In blocks, never trusting size(): a pipe or a growing file reports less than it holds.
    QByteArray data;
    constexpr qint64 kBlock = 1 << 16;
    for (;;) {
        const qint64 before = data.size();
        const qint64 want = std::min(kBlock, limit + 1 - before);
        data.resize(before + want);
        const qint64 got = f.read(data.data() + before, want);
        if (got < 0)
            return R::failure(u"%1: could not be read: %2"_s.arg(where, f.errorString()));
        data.resize(before + got);
        if (data.size() > limit)
            return R::failure(u"%1: more than %2; such files are at most %2"_s.arg(where, sizeText(limit)));
        if (got == 0)
            return R(std::move(data));
    }
}

} // namespace cb
