#pragma once
// Shared by the NumPy cross-check tests: writes schemes' design matrices, runs
// tests/python/crosscheck_analysis.py with Debian's NumPy, and compares.
#include "core/analysis/Analysis.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QProcess>
#include <QTemporaryDir>
#include <QTest>

#include <cmath>
#include <limits>

namespace cb::testing {

struct CrossCheckCounts
{
    int deficient = 0;
    int partial = 0;
    int exact = 0;
    int vifCompared = 0;
};

inline double relativeError(double a, double b)
{
    return std::abs(a - b) / std::max(std::abs(b), 1e-300);
}

// Runs NumPy on the schemes and compares rank, hypotheses, condition number and indices and VIF
// to 1e-9 relative, or, for an ill-conditioned problem, to the accuracy its conditioning permits
// any backward-stable method (NumPy's included): 10 eps times the condition number of the design
// (for the hypotheses and singular values) or of the correlation matrix (for the VIFs), when that
// is coarser than 1e-9. Returns false (with a test failure recorded) on the first disagreement.
inline bool compareWithNumpy(const std::vector<Scheme> &schemes, const std::vector<Analysis> &analyses, CrossCheckCounts &counts)
{
    using namespace Qt::StringLiterals;
    QJsonArray cases;
    for (const Scheme &s : schemes) {
        QJsonArray x;
        for (int i = 0; i < s.levelCount(); ++i) {
            QJsonArray row;
            if (s.intercept)
                row.append(1.0);
            for (const Column &col : s.columns)
                row.append(col.weights[size_t(i)].value());
            x.append(row);
        }
        QJsonArray nj;
        for (double v : s.factor.sizesAsDouble())
            nj.append(v);
        cases.append(QJsonObject{{u"x"_s, x}, {u"n"_s, nj}, {u"intercept"_s, s.intercept}});
    }
    QTemporaryDir dir;
    [&] { QVERIFY(dir.isValid()); }();
    QFile in(dir.filePath(u"cases.json"_s));
    if (!in.open(QIODevice::WriteOnly))
        return false;
    in.write(QJsonDocument(cases).toJson(QJsonDocument::Compact));
    in.close();
    QProcess py;
    py.start(QString::fromUtf8(CB_PYTHON), {QString::fromUtf8(CB_SOURCE_DIR) + u"/tests/python/crosscheck_analysis.py"_s,
                                           in.fileName(), dir.filePath(u"numpy.json"_s)});
    bool ok = true;
    [&] {
        QVERIFY(py.waitForFinished(300000));
        QVERIFY2(py.exitCode() == 0, py.readAllStandardError().constData());
        QFile outFile(dir.filePath(u"numpy.json"_s));
        QVERIFY(outFile.open(QIODevice::ReadOnly));
        const QJsonArray ref = QJsonDocument::fromJson(outFile.readAll()).array();
        QCOMPARE(ref.size(), qsizetype(analyses.size()));
        for (qsizetype c = 0; c < ref.size(); ++c) {
            const QJsonObject r = ref[c].toObject();
            const Analysis &a = analyses[size_t(c)];
            const QString where = u"case %1 (k=%2, p=%3)"_s.arg(c).arg(a.levelCount).arg(a.coefficientCount);
            QVERIFY2(a.rank == r[u"rank"_s].toInt(), qPrintable(where + u": rank %1, NumPy %2"_s.arg(a.rank).arg(r[u"rank"_s].toInt())));
            counts.exact += a.exact ? 1 : 0;
            if (!a.fullRank) {
                ++counts.deficient;
                QVERIFY(!a.dependencies.isEmpty());
                QVERIFY(a.hypotheses.empty());
                continue;
            }
            counts.partial += a.dependsOnSizes ? 1 : 0;
            constexpr double eps = std::numeric_limits<double>::epsilon();
            const double tol = std::max(1e-9, 10 * eps * r[u"cond"_s].toDouble());
            const QJsonArray h = r[u"h"_s].toArray();
            double maxAbs = 0, maxDiff = 0;
            for (int i = 0; i < a.coefficientCount; ++i)
                for (int j = 0; j < a.levelCount; ++j) {
                    const double want = h[i].toArray()[j].toDouble();
                    maxAbs = std::max(maxAbs, std::abs(want));
                    maxDiff = std::max(maxDiff, std::abs(a.hypothesisValues(i, j) - want));
                }
            QVERIFY2(maxDiff <= tol * maxAbs, qPrintable(where + u": hypothesis matrix differs by %1 (scale %2)"_s.arg(maxDiff).arg(maxAbs)));
            QVERIFY2(a.conditionNumber.has_value(), qPrintable(where));
            QVERIFY2(relativeError(*a.conditionNumber, r[u"cond"_s].toDouble()) <= tol,
                     qPrintable(where + u": condition number %1, NumPy %2"_s.arg(*a.conditionNumber).arg(r[u"cond"_s].toDouble())));
            const QJsonArray idx = r[u"indices"_s].toArray();
            for (int i = 0; i < a.coefficientCount; ++i)
                QVERIFY2(relativeError(a.conditionIndices[size_t(i)], idx[i].toDouble()) <= tol, qPrintable(where + u": condition index"_s));
            const QJsonArray vif = r[u"vif"_s].toArray();
            const double vifTol = std::max(1e-9, 10 * eps * r[u"vif_cond"_s].toDouble());
            for (int j = 0; j < a.columnCount; ++j) {
                const bool have = a.vif[size_t(j)].has_value();
                QVERIFY2(have == !vif[j].isNull(), qPrintable(where + u": VIF of column %1 defined here %2, in NumPy %3"_s.arg(j + 1).arg(have).arg(!vif[j].isNull())));
                if (have) {
                    QVERIFY2(relativeError(*a.vif[size_t(j)], vif[j].toDouble()) <= vifTol,
                             qPrintable(where + u": VIF %1, NumPy %2"_s.arg(*a.vif[size_t(j)]).arg(vif[j].toDouble())));
                    ++counts.vifCompared;
                }
            }
        }
        ok = !QTest::currentTestFailed();
    }();
    return ok && !QTest::currentTestFailed();
}

} // namespace cb::testing
