// Cross-check of the analysis against NumPy (numpy.linalg.pinv, matrix_rank, cond, svd, inv)
// on 240 random codings: k from 2 to 40, random planned n, rational and irrational weights,
// full and partial column sets, some rank deficient. Agreement to 1e-9 relative.
#include "Analysis.h"

#include "NumpyReference.h"

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

} // namespace

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
