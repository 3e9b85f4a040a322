// Orthogonal polynomial trends over unequal spacing and under planned n, against NumPy
// (QR of the weighted Vandermonde matrix, tests/python/poly_check.py).
#include "core/analysis/Analysis.h"
#include "core/model/Scheme.h"

#include "tests/support/ProcessRunner.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QTemporaryDir>
#include <QTest>

#include <random>

using namespace Qt::StringLiterals;
using namespace cb;

class TestPolynomialTrends : public QObject
{
    Q_OBJECT
private slots:
    void unequalSpacingAndWeightsAgreeWithNumpy();
    void integerFormForUnequalSpacing();
    void weightedTrendsAreOrthogonalUnderN();
};

void TestPolynomialTrends::unequalSpacingAndWeightsAgreeWithNumpy()
{
    std::mt19937 rng(42u);
    std::uniform_int_distribution<int> kDist(3, 8), step(1, 9), nDist(2, 40);
    std::vector<std::vector<Column>> ours;
    QJsonArray cases;
    for (int c = 0; c < 40; ++c) {
        const int k = kDist(rng);
        Factor f;
        int pos = step(rng);
        for (int i = 0; i < k; ++i) {
            f.levels << u"t%1"_s.arg(i);
            f.spacing.push_back(Weight(pos));
            pos += step(rng);
        }
        const bool weighted = c % 2 == 1;
        if (weighted)
            for (int i = 0; i < k; ++i)
                f.plannedN.push_back(Rational(nDist(rng)));
        SchemeOptions opt;
        opt.polynomialWeighted = weighted;
        auto cols = standardColumns(f, SchemeKind::Polynomial, opt);
        QVERIFY2(cols.ok(), qPrintable(cols.error()));
        QJsonArray x, w;
        for (int i = 0; i < k; ++i) {
            x.append(f.spacing[size_t(i)].value());
            w.append(weighted ? f.plannedN[size_t(i)].get_d() : 1.0);
        }
        cases.append(QJsonObject{{u"x"_s, x}, {u"w"_s, w}});
        ours.push_back(cols.take());
    }
    QTemporaryDir dir;
    QFile in(dir.filePath(u"cases.json"_s));
    QVERIFY(in.open(QIODevice::WriteOnly));
    in.write(QJsonDocument(cases).toJson());
    in.close();
    const auto run = test::runProcess(QString::fromUtf8(CB_PYTHON),
                                      {QString::fromUtf8(CB_SOURCE_DIR) + u"/tests/python/poly_check.py"_s, in.fileName(), dir.filePath(u"out.json"_s)});
    QVERIFY2(run.exitCode == 0, run.err.constData());
    QFile out(dir.filePath(u"out.json"_s));
    QVERIFY(out.open(QIODevice::ReadOnly));
    const QJsonArray ref = QJsonDocument::fromJson(out.readAll()).array();
    QCOMPARE(ref.size(), qsizetype(ours.size()));
    for (qsizetype c = 0; c < ref.size(); ++c) {
        const QJsonArray cols = ref[c].toArray();
        QCOMPARE(cols.size(), qsizetype(ours[size_t(c)].size()));
        for (qsizetype d = 0; d < cols.size(); ++d) {
            const QJsonArray want = cols[d].toArray();
            for (qsizetype i = 0; i < want.size(); ++i) {
                const double got = ours[size_t(c)][size_t(d)].weights[size_t(i)].value();
                QVERIFY2(std::abs(got - want[i].toDouble()) <= 1e-9,
                         qPrintable(u"case %1, degree %2, level %3: %4 vs NumPy %5"_s.arg(c).arg(d + 1).arg(i).arg(got).arg(want[i].toDouble())));
            }
        }
    }
}

void TestPolynomialTrends::integerFormForUnequalSpacing()
{
    // Positions 1, 2, 4 (worked by hand): linear trend x - mean = (-4/3, -1/3, 5/3) -> (-4, -1, 5).
    // Quadratic (a, b, c) orthogonal to (1, 1, 1) and (-4, -1, 5): b = -a - c and -3a + 6c = 0,
    // so (2, -3, 1).
    Factor f;
    f.levels = QStringList{u"low"_s, u"mid"_s, u"high"_s};
    f.spacing = {Weight(1), Weight(2), Weight(4)};
    SchemeOptions opt;
    opt.polynomialForm = PolynomialForm::Integer;
    auto cols = standardColumns(f, SchemeKind::Polynomial, opt);
    QVERIFY(cols.ok());
    QCOMPARE((*cols)[0].weights[0].rational(), Rational(-4));
    QCOMPARE((*cols)[0].weights[1].rational(), Rational(-1));
    QCOMPARE((*cols)[0].weights[2].rational(), Rational(5));
    QCOMPARE((*cols)[1].weights[0].rational(), Rational(2));
    QCOMPARE((*cols)[1].weights[1].rational(), Rational(-3));
    QCOMPARE((*cols)[1].weights[2].rational(), Rational(1));
}

void TestPolynomialTrends::weightedTrendsAreOrthogonalUnderN()
{
    Factor f;
    f.levels = QStringList{u"a"_s, u"b"_s, u"c"_s, u"d"_s};
    f.plannedN = {Rational(10), Rational(30), Rational(5), Rational(20)};
    SchemeOptions opt;
    opt.polynomialWeighted = true;
    opt.polynomialForm = PolynomialForm::Integer;
    const Scheme s = makeScheme(f, SchemeKind::Polynomial, opt).take();
    const Analysis a = analyze(s);
    QVERIFY(a.exact);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j)
            if (i != j)
                QVERIFY(a.orthogonalInDesign(i, j));
    // Unweighted trends are not orthogonal under these n.
    const Analysis plain = analyze(makeScheme(f, SchemeKind::Polynomial, {}).take());
    QVERIFY(!plain.orthogonalInDesign(0, 1));
}

QTEST_GUILESS_MAIN(TestPolynomialTrends)
#include "TestPolynomialTrends.moc"
