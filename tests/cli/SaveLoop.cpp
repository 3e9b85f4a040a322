// Test helper for TestCrashSafety: saves a large file again and again through
// cb::writeFileAtomically until it is killed.
// Usage: SaveLoop PATH MEGABYTES. SaveLoop --check PATH prints the generation of a
// complete, intact version at PATH and exits 0, or says what is wrong and exits 1.
// Each version is "CBSAVE <generation> <length>\n", <length> bytes of a pattern that
// depends on the generation's parity, then "END <checksum>\n".
// It prints "saving <generation>" before each save and "saved <generation>" after it.
#include "core/files/SchemeFile.h"

#include <QByteArray>
#include <QFile>
#include <QList>
#include <QString>

#include <cstdio>
#include <cstdlib>

namespace {

// The body of a version: a pattern and its checksum line, the same for every generation
// of one parity, so that the loop spends its time writing rather than computing.
QByteArray body(long long generation, qsizetype length)
{
    QByteArray b(length, '\0');
    unsigned long long x = 0x9E3779B97F4A7C15ull * static_cast<unsigned long long>(generation % 2 + 1);
    unsigned long long sum = 0;
    for (qsizetype i = 0; i < length; ++i) {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        b[i] = static_cast<char>('a' + x % 26);
        sum = sum * 31 + static_cast<unsigned char>(b[i]);
    }
    return b + "END " + QByteArray::number(sum) + '\n';
}

QByteArray header(long long generation, qsizetype length)
{
    return "CBSAVE " + QByteArray::number(generation) + ' ' + QByteArray::number(length) + '\n';
}

// The generation of a complete version, or -1.
long long check(const QByteArray &data)
{
    const qsizetype eol = data.indexOf('\n');
    const QList<QByteArray> head = data.left(eol).split(' ');
    if (eol < 0 || head.size() != 3 || head[0] != "CBSAVE")
        return -1;
    const long long generation = head[1].toLongLong();
    const qsizetype length = head[2].toLongLong();
    if (generation < 1 || length < 0 || length > data.size())
        return -1;
    return data == header(generation, length) + body(generation, length) ? generation : -1;
}

} // namespace

int main(int argc, char **argv)
{
    if (argc == 3 && QByteArray(argv[1]) == "--check") {
        QFile f(QString::fromLocal8Bit(argv[2]));
        const long long generation = f.open(QIODevice::ReadOnly) ? check(f.readAll()) : -1;
        if (generation < 0) {
            std::printf("damaged\n");
            return 1;
        }
        std::printf("%lld\n", generation);
        return 0;
    }
    if (argc != 3) {
        std::fprintf(stderr, "usage: SaveLoop PATH MEGABYTES\n");
        return 2;
    }
    const QString path = QString::fromLocal8Bit(argv[1]);
    const qsizetype length = qsizetype(std::atoi(argv[2])) * 1024 * 1024;
    // Even and odd generations differ in length and content.
    const QByteArray bodies[2] = {body(0, length), body(1, length + 777)};
    for (long long generation = 1;; ++generation) {
        const qsizetype n = length + (generation % 2 ? 777 : 0);
        std::printf("saving %lld\n", generation);
        std::fflush(stdout);
        const QString e = cb::writeFileAtomically(path, header(generation, n) + bodies[generation % 2]);
        if (!e.isEmpty()) {
            std::fprintf(stderr, "%s\n", e.toUtf8().constData());
            return 1;
        }
        std::printf("saved %lld\n", generation);
        std::fflush(stdout);
    }
}
