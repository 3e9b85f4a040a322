// Tests of the fit from per-level statistics, p-value adjustment and level matching.
#include "core/analysis/Analysis.h"
#include "core/data/DataFit.h"
#include "tests/support/FitTestSupport.h"
#include "core/model/Scheme.h"

#include <QJsonArray>
#include <QTest>

#include <cmath>
#include <random>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

const QStringList kThreeGroupLevels = {u"g1"_s, u"g2"_s, u"g3"_s};

Eigen::MatrixXd rows(std::initializer_list<std::initializer_list<double>> values)
{
    Eigen::MatrixXd m(Eigen::Index(values.size()), Eigen::Index(values.begin()->size()));
    Eigen::Index r = 0;
    for (const auto &row : values) {
        Eigen::Index c = 0;
        for (double v : row)
            m(r, c++) = v;
        ++r;
    }
    return m;
}

QStringList coefficientNames(Eigen::Index p, bool intercept)
{
    QStringList names;
    for (Eigen::Index i = 0; i < p; ++i)
        names << (intercept && i == 0 ? kInterceptName.toString() : u"b%1"_s.arg(i));
    return names;
}

// Codings for k levels, built as explicit k x p design rows (intercept column first).
Eigen::MatrixXd withIntercept(const Eigen::MatrixXd &c)
{
    Eigen::MatrixXd x(c.rows(), c.cols() + 1);
    x << Eigen::VectorXd::Ones(c.rows()), c;
    return x;
}
Eigen::MatrixXd sumCoding(int k)
{
    Eigen::MatrixXd c = Eigen::MatrixXd::Zero(k, k - 1);
    c.topRows(k - 1).setIdentity();
    c.row(k - 1).setConstant(-1);
    return withIntercept(c);
}
Eigen::MatrixXd helmertCoding(int k)
{
    Eigen::MatrixXd c = Eigen::MatrixXd::Zero(k, k - 1);
    for (int j = 0; j < k - 1; ++j) {
        c.col(j).head(j + 1).setConstant(-1);
        c(j + 1, j) = j + 1;
    }
    return withIntercept(c);
}
Eigen::MatrixXd successiveCoding(int k)
{
    Eigen::MatrixXd c(k, k - 1);
    for (int j = 0; j < k - 1; ++j)
        for (int i = 0; i < k; ++i)
            c(i, j) = i <= j ? -double(k - 1 - j) / k : double(j + 1) / k;
    return withIntercept(c);
}
Eigen::MatrixXd linearOnly(int k)
{
    Eigen::MatrixXd c(k, 1);
    for (int i = 0; i < k; ++i)
        c(i, 0) = i - (k - 1) / 2.0;
    return withIntercept(c);
}
Eigen::MatrixXd trendsWithoutIntercept(int k)
{
    Eigen::MatrixXd c(k, 2);
    for (int i = 0; i < k; ++i) {
        c(i, 0) = i + 1;
        c(i, 1) = (i + 1) * (i + 1);
    }
    return c;
}

struct Case
{
    QByteArray csv;
    QStringList levels;
    Eigen::MatrixXd X;
    bool intercept = true;
    bool weighted = false;
};

QByteArray threeGroupCsv()
{
    QFile f(QStringLiteral(CB_TEST_DATA "/fit_three_groups.csv"));
    return f.open(QIODevice::ReadOnly) ? f.readAll() : QByteArray();
}

// A random unbalanced data set: k levels of 2 to 31 rows, level means far apart.
Case randomCase(unsigned seed, int k, bool weighted)
{
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> noise(0.0, 1.0 + seed % 5);
    Case c;
    c.weighted = weighted;
    c.csv = weighted ? "group,y,w\n" : "group,y\n";
    for (int j = 0; j < k; ++j) {
        c.levels << u"L%1"_s.arg(j + 1);
        const int n = 2 + int(rng() % 30);
        const double mean = 100.0 * double(rng() % 1000) / 997.0 - 40.0;
        for (int i = 0; i < n; ++i) {
            c.csv += "L" + QByteArray::number(j + 1) + ',' + QByteArray::number(mean + noise(rng), 'g', 17);
            if (weighted)
                c.csv += ',' + QByteArray::number(1 + int(rng() % 4));
            c.csv += '\n';
        }
    }
    return c;
}

