#pragma once
// Helpers shared by the data-reading and fitting tests: running the NumPy/pandas
// reference scripts in tests/python and writing scratch files.

#include <Eigen/Dense>

#include <QByteArray>
#include <QJsonArray>
#include <QFile>
#include <QJsonDocument>
#include <QJsonObject>
#include <QProcess>
#include <QString>
#include <QStringList>
#include <QTemporaryDir>

#include <vector>

namespace cb::test {

// Runs tests/python/<script> with CB_PYTHON; returns its standard output parsed as
// JSON, or an object {"error": ...} saying what went wrong.
inline QJsonObject runPython(const QString &script, const QStringList &args, const QByteArray &input = {})
{
    QProcess process;
    process.start(QStringLiteral(CB_PYTHON),
                  QStringList{QStringLiteral(CB_SOURCE_DIR "/tests/python/") + script} + args);
    if (!process.waitForStarted(30000))
        return {{QStringLiteral("error"), QStringLiteral("could not start " CB_PYTHON)}};
    process.write(input);
    process.closeWriteChannel();
    process.waitForFinished(120000);
    const QByteArray out = process.readAllStandardOutput();
    QJsonParseError error;
    const QJsonDocument doc = QJsonDocument::fromJson(out, &error);
    if (process.exitCode() != 0 || !doc.isObject())
        return {{QStringLiteral("error"), QString::fromUtf8(process.readAllStandardError() + out)}};
    return doc.object();
}

// Numbers and matrices as JSON arrays, for the reference scripts' input.
inline QJsonArray numbersJson(const std::vector<double> &v)
{
    QJsonArray a;
    for (double x : v)
        a.append(x);
    return a;
}

inline QJsonArray matrixJson(const Eigen::MatrixXd &m)
{
    QJsonArray rows;
    for (Eigen::Index i = 0; i < m.rows(); ++i) {
        QJsonArray row;
        for (Eigen::Index j = 0; j < m.cols(); ++j)
            row.append(m(i, j));
        rows.append(row);
    }
    return rows;
}

inline bool writeFile(const QString &path, const QByteArray &bytes)
{
    QFile f(path);
    return f.open(QIODevice::WriteOnly) && f.write(bytes) == bytes.size();
}

} // namespace cb::test
