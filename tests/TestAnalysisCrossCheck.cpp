// Cross-check of the analysis against NumPy (numpy.linalg.pinv, matrix_rank, cond, svd, inv)
// on 240 random codings: k from 2 to 40, random planned n, rational and irrational weights,
// full and partial column sets, some rank deficient. Agreement to 1e-9 relative.
#include "Analysis.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QProcess>
#include <QTemporaryDir>
#include <QTest>

#include <random>

using namespace Qt::StringLiterals;
using namespace cb;

class TestAnalysisCrossCheck : public QObject
{
    Q_OBJECT
private slots:
    void randomCodingsAgreeWithNumpy();
};

namespace {

Scheme randomScheme(std::mt19937 &rng, int index)
{
    std::uniform_int_distribution<int> kDist(2, 40), num(-6, 6), den(1, 6), nDist(1, 60), pct(0, 99);
    std::normal_distribution<double> gauss;
    Scheme s;
    const int k = index < 20 ? 2 + index % 5 : kDist(rng);
    for (int i = 0; i < k; ++i)
        s.factor.levels << u"g%1"_s.arg(i + 1);
    if (pct(rng) < 50)
        for (int i = 0; i < k; ++i)
            s.factor.plannedN.push_back(Rational(nDist(rng)));
    s.intercept = pct(rng) < 80;
    const int full = s.intercept ? k - 1 : k;
    int m = full;
    if (pct(rng) < 30 && full > 1)
        m = std::uniform_int_distribution<int>(1, full - 1)(rng);
    const bool exact = pct(rng) < 50;
    for (int j = 0; j < m; ++j) {
        Column c{u"c%1"_s.arg(j + 1), {}};
        for (int i = 0; i < k; ++i)
            c.weights.push_back(exact ? Weight::exact(Rational(num(rng), den(rng))) : Weight::approx(gauss(rng)));
        s.columns.push_back(std::move(c));
    }
    // About one in six: make the design rank deficient.
    if (m >= 2 && pct(rng) < 17) {
        const int kind = pct(rng) % 3;
        if (kind == 0) {
            s.columns[size_t(m - 1)].weights = s.columns[0].weights; // duplicate
        } else if (kind == 1) {
            for (int i = 0; i < k; ++i) { // sum of two columns
                const Weight &a = s.columns[0].weights[size_t(i)], &b = s.columns[1].weights[size_t(i)];
                s.columns[size_t(m - 1)].weights[size_t(i)] = exact ? Weight::exact(a.rational() + b.rational()) : Weight::approx(a.value() + b.value());
            }
        } else {
            for (int i = 0; i < k; ++i) // a multiple of another column
                s.columns[size_t(m - 1)].weights[size_t(i)] = exact ? Weight::exact(s.columns[0].weights[size_t(i)].rational() * 3) : Weight::approx(s.columns[0].weights[size_t(i)].value() * 3);
        }
    }
    return s;
}

double relativeError(double a, double b)
{
    return std::abs(a - b) / std::max(std::abs(b), 1e-300);
}

} // namespace