bool near(double got, double want, double tol = 1e-9)
{
    return std::fabs(got - want) <= tol * std::max(1.0, std::fabs(want));
}

#define CHECK_NEAR(got, want)                                                                                          \
    QVERIFY2(near((got), (want)),                                                                                      \
             qPrintable(u"%1 = %2, reference %3"_s.arg(QString::fromLatin1(#got)).arg((got), 0, 'g', 17).arg((want), 0, 'g', 17)))

DataReadOptions options(const QString &factor, const QString &response, const QString &weight = {})
{
    DataReadOptions o;
    o.factorColumn = factor;
    o.responseColumn = response;
    o.weightColumn = weight;
    return o;
}

Result<DataSummary> readCsv(const QByteArray &csv, bool weighted)
{
    return readLevelDataFromBytes(csv, u"data.csv"_s,
                                  options(u"group"_s, u"y"_s, weighted ? u"w"_s : QString()));
}

MatchedLevels threeGroupLevels()
{
    auto data = readCsv(threeGroupCsv(), false);
    auto matched = matchLevels(kThreeGroupLevels, data.ok() ? data->levels : std::vector<LevelStats>{});
    return matched.ok() ? matched.value() : MatchedLevels{};
}

QJsonArray matrixToJson(const Eigen::MatrixXd &m)
{
    QJsonArray a;
    for (Eigen::Index r = 0; r < m.rows(); ++r) {
        QJsonArray row;
        for (Eigen::Index c = 0; c < m.cols(); ++c)
            row.append(m(r, c));
        a.append(row);
    }
    return a;
}

} // namespace

class TestDataFit : public QObject
{
    Q_OBJECT
private slots:
    void dobsonTreatmentCoding();
    void matchesNumpyLstsq_data();
    void matchesNumpyLstsq();
    void hypothesisEstimatesSideBySide();
    void adjustsPValues_data();
    void adjustsPValues();
    void matchesLevels();
    void refusesUnmatchedLevels_data();
    void refusesUnmatchedLevels();
    void refusesBadDesigns_data();
    void refusesBadDesigns();
    void noResidualDegreesOfFreedom();
    void writesJson();
    void fitsSchemes();
    void fitsFromSummaryTable();
};

// Dobson (1983), An Introduction to Statistical Modelling, plant-growth data; the
// published treatment-coding results, written from memory: intercept 5.032, effects
// -0.371 and 0.494, residual SD 0.6234 on 27 df, F(2, 27) = 4.846, p = 0.0159,
// R squared 0.264; standard errors 0.1971 and 0.2788, t = -1.331 (p 0.194) and 1.772 (p 0.0877).
void TestDataFit::dobsonTreatmentCoding()
{
    const Eigen::MatrixXd X = rows({{1, 0, 0}, {1, 1, 0}, {1, 0, 1}});
    const Eigen::MatrixXd H = rows({{1, 0, 0}, {-1, 1, 0}, {-1, 0, 1}});
    auto fit = fitLevels(threeGroupLevels(), X, H, {kInterceptName.toString(), u"g2"_s, u"g3"_s}, true);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    const auto &c = fit->coefficients;
    QCOMPARE(qRound(c[0].estimate * 1000), 5032);
    QCOMPARE(qRound(c[1].estimate * 1000), -371);
    QCOMPARE(qRound(c[2].estimate * 1000), 494);
    QCOMPARE(qRound(fit->sigma * 10000), 6234);
    QCOMPARE(fit->df, 27.0);
    QCOMPARE(fit->fDf1, 2.0);
    QCOMPARE(fit->fDf2, 27.0);
    QCOMPARE(qRound(fit->f * 1000), 4846);
    QCOMPARE(qRound(fit->fP * 10000), 159);
    QCOMPARE(qRound(fit->rSquared * 1000), 264);
    QCOMPARE(qRound(c[0].se * 10000), 1971);
    QCOMPARE(qRound(c[1].se * 10000), 2788);
    QCOMPARE(qRound(c[1].t * 1000), -1331);
    QCOMPARE(qRound(c[2].t * 1000), 1772);
    QCOMPARE(qRound(c[1].p * 1000), 194);
    QCOMPARE(qRound(c[2].p * 10000), 877);
    QVERIFY(fit->centred);
    QCOMPARE(fit->omnibusHypothesis, u"all level means are equal"_s);
    for (const FitCoefficient &k : c) {
        QVERIFY(k.agrees);
        CHECK_NEAR(k.hypothesisEstimate, k.estimate);
    }
    QVERIFY(!c[0].inFamily);
    QVERIFY(std::isnan(c[0].pAdjusted));
    QCOMPARE(c[1].pAdjusted, c[1].p);
}

// NumPy's lstsq on the explicit N-row design matrix, residual-based SEs, SciPy's t and
// F distributions (tests/python/fit_lstsq.py, Debian's python3-numpy/scipy), to 1e-9.
void TestDataFit::matchesNumpyLstsq_data()
{
    QTest::addColumn<QByteArray>("csv");
    QTest::addColumn<QStringList>("levels");
    QTest::addColumn<Eigen::MatrixXd>("X");
    QTest::addColumn<bool>("intercept");
    QTest::addColumn<bool>("weighted");
    const QByteArray groups = threeGroupCsv();
    QTest::newRow("Dobson, treatment") << groups << kThreeGroupLevels << rows({{1, 0, 0}, {1, 1, 0}, {1, 0, 1}}) << true << false;
    QTest::newRow("Dobson, sum") << groups << kThreeGroupLevels << rows({{1, 1, 0}, {1, 0, 1}, {1, -1, -1}}) << true << false;
    QTest::newRow("Dobson, helmert") << groups << kThreeGroupLevels << rows({{1, -1, -1}, {1, 1, -1}, {1, 0, 2}}) << true << false;
    QTest::newRow("Dobson, successive")
        << groups << kThreeGroupLevels << rows({{1, -2.0 / 3, -1.0 / 3}, {1, 1.0 / 3, -1.0 / 3}, {1, 1.0 / 3, 2.0 / 3}}) << true
        << false;
    QTest::newRow("Dobson, cell means without intercept")
        << groups << kThreeGroupLevels << rows({{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}) << false << false;
    QTest::newRow("Dobson, linear trend only") << groups << kThreeGroupLevels << rows({{1, -1}, {1, 0}, {1, 1}}) << true << false;
    struct Coding
    {
        const char *name;
        Eigen::MatrixXd (*make)(int);
        bool intercept;
    };
    const Coding codings[] = {{"sum", sumCoding, true},
                              {"helmert", helmertCoding, true},
                              {"successive", successiveCoding, true},
                              {"linear only", linearOnly, true},
                              {"trends without intercept", trendsWithoutIntercept, false}};
    unsigned seed = 1;
    for (int k : {3, 4, 6}) {
        for (const Coding &coding : codings) {
            const Case c = randomCase(seed++, k, false);
            QTest::addRow("random k=%d, %s", k, coding.name) << c.csv << c.levels << coding.make(k) << coding.intercept << false;
        }
    }
    const Case w = randomCase(99, 5, true);
    QTest::newRow("random k=5, helmert, case weights") << w.csv << w.levels << helmertCoding(5) << true << true;
    const Case w2 = randomCase(100, 4, true);
    QTest::newRow("random k=4, sum, case weights") << w2.csv << w2.levels << sumCoding(4) << true << true;
}

void TestDataFit::matchesNumpyLstsq()
{
    QFETCH(QByteArray, csv);
    QFETCH(QStringList, levels);
    QFETCH(Eigen::MatrixXd, X);
    QFETCH(bool, intercept);
    QFETCH(bool, weighted);
    QTemporaryDir dir;
    const QString path = dir.filePath(u"data.csv"_s);
    QVERIFY(test::writeFile(path, csv));
    auto data = readCsv(csv, weighted);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    auto matched = matchLevels(levels, data->levels);
    QVERIFY2(matched.ok(), qPrintable(matched.error()));

    QJsonObject spec{{u"csv"_s, path},
                     {u"factor"_s, u"group"_s},
                     {u"response"_s, u"y"_s},
                     {u"weight"_s, weighted ? QJsonValue(u"w"_s) : QJsonValue()},
                     {u"levels"_s, QJsonArray::fromStringList(levels)},
                     {u"X"_s, matrixToJson(X)},
                     {u"intercept"_s, intercept},
                     {u"alpha"_s, 0.05}};
    const QJsonObject ref = test::runPython(u"fit_lstsq.py"_s, {}, QJsonDocument(spec).toJson());
    QVERIFY2(!ref.contains(u"error"_s), qPrintable(ref.value(u"error"_s).toString()));

    for (Adjustment method : {Adjustment::Bonferroni, Adjustment::Holm, Adjustment::Sidak}) {
        auto fit = fitLevels(*matched, X, Eigen::MatrixXd(), coefficientNames(X.cols(), intercept), intercept,
                             FitOptions{0.05, method});
        QVERIFY2(fit.ok(), qPrintable(fit.error()));
        const auto &c = fit->coefficients;
        for (size_t i = 0; i < c.size(); ++i) {
            const auto at = [&](const char *key) { return ref.value(QLatin1StringView(key)).toArray()[qsizetype(i)].toDouble(); };
            CHECK_NEAR(c[i].estimate, at("coefficients"));
            CHECK_NEAR(c[i].se, at("se"));
            CHECK_NEAR(c[i].t, at("t"));
            CHECK_NEAR(c[i].p, at("p"));
            CHECK_NEAR(c[i].ciLow, at("ci_low"));
            CHECK_NEAR(c[i].ciHigh, at("ci_high"));
        }
        CHECK_NEAR(fit->sigma, ref.value(u"sigma"_s).toDouble());
        CHECK_NEAR(fit->df, ref.value(u"df"_s).toDouble());
        CHECK_NEAR(fit->rss, ref.value(u"rss"_s).toDouble());
        CHECK_NEAR(fit->rSquared, ref.value(u"r_squared"_s).toDouble());
        QCOMPARE(fit->centred, ref.value(u"centred"_s).toBool());
        QCOMPARE(fit->fDf1, ref.value(u"f_df1"_s).toDouble());
        if (fit->fDf1 > 0) {
            CHECK_NEAR(fit->f, ref.value(u"f"_s).toDouble());
            CHECK_NEAR(fit->fP, ref.value(u"f_p"_s).toDouble());
        }
        const QJsonArray means = ref.value(u"means"_s).toArray();
        for (qsizetype j = 0; j < means.size(); ++j)
            CHECK_NEAR(fit->levelStats[size_t(j)].mean, means[j].toDouble());
        const QJsonArray adjusted = ref.value(u"p_adjusted"_s).toObject().value(adjustmentId(method)).toArray();
        const size_t first = intercept ? 1 : 0;
        QCOMPARE(size_t(adjusted.size()), c.size() - first);
        for (size_t i = first; i < c.size(); ++i)
            CHECK_NEAR(c[i].pAdjusted, adjusted[qsizetype(i - first)].toDouble());
    }
}

// Saturated codings estimate exactly their hypotheses; a coding with fewer columns than
// k - 1 estimates a size-dependent combination, which the fit reports.
void TestDataFit::hypothesisEstimatesSideBySide()
{
    const Case c = randomCase(5, 4, false);
    auto data = readCsv(c.csv, false);
    QVERIFY(data.ok());
    auto matched = matchLevels(c.levels, data->levels);
    QVERIFY(matched.ok());
    const Eigen::MatrixXd X = helmertCoding(4);
    auto fit = fitLevels(*matched, X, X.inverse(), coefficientNames(4, true), true);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QVERIFY(fit->hypothesesAgree);
    for (const FitCoefficient &k : fit->coefficients)
        CHECK_NEAR(k.hypothesisEstimate, k.estimate);

    // Linear trend only: hypotheses under equal planned sizes, (X'X)^-1 X'.
    const Eigen::MatrixXd L = linearOnly(4);
    const Eigen::MatrixXd planned = (L.transpose() * L).inverse() * L.transpose();
    auto trend = fitLevels(*matched, L, planned, coefficientNames(2, true), true);
    QVERIFY2(trend.ok(), qPrintable(trend.error()));
    QVERIFY(!trend->hypothesesAgree);
    QVERIFY(!trend->coefficients[1].agrees);
    QVERIFY(trend->notes.join(u' ').contains(u"depends on the group sizes"_s));
    // At the observed sizes the rows are (X'NX)^-1 X'N, and then they agree.
    auto observed = fitLevels(*matched, L, trend->observedHypotheses, coefficientNames(2, true), true);
    QVERIFY(observed.ok());
    QVERIFY(observed->hypothesesAgree);
}

// Holm (1979), Scand. J. Statist. 6:65-70; Sidak (1967), JASA 62:626-633; the values
// below are worked by hand from the definitions.
void TestDataFit::adjustsPValues_data()
{
    QTest::addColumn<int>("method");
    QTest::addColumn<std::vector<double>>("p");
    QTest::addColumn<std::vector<double>>("expected");
    const std::vector<double> p = {0.01, 0.04, 0.03};
    QTest::newRow("none") << int(Adjustment::None) << p << p;
    QTest::newRow("bonferroni") << int(Adjustment::Bonferroni) << p << std::vector<double>{0.03, 0.12, 0.09};
    // Holm: sorted 0.01, 0.03, 0.04 times 3, 2, 1 = 0.03, 0.06, 0.04 -> running max 0.03, 0.06, 0.06.
    QTest::newRow("holm") << int(Adjustment::Holm) << p << std::vector<double>{0.03, 0.06, 0.06};
    // Sidak: 1 - 0.99^3 = 0.029701, 1 - 0.96^3 = 0.115264, 1 - 0.97^3 = 0.087327.
    QTest::newRow("sidak") << int(Adjustment::Sidak) << p << std::vector<double>{0.029701, 0.115264, 0.087327};
    QTest::newRow("bonferroni caps at 1") << int(Adjustment::Bonferroni) << std::vector<double>{0.5, 0.2}
                                          << std::vector<double>{1.0, 0.4};
    QTest::newRow("holm ties and NaN") << int(Adjustment::Holm) << std::vector<double>{NAN, 0.02, 0.02, 0.5}
                                       << std::vector<double>{NAN, 0.06, 0.06, 0.5};
}

void TestDataFit::adjustsPValues()
{
    QFETCH(int, method);
    QFETCH(std::vector<double>, p);
    QFETCH(std::vector<double>, expected);
    const std::vector<double> got = adjustPValues(p, Adjustment(method));
    QCOMPARE(got.size(), expected.size());
    for (size_t i = 0; i < got.size(); ++i) {
        if (std::isnan(expected[i]))
            QVERIFY(std::isnan(got[i]));
        else
            QVERIFY2(std::fabs(got[i] - expected[i]) < 1e-12, qPrintable(u"%1 vs %2"_s.arg(got[i]).arg(expected[i])));
    }
    QCOMPARE(adjustmentFromId(adjustmentId(Adjustment(method))), std::optional<Adjustment>(Adjustment(method)));
}

void TestDataFit::matchesLevels()
{
    auto data = readLevelDataFromBytes("g,y\nlow,1\nhigh,5\nmid,3\nlow,2\nmiddle,4\n", u"d.csv"_s,
                                       options(u"g"_s, u"y"_s));
    QVERIFY2(data.ok(), qPrintable(data.error()));
    auto mapping = parseLevelMapping(u"middle = mid"_s);
    QVERIFY2(mapping.ok(), qPrintable(mapping.error()));
    auto m = matchLevels({u"low"_s, u"mid"_s, u"high"_s}, data->levels, *mapping);
    QVERIFY2(m.ok(), qPrintable(m.error()));
    QCOMPARE(m->levels, (QStringList{u"low"_s, u"mid"_s, u"high"_s}));
    QCOMPARE(m->sources[1], (QStringList{u"mid"_s, u"middle"_s}));
    QCOMPARE(m->stats[1].n, 2.0);
    QCOMPARE(m->stats[1].mean, 3.5);
    QCOMPARE(m->stats[1].variance(), 0.5);
    QCOMPARE(m->stats[0].mean, 1.5);
}

void TestDataFit::refusesUnmatchedLevels_data()
{
    QTest::addColumn<QStringList>("scheme");
    QTest::addColumn<QString>("mapping");
    QTest::addColumn<QString>("message");
    QTest::newRow("both sides") << QStringList{u"a"_s, u"B"_s, u"d"_s} << QString()
                                << u"the levels do not match; in the data but not in the scheme: 'b', 'c'; in the scheme but "
                                   "not in the data: 'B', 'd'. Rename them, or map data names to scheme levels, before fitting "
                                   "('b' looks like 'B')"_s;
    QTest::newRow("scheme only") << QStringList{u"a"_s, u"b"_s, u"c"_s, u"z"_s} << QString()
                                 << u"the levels do not match; in the scheme but not in the data: 'z'. Rename them, or map data "
                                    "names to scheme levels, before fitting"_s;
    QTest::newRow("mapping from unknown name") << QStringList{u"a"_s, u"b"_s, u"c"_s} << u"q=a"_s
                                               << u"level mapping: 'q' is not a level in the data (the data have 'a', 'b', 'c')"_s;
    QTest::newRow("mapping to unknown level") << QStringList{u"a"_s, u"b"_s, u"c"_s} << u"c=x"_s
                                              << u"level mapping: 'x' is not a level of the scheme (the scheme has 'a', 'b', 'c')"_s;
    QTest::newRow("zero weights") << QStringList{u"a"_s, u"b"_s, u"c"_s} << u"w"_s
                                  << u"the levels do not match; in the data only with weight 0: 'c'"_s;
}

void TestDataFit::refusesUnmatchedLevels()
{
    QFETCH(QStringList, scheme);
    QFETCH(QString, mapping);
    QFETCH(QString, message);
    const bool weighted = mapping == u"w"_s;
    if (weighted)
        mapping.clear();
    auto data = readLevelDataFromBytes("g,y,w\na,1,1\nb,2,1\nc,3,0\n", u"d.csv"_s,
                                       options(u"g"_s, u"y"_s, weighted ? u"w"_s : QString()));
    QVERIFY(data.ok());
    auto map = parseLevelMapping(mapping);
    QVERIFY(map.ok());
    auto m = matchLevels(scheme, data->levels, *map);
    QVERIFY(!m.ok());
    QVERIFY2(m.error().startsWith(message), qPrintable(m.error()));
    QCOMPARE(parseLevelMapping(u"a=b, c"_s).error(), u"level mapping: 'c' should read 'data name=scheme level'"_s);
    QCOMPARE(parseLevelMapping(u"a=b, a=c"_s).error(), u"level mapping: 'a' is mapped twice"_s);
}

void TestDataFit::refusesBadDesigns_data()
{
    QTest::addColumn<Eigen::MatrixXd>("X");
    QTest::addColumn<int>("names");
    QTest::addColumn<Eigen::MatrixXd>("H");
    QTest::addColumn<QString>("message");
    QTest::newRow("dependent columns") << rows({{1, 1, 2}, {1, 0, 0}, {1, -1, -2}}) << 3 << Eigen::MatrixXd()
                                       << u"the coding columns are linearly dependent (rank 2 for 3 coefficients); no unique fit exists"_s;
    QTest::newRow("wrong row count") << rows({{1, 0}, {1, 1}}) << 2 << Eigen::MatrixXd()
                                     << u"design: 2 rows for 3 levels; expected one row per level"_s;
    QTest::newRow("names") << rows({{1, 0}, {1, 1}, {1, 2}}) << 3 << Eigen::MatrixXd()
                           << u"design: 3 coefficient names for 2 columns"_s;
    QTest::newRow("hypothesis shape") << rows({{1, 0}, {1, 1}, {1, 2}}) << 2 << rows({{1, 0}, {0, 1}})
                                      << u"hypotheses: a 2 x 2 matrix; expected 2 x 3 (one row per coefficient)"_s;
    QTest::newRow("not finite") << rows({{1, 0}, {1, NAN}, {1, 2}}) << 2 << Eigen::MatrixXd()
                                << u"design: the coding has a value that is not a finite number"_s;
}

void TestDataFit::refusesBadDesigns()
{
    QFETCH(Eigen::MatrixXd, X);
    QFETCH(int, names);
    QFETCH(Eigen::MatrixXd, H);
    QFETCH(QString, message);
    auto fit = fitLevels(threeGroupLevels(), X, H, coefficientNames(names, true), true);
    QVERIFY(!fit.ok());
    QCOMPARE(fit.error(), message);
    auto alpha = fitLevels(threeGroupLevels(), sumCoding(3), {}, coefficientNames(3, true), true, FitOptions{1.5, Adjustment::None});
    QCOMPARE(alpha.error(), u"alpha: 1.5; expected a number between 0 and 1"_s);
}

void TestDataFit::noResidualDegreesOfFreedom()
{
    auto data = readLevelDataFromBytes("g,y\na,1\nb,4\nc,9\n", u"d.csv"_s,
                                       options(u"g"_s, u"y"_s));
    QVERIFY(data.ok());
    auto m = matchLevels({u"a"_s, u"b"_s, u"c"_s}, data->levels);
    QVERIFY(m.ok());
    auto fit = fitLevels(*m, successiveCoding(3), {}, coefficientNames(3, true), true);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QCOMPARE(fit->df, 0.0);
    CHECK_NEAR(fit->coefficients[1].estimate, 3.0);
    CHECK_NEAR(fit->coefficients[2].estimate, 5.0);
    QVERIFY(std::isnan(fit->sigma));
    QVERIFY(std::isnan(fit->coefficients[1].se));
    QVERIFY(std::isnan(fit->coefficients[1].p));
    QVERIFY(std::isnan(fit->f));
    QVERIFY(fit->notes.first().startsWith(u"no residual degrees of freedom"_s));
    const QJsonObject json = fitResultToJson(*fit, *data);
    QVERIFY(json.value(u"sigma"_s).isNull());
    QVERIFY(json.value(u"coefficients"_s).toArray()[1].toObject().value(u"se"_s).isNull());
}

void TestDataFit::writesJson()
{
    QByteArray csv = threeGroupCsv();
    csv += "g1,\ng2,n/a?\n";
    auto data = readCsv(csv, false);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    auto m = matchLevels(kThreeGroupLevels, data->levels);
    QVERIFY(m.ok());
    const Eigen::MatrixXd X = rows({{1, 0, 0}, {1, 1, 0}, {1, 0, 1}});
    auto fit = fitLevels(*m, X, X.inverse(), {kInterceptName.toString(), u"g2"_s, u"g3"_s}, true, FitOptions{0.1, Adjustment::Holm});
    QVERIFY(fit.ok());
    const QJsonObject json = fitResultToJson(*fit, *data);
    for (const QString &key : {u"levels"_s, u"coefficients"_s, u"sigma"_s, u"df"_s, u"r_squared"_s, u"f"_s, u"f_p"_s,
                               u"skipped_rows"_s, u"alpha"_s, u"adjust"_s})
        QVERIFY2(json.contains(key), qPrintable(key));
    const QJsonObject level = json.value(u"levels"_s).toArray()[1].toObject();
    QCOMPARE(level.value(u"name"_s).toString(), u"g2"_s);
    QCOMPARE(level.value(u"n"_s).toDouble(), 10.0);
    QCOMPARE(level.value(u"mean"_s).toDouble(), fit->levelStats[1].mean);
    QCOMPARE(level.value(u"sd"_s).toDouble(), fit->levelStats[1].sd());
    const QJsonObject coef = json.value(u"coefficients"_s).toArray()[2].toObject();
    for (const QString &key : {u"name"_s, u"estimate"_s, u"se"_s, u"t"_s, u"p"_s, u"p_adjusted"_s, u"ci_low"_s,
                               u"ci_high"_s, u"hypothesis_estimate"_s})
        QVERIFY2(coef.contains(key), qPrintable(key));
    QCOMPARE(coef.value(u"estimate"_s).toDouble(), fit->coefficients[2].estimate);
    QCOMPARE(coef.value(u"p_adjusted"_s).toDouble(), fit->coefficients[2].pAdjusted);
    QVERIFY(json.value(u"coefficients"_s).toArray()[0].toObject().value(u"p_adjusted"_s).isNull());
    QCOMPARE(json.value(u"adjust"_s).toString(), u"holm"_s);
    const QJsonObject skipped = json.value(u"skipped_rows"_s).toObject();
    QCOMPARE(skipped.value(u"count"_s).toInt(), 2);
    QCOMPARE(skipped.value(u"first"_s).toArray()[1].toObject().value(u"line"_s).toInt(), 33);
    QCOMPARE(skipped.value(u"first"_s).toArray()[0].toObject().value(u"reason"_s).toString(),
             u"response (column 'y') is missing"_s);
}

// The scheme path: columns and hypotheses come from the scheme and its analysis.
// Treatment coding again against Dobson's published values; every standard scheme
// must estimate exactly the comparisons its hypotheses state.
void TestDataFit::fitsSchemes()
{
    auto data = readCsv(threeGroupCsv(), false);
    QVERIFY(data.ok());
    Factor factor;
    factor.name = u"group"_s;
    factor.levels = kThreeGroupLevels;
    for (SchemeKind kind : standardSchemes()) {
        auto scheme = makeScheme(factor, kind);
        QVERIFY2(scheme.ok(), qPrintable(scheme.error()));
        auto fit = fitScheme(*scheme, *data, FitOptions{0.05, Adjustment::Sidak});
        QVERIFY2(fit.ok(), qPrintable(schemeId(kind) + u": "_s + fit.error()));
        QVERIFY2(fit->hypothesesAgree, qPrintable(schemeId(kind)));
        QCOMPARE(qRound(fit->sigma * 10000), 6234);
        QCOMPARE(qRound(fit->rSquared * 1000), 264);
        if (kind == SchemeKind::Treatment) {
            QCOMPARE(qRound(fit->coefficients[1].estimate * 1000), -371);
            QCOMPARE(qRound(fit->coefficients[2].estimate * 1000), 494);
            QVERIFY(!fit->coefficients[1].hypothesis.isEmpty());
        }
    }
}

// The same model from Dobson's group summaries (SDs rounded to 4 decimals).
void TestDataFit::fitsFromSummaryTable()
{
    auto data = readSummaryTableFromBytes("level,n,mean,sd\ng1,10,5.032,0.5831\ng2,10,4.661,0.7937\ng3,10,5.526,0.4426\n",
                                          u"s.csv"_s);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    auto m = matchLevels(kThreeGroupLevels, data->levels);
    QVERIFY(m.ok());
    auto fit = fitLevels(*m, rows({{1, 0, 0}, {1, 1, 0}, {1, 0, 1}}), {}, coefficientNames(3, true), true);
    QVERIFY(fit.ok());
    QCOMPARE(qRound(fit->sigma * 10000), 6234);
    QCOMPARE(qRound(fit->f * 100), 485);
    QCOMPARE(qRound(fit->coefficients[1].estimate * 1000), -371);
}

QTEST_GUILESS_MAIN(TestDataFit)
#include "TestDataFit.moc"
