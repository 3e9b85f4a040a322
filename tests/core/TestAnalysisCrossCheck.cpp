// Cross-check of the analysis against NumPy (numpy.linalg.pinv, matrix_rank, cond, svd, inv)
// on 240 random codings: k from 2 to 40, random planned n, rational and irrational weights,
// full and partial column sets, some rank deficient. Agreement to 1e-9 relative.
// A second set: square codings made ill-conditioned on purpose (condition numbers about 1e3 to
// 1e7, k up to 200), where the singular values come from the Gram matrices of the design and
// of its inverse, or from the SVD fallback.
#include "core/analysis/Analysis.h"

#include "tests/support/NumpyReference.h"

#include <random>

using namespace Qt::StringLiterals;
using namespace cb;

class TestAnalysisCrossCheck : public QObject
{
    Q_OBJECT
private slots:
    void randomCodingsAgreeWithNumpy();
    void illConditionedSquareCodingsAgreeWithNumpy();
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

// k - 1 Gaussian columns and an intercept; the last column is the first plus delta times noise,
// which sets the condition number near 1 / delta (1e-7 keeps the VIFs, near 1e14, clear of the
// point where both sides call them undefined, near 1e10 to 1e13).
Scheme nearlyDependentScheme(std::mt19937 &rng, int k, double delta, bool randomSizes)
{
    std::normal_distribution<double> gauss;
    std::uniform_int_distribution<int> nDist(1, 60);
    Scheme s;
    for (int i = 0; i < k; ++i)
        s.factor.levels << u"g%1"_s.arg(i + 1);
    if (randomSizes)
        for (int i = 0; i < k; ++i)
            s.factor.plannedN.push_back(Rational(nDist(rng)));
    for (int j = 0; j + 1 < k; ++j) {
        Column c{u"c%1"_s.arg(j + 1), {}};
        for (int i = 0; i < k; ++i)
            c.weights.push_back(Weight::approx(gauss(rng)));
        s.columns.push_back(std::move(c));
    }
    for (int i = 0; i < k; ++i)
        s.columns.back().weights[size_t(i)] = Weight::approx(s.columns[0].weights[size_t(i)].value() + delta * gauss(rng));
    return s;
}

} // namespace

void TestAnalysisCrossCheck::illConditionedSquareCodingsAgreeWithNumpy()
{
    std::mt19937 rng(20261202u);
    std::vector<Scheme> schemes;
    std::vector<Analysis> analyses;
    for (int k : {10, 50, 200})
        for (double delta : {1e-1, 1e-2, 1e-3, 1e-4, 1e-7})
            for (bool randomSizes : {false, true}) {
                schemes.push_back(nearlyDependentScheme(rng, k, delta, randomSizes));
                analyses.push_back(analyze(schemes.back()));
            }
    int moderate = 0, severe = 0;
    for (const Analysis &a : analyses) {
        QVERIFY(a.conditionNumber.has_value());
        moderate += *a.conditionNumber > 1e3 && *a.conditionNumber <= 1e6 ? 1 : 0;
        severe += *a.conditionNumber > 1e6 ? 1 : 0;
    }
    // Both routes above the Gram matrix's own limit were taken.
    QVERIFY2(moderate >= 10, qPrintable(QString::number(moderate)));
    QVERIFY2(severe >= 2, qPrintable(QString::number(severe)));
    testing::CrossCheckCounts counts;
    QVERIFY(testing::compareWithNumpy(schemes, analyses, counts));
    qInfo("%d codings with condition numbers in (1e3, 1e6], %d above 1e6", moderate, severe);
}

void TestAnalysisCrossCheck::randomCodingsAgreeWithNumpy()
{
    std::mt19937 rng(20261201u);
    std::vector<Scheme> schemes;
    std::vector<Analysis> analyses;
    for (int c = 0; c < 240; ++c) {
        schemes.push_back(randomScheme(rng, c));
        analyses.push_back(analyze(schemes.back()));
    }
    testing::CrossCheckCounts counts;
    QVERIFY(testing::compareWithNumpy(schemes, analyses, counts));
    const int deficient = counts.deficient, partial = counts.partial, exactCount = counts.exact, vifCompared = counts.vifCompared;
    // The mix really covered what it should.
    QVERIFY(deficient >= 15);
    QVERIFY(partial >= 20);
    QVERIFY(exactCount >= 60);
    QVERIFY(vifCompared >= 1000);
    qInfo("%d rank-deficient, %d partial column sets, %d exact, %d VIFs compared", deficient, partial, exactCount, vifCompared);
}

QTEST_GUILESS_MAIN(TestAnalysisCrossCheck)
#include "TestAnalysisCrossCheck.moc"