void TestAnalysisCrossCheck::randomCodingsAgreeWithNumpy()
{
    std::mt19937 rng(20261201u);
    std::vector<Scheme> schemes;
    std::vector<Analysis> analyses;
    QJsonArray cases;
    for (int c = 0; c < 240; ++c) {
        Scheme s = randomScheme(rng, c);
        Analysis a = analyze(s);
        QJsonArray x;
        const std::vector<double> n = s.factor.sizesAsDouble();
        for (int i = 0; i < s.levelCount(); ++i) {
            QJsonArray row;
            if (s.intercept)
                row.append(1.0);
            for (const Column &col : s.columns)
                row.append(col.weights[size_t(i)].value());
            x.append(row);
        }
        QJsonArray nj;
        for (double v : n)
            nj.append(v);
        cases.append(QJsonObject{{u"x"_s, x}, {u"n"_s, nj}, {u"intercept"_s, s.intercept}});
        schemes.push_back(std::move(s));
        analyses.push_back(std::move(a));
    }
    QTemporaryDir dir;
    QVERIFY(dir.isValid());
    QFile in(dir.filePath(u"cases.json"_s));
    QVERIFY(in.open(QIODevice::WriteOnly));
    in.write(QJsonDocument(cases).toJson(QJsonDocument::Compact));
    in.close();
    QProcess py;
    py.start(QString::fromUtf8(CB_PYTHON), {QString::fromUtf8(CB_SOURCE_DIR) + u"/tests/python/crosscheck_analysis.py"_s,
                                           in.fileName(), dir.filePath(u"numpy.json"_s)});
    QVERIFY(py.waitForFinished(300000));
    QVERIFY2(py.exitCode() == 0, py.readAllStandardError().constData());
    QFile outFile(dir.filePath(u"numpy.json"_s));
    QVERIFY(outFile.open(QIODevice::ReadOnly));
    const QJsonArray ref = QJsonDocument::fromJson(outFile.readAll()).array();
    QCOMPARE(ref.size(), qsizetype(analyses.size()));

    int deficient = 0, partial = 0, exactCount = 0, vifCompared = 0;
    for (qsizetype c = 0; c < ref.size(); ++c) {
        const QJsonObject r = ref[c].toObject();
        const Analysis &a = analyses[size_t(c)];
        const QString where = u"case %1 (k=%2, p=%3)"_s.arg(c).arg(a.levelCount).arg(a.coefficientCount);
        QVERIFY2(a.rank == r[u"rank"_s].toInt(), qPrintable(where + u": rank %1, NumPy %2"_s.arg(a.rank).arg(r[u"rank"_s].toInt())));
        exactCount += a.exact ? 1 : 0;
        if (!a.fullRank) {
            ++deficient;
            QVERIFY(!a.dependencies.isEmpty());
            QVERIFY(a.hypotheses.empty());
            continue;
        }
        partial += a.dependsOnSizes ? 1 : 0;
        const QJsonArray h = r[u"h"_s].toArray();
        double maxAbs = 0, maxDiff = 0;
        for (int i = 0; i < a.coefficientCount; ++i)
            for (int j = 0; j < a.levelCount; ++j) {
                const double want = h[i].toArray()[j].toDouble();
                maxAbs = std::max(maxAbs, std::abs(want));
                maxDiff = std::max(maxDiff, std::abs(a.hypothesisValues(i, j) - want));
            }
        QVERIFY2(maxDiff <= 1e-9 * maxAbs, qPrintable(where + u": hypothesis matrix differs by %1 (scale %2)"_s.arg(maxDiff).arg(maxAbs)));
        QVERIFY2(a.conditionNumber.has_value(), qPrintable(where));
        QVERIFY2(relativeError(*a.conditionNumber, r[u"cond"_s].toDouble()) <= 1e-9,
                 qPrintable(where + u": condition number %1, NumPy %2"_s.arg(*a.conditionNumber).arg(r[u"cond"_s].toDouble())));
        const QJsonArray idx = r[u"indices"_s].toArray();
        for (int i = 0; i < a.coefficientCount; ++i)
            QVERIFY2(relativeError(a.conditionIndices[size_t(i)], idx[i].toDouble()) <= 1e-9, qPrintable(where + u": condition index"_s));
        const QJsonArray vif = r[u"vif"_s].toArray();
        for (int j = 0; j < a.columnCount; ++j) {
            const bool have = a.vif[size_t(j)].has_value();
            QVERIFY2(have == !vif[j].isNull(), qPrintable(where + u": VIF of column %1 defined here %2, in NumPy %3"_s.arg(j + 1).arg(have).arg(!vif[j].isNull())));
            if (have) {
                QVERIFY2(relativeError(*a.vif[size_t(j)], vif[j].toDouble()) <= 1e-9,
                         qPrintable(where + u": VIF %1, NumPy %2"_s.arg(*a.vif[size_t(j)]).arg(vif[j].toDouble())));
                ++vifCompared;
            }
        }
    }
    // The mix really covered what it should.
    QVERIFY(deficient >= 15);
    QVERIFY(partial >= 20);
    QVERIFY(exactCount >= 60);
    QVERIFY(vifCompared >= 1000);
    qInfo("%d rank-deficient, %d partial column sets, %d exact, %d VIFs compared", deficient, partial, exactCount, vifCompared);
}

QTEST_GUILESS_MAIN(TestAnalysisCrossCheck)
#include "TestAnalysisCrossCheck.moc"
