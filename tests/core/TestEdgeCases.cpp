// Numerical edge cases: nearly singular and degenerate codings, weights from 1e-300
// to 1e300, many levels, the exact path's size limit, and data fits on degenerate
// data. The tool must warn and explain instead of printing numbers that look
// confident, and no NaN or infinity may reach the report, the JSON or an export.
#include "core/analysis/Analysis.h"
#include "core/report/AnalysisJson.h"
#include "core/report/AnalysisReport.h"
#include "core/data/DataFit.h"
#include "core/data/DataReader.h"
#include "core/export/Export.h"
#include "core/model/Scheme.h"

#include "tests/fuzz/FuzzChecks.h"

#include <QFile>
#include <QJsonDocument>
#include <QTemporaryDir>
#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

// A custom scheme over levels l1..lk with the given columns.
Scheme customScheme(const std::vector<std::vector<Weight>> &columns, bool intercept = true)
{
    Scheme s;
    const int k = columns.empty() ? 0 : int(columns.front().size());
    for (int i = 0; i < k; ++i)
        s.factor.levels << u"l%1"_s.arg(i + 1);
    s.factor.name = u"f"_s;
    s.intercept = intercept;
    for (size_t j = 0; j < columns.size(); ++j)
        s.columns.push_back(Column{u"c%1"_s.arg(j + 1), columns[j]});
    return s;
}

Weight exactDecimal(const char *text)
{
    return parseWeight(QString::fromLatin1(text)).value();
}

// The same number, exact (parsed from the decimal text) or floating.
Weight number(const char *text, bool exact)
{
    const Weight w = exactDecimal(text);
    return exact ? w : Weight::approx(w.value());
}

bool hasFinding(const Analysis &a, Finding::Topic topic, Finding::Severity atLeast, const QString &containing = {})
{
    for (const Finding &f : a.findings)
        if (f.topic == topic && int(f.severity) >= int(atLeast) && f.message.contains(containing))
            return true;
    return false;
}

QString findingsText(const Analysis &a)
{
    QStringList all;
    for (const Finding &f : a.findings)
        all << f.message;
    return all.join(u" | "_s);
}

// Everything the user sees about the analysis: no non-finite number anywhere,
// and every export well formed.
QString everyOutputFinite(const Scheme &s, const Analysis &a)
{
    if (QString e = fuzz::checkAnalysisFinite(a); !e.isEmpty())
        return e;
    if (QString e = fuzz::checkNoNonFiniteNumber(analysisReport(s, a)); !e.isEmpty())
        return u"report: "_s + e;
    const QString json = QString::fromUtf8(QJsonDocument(analysisToJson(s, a)).toJson());
    if (QString e = fuzz::checkNoNonFiniteNumber(json, true); !e.isEmpty())
        return u"JSON: "_s + e;
    if (auto t = codingTable(s))
        if (QString e = fuzz::checkAllExports(*t); !e.isEmpty())
            return u"coding: "_s + e;
    if (auto t = hypothesisTable(a))
        if (QString e = fuzz::checkAllExports(*t); !e.isEmpty())
            return u"hypotheses: "_s + e;
    return {};
}

} // namespace

class TestEdgeCases : public QObject
{
    Q_OBJECT

private slots:
    void nearlySingularCodingIsFlagged_data();
    void nearlySingularCodingIsFlagged();
    void extremeWeightsKeepDiagnostics_data();
    void extremeWeightsKeepDiagnostics();
    void levelsAtTheLimitUseTheFloatingPathAndSayWhy();
    void degenerateColumnsAreExplained_data();
    void degenerateColumnsAreExplained();
    void exactAndFloatingPathsAgree_data();
    void exactAndFloatingPathsAgree();
    void exactPathLimitIsStated();
    void nonFiniteCellIsRefusedByEveryExporter();

    void fitWithOneObservationInALevel();
    void fitWithAZeroVarianceLevel();
    void fitWithAllResponsesEqualRefusesTests();
    void runningStatsSurviveCancellation();
    void tenMillionIdenticalValuesStreamed();
};

// Columns (1, 0, -1) and (1, d, -1) beside the intercept: the condition number of the
// unit-length columns grows like 1/d. Reference values: mpmath 1.2.1 at 60 digits
// (svd_r of the scaled 3 x 3 matrix).
void TestEdgeCases::nearlySingularCodingIsFlagged_data()
{
    QTest::addColumn<QByteArray>("delta");
    QTest::addColumn<bool>("exact");
    QTest::addColumn<double>("reference");
    const std::pair<const char *, double> cases[] = {{"1e-9", 3464101615.1377546},
                                                     {"1e-10", 34641016151.377546},
                                                     {"1e-12", 3464101615137.7546},
                                                     {"1e-14", 346410161513775.46},
                                                     {"1e-16", 34641016151377546.0}};
    for (const auto &[d, ref] : cases)
        for (bool exact : {true, false})
            QTest::newRow(qPrintable(u"d=%1 %2"_s.arg(QString::fromLatin1(d), exact ? u"exact"_s : u"floating"_s)))
                << QByteArray(d) << exact << ref;
}

void TestEdgeCases::nearlySingularCodingIsFlagged()
{
    QFETCH(QByteArray, delta);
    QFETCH(bool, exact);
    QFETCH(double, reference);
    const Scheme s = customScheme({{number("1", exact), number("0", exact), number("-1", exact)},
                                   {number("1", exact), number(delta.constData(), exact), number("-1", exact)}});
    const Analysis a = analyze(s);
    QCOMPARE(a.exact, exact);
    if (exact)
        QVERIFY(a.fullRank); // exactly, d is not 0
    if (a.conditionNumber) {
        // Floating point resolves the smallest singular value to about cond * eps.
        const double tolerance = std::max(1e-10, reference * 1e-15);
        QVERIFY2(std::abs(*a.conditionNumber / reference - 1) <= tolerance,
                 qPrintable(u"condition number %1, reference %2"_s.arg(*a.conditionNumber).arg(reference)));
    }
    // Always a warning: collinearity, or rank deficiency to working precision.
    QVERIFY2(hasFinding(a, Finding::Topic::Collinearity, Finding::Severity::Caution)
                 || hasFinding(a, Finding::Topic::Rank, Finding::Severity::Problem),
             qPrintable(findingsText(a)));
    // Floating hypotheses of an ill-conditioned coding have lost digits: the user is told.
    if (!exact && a.fullRank)
        QVERIFY2(hasFinding(a, Finding::Topic::Collinearity, Finding::Severity::Caution, u"significant digits"_s),
                 qPrintable(findingsText(a)));
    // Exact but singular to floating precision: said so.
    if (exact && !a.conditionNumber)
        QVERIFY2(hasFinding(a, Finding::Topic::Collinearity, Finding::Severity::Caution, u"floating-point precision"_s),
                 qPrintable(findingsText(a)));
    const QString problem = everyOutputFinite(s, a);
    QVERIFY2(problem.isEmpty(), qPrintable(problem));
}

// Treatment-like columns (0, s, 0) and (0, 0, t) for scales from 1e-300 to 1e300. The
// diagnostics do not depend on the scale of a column: condition number, correlations and
// VIF equal those of the unscaled coding; the hypotheses scale by 1/s.
void TestEdgeCases::extremeWeightsKeepDiagnostics_data()
{
    QTest::addColumn<QByteArray>("first");
    QTest::addColumn<QByteArray>("second");
    QTest::addColumn<bool>("exact");
    const std::pair<const char *, const char *> scales[] = {
        {"1e300", "1e300"}, {"1e-300", "1e-300"}, {"1e300", "1e-300"}, {"1e150", "1e-150"}, {"1e-200", "1"}};
    for (const auto &[s1, s2] : scales)
        for (bool exact : {true, false})
            QTest::newRow(qPrintable(u"%1,%2 %3"_s.arg(QString::fromLatin1(s1), QString::fromLatin1(s2),
                                                    exact ? u"exact"_s : u"floating"_s)))
                << QByteArray(s1) << QByteArray(s2) << exact;
}

void TestEdgeCases::extremeWeightsKeepDiagnostics()
{
    QFETCH(QByteArray, first);
    QFETCH(QByteArray, second);
    QFETCH(bool, exact);
    const Weight zero = number("0", exact);
    const Weight s1 = number(first.constData(), exact), s2 = number(second.constData(), exact);
    const Scheme scaled = customScheme({{zero, s1, zero}, {zero, zero, s2}});
    const Scheme plain = customScheme({{0, 1, 0}, {0, 0, 1}});
    const Analysis a = analyze(scaled);
    const Analysis b = analyze(plain);
    QVERIFY(a.fullRank);
    QVERIFY(a.conditionNumber);
    // Scale invariance against the unscaled coding, whose VIFs are 4/3 (correlation -1/2
    // between two dummies of three equal groups: 1 / (1 - 1/4)).
    QVERIFY(qFuzzyCompare(*a.conditionNumber, *b.conditionNumber));
    for (int j = 0; j < 2; ++j) {
        QVERIFY2(a.vif[size_t(j)], qPrintable(findingsText(a)));
        QVERIFY(qFuzzyCompare(*a.vif[size_t(j)], 4.0 / 3.0));
        QVERIFY(qFuzzyCompare(a.correlation(0, 1), -0.5));
    }
    // b1 = (mean(l2) - mean(l1)) / s1.
    const double expected = 1.0 / s1.value();
    QVERIFY2(std::abs(a.hypothesisValues(1, 1) / expected - 1) < 1e-12,
             qPrintable(u"%1 vs %2"_s.arg(a.hypothesisValues(1, 1)).arg(expected)));
    // Nothing is called constant, identical or dependent.
    for (const Finding &f : a.findings)
        QVERIFY2(f.topic != Finding::Topic::Rank && !f.message.contains(u"constant"_s) && !f.message.contains(u"undefined"_s),
                 qPrintable(f.message));
    const QString problem = everyOutputFinite(scaled, a);
    QVERIFY2(problem.isEmpty(), qPrintable(problem));
}

// k at the stated limit (core/base/Limits.h) is above the exact limit: floating path, stated, and the sum coding's
// hypotheses are still the level mean minus the grand mean (closed form: e_j - 1/k).
void TestEdgeCases::levelsAtTheLimitUseTheFloatingPathAndSayWhy()
{
    constexpr int k = kMaxLevels;
    Factor f;
    for (int i = 0; i < k; ++i)
        f.levels << u"level %1"_s.arg(i + 1);
    const Scheme s = makeScheme(f, SchemeKind::Sum).value();
    const Analysis a = analyze(s);
    QVERIFY(!a.exact);
    QVERIFY2(hasFinding(a, Finding::Topic::ExactPath, Finding::Severity::Info, u"exact-arithmetic limit of 40"_s),
             qPrintable(findingsText(a)));
    QVERIFY(a.fullRank);
    double worst = 0;
    for (int j = 0; j < k - 1; ++j)
        for (int i = 0; i < k; ++i)
            worst = std::max(worst, std::abs(a.hypothesisValues(j + 1, i) - ((i == j ? 1.0 : 0.0) - 1.0 / k)));
    QVERIFY2(worst < 1e-12, qPrintable(QString::number(worst)));
    QCOMPARE(a.hypotheses[1][0].display(), u"%1/%2"_s.arg(k - 1).arg(k)); // 1 - 1/k, recognised from the double
    const QString problem = everyOutputFinite(s, a);
    QVERIFY2(problem.isEmpty(), qPrintable(problem));
}

void TestEdgeCases::degenerateColumnsAreExplained_data()
{
    QTest::addColumn<int>("which");
    QTest::addColumn<bool>("exact");
    QTest::addColumn<QString>("dependency");
    for (bool exact : {true, false}) {
        const QString how = exact ? u" exact"_s : u" floating"_s;
        QTest::newRow(qPrintable(u"all-zero column"_s + how)) << 0 << exact << u"c2 = 0"_s;
        QTest::newRow(qPrintable(u"duplicate column"_s + how)) << 1 << exact << u"c2 = c1"_s;
        QTest::newRow(qPrintable(u"multiple of another"_s + how)) << 2 << exact << u"c2 = -5/2 c1"_s;
    }
}

void TestEdgeCases::degenerateColumnsAreExplained()
{
    QFETCH(int, which);
    QFETCH(bool, exact);
    QFETCH(QString, dependency);
    const std::vector<Weight> c1{number("1", exact), number("-1", exact), number("0", exact), number("0", exact)};
    std::vector<Weight> c2;
    for (const Weight &w : c1)
        c2.push_back(which == 0 ? number("0", exact) : which == 1 ? w : exact ? Weight::exact(w.rational() * Rational(-5, 2)) : Weight::approx(w.value() * -2.5));
    const std::vector<Weight> c3{number("0", exact), number("0", exact), number("1", exact), number("-1", exact)};
    const Scheme s = customScheme({c1, c2, c3});
    const Analysis a = analyze(s);
    QVERIFY(!a.fullRank);
    QCOMPARE(a.rank, 3);
    QVERIFY(!a.conditionNumber);
    QVERIFY(a.hypotheses.empty());
    QVERIFY2(a.dependencies.contains(dependency), qPrintable(a.dependencies.join(u"; "_s)));
    QVERIFY2(hasFinding(a, Finding::Topic::Rank, Finding::Severity::Problem, u"not identifiable"_s), qPrintable(findingsText(a)));
    if (which == 0)
        QVERIFY2(hasFinding(a, Finding::Topic::Collinearity, Finding::Severity::Caution, u"column 2 ('c2') is constant"_s),
                 qPrintable(findingsText(a)));
    if (which == 1)
        QVERIFY2(hasFinding(a, Finding::Topic::Rank, Finding::Severity::Problem, u"columns 1 and 2 are identical"_s),
                 qPrintable(findingsText(a)));
    auto h = hypothesisTable(a);
    QVERIFY(!h.ok());
    QVERIFY2(h.error().contains(u"rank deficient"_s) && h.error().contains(dependency), qPrintable(h.error()));
    const QString problem = everyOutputFinite(s, a);
    QVERIFY2(problem.isEmpty(), qPrintable(problem));
}

// Where both paths run (exact weights, k <= 40), the floating path on the same numbers
// gives the same hypotheses, rank and diagnostics to rounding.
void TestEdgeCases::exactAndFloatingPathsAgree_data()
{
    QTest::addColumn<int>("kind");
    QTest::addColumn<int>("levels");
    QTest::addColumn<bool>("withSizes");
    for (SchemeKind kind : standardSchemes())
        for (int k : {3, 12, 40})
            for (bool sizes : {false, true})
                QTest::newRow(qPrintable(u"%1 k=%2%3"_s.arg(schemeId(kind)).arg(k).arg(sizes ? u" sizes"_s : QString())))
                    << int(kind) << k << sizes;
}

void TestEdgeCases::exactAndFloatingPathsAgree()
{
    QFETCH(int, kind);
    QFETCH(int, levels);
    QFETCH(bool, withSizes);
    Factor f;
    for (int i = 0; i < levels; ++i) {
        f.levels << u"l%1"_s.arg(i + 1);
        if (withSizes)
            f.plannedN.push_back(Rational(1 + (7 * i) % 5, 1 + i % 3));
    }
    SchemeOptions o;
    o.polynomialForm = PolynomialForm::Integer;
    auto made = makeScheme(f, SchemeKind(kind), o);
    QVERIFY2(made.ok(), qPrintable(made.error()));
    Scheme exactScheme = *made;
    if (SchemeKind(kind) == SchemeKind::Polynomial && levels > 12)
        return; // integer trends of 40 levels are exact but their values reach 1e20: checked at k <= 12
    Scheme floating = exactScheme;
    for (Column &c : floating.columns)
        for (Weight &w : c.weights)
            w = Weight::approx(w.value());
    const Analysis ea = analyze(exactScheme);
    const Analysis fa = analyze(floating);
    QVERIFY(ea.exact);
    QVERIFY(!fa.exact);
    QCOMPARE(fa.rank, ea.rank);
    QCOMPARE(fa.fullRank, ea.fullRank);
    QCOMPARE(fa.sumsToZero, ea.sumsToZero);
    QCOMPARE(fa.orthogonal, ea.orthogonal);
    QCOMPARE(fa.orthogonalInDesign, ea.orthogonalInDesign);
    if (!ea.fullRank)
        return;
    const double scale = std::max(1.0, ea.hypothesisValues.cwiseAbs().maxCoeff());
    const double tolerance = 1e-12 * scale * (ea.conditionNumber ? *ea.conditionNumber : 1.0);
    QVERIFY2((fa.hypothesisValues - ea.hypothesisValues).cwiseAbs().maxCoeff() <= tolerance,
             qPrintable(u"largest difference %1"_s.arg((fa.hypothesisValues - ea.hypothesisValues).cwiseAbs().maxCoeff())));
    QVERIFY(ea.conditionNumber && fa.conditionNumber);
    QVERIFY(qFuzzyCompare(*ea.conditionNumber, *fa.conditionNumber));
}

void TestEdgeCases::exactPathLimitIsStated()
{
    for (int k : {kExactLevelLimit, kExactLevelLimit + 1}) {
        Factor f;
        for (int i = 0; i < k; ++i)
            f.levels << u"l%1"_s.arg(i + 1);
        const Analysis a = analyze(makeScheme(f, SchemeKind::Helmert).value());
        QCOMPARE(a.exact, k <= kExactLevelLimit);
        QCOMPARE(hasFinding(a, Finding::Topic::ExactPath, Finding::Severity::Info,
                            u"%1 levels is above the exact-arithmetic limit of %2"_s.arg(k).arg(kExactLevelLimit)),
                 k > kExactLevelLimit);
    }
}

void TestEdgeCases::nonFiniteCellIsRefusedByEveryExporter()
{
    ExportTable t;
    t.rowNames = {u"a"_s, u"b"_s};
    t.columnNames = {u"x"_s};
    for (double bad : {std::nan(""), HUGE_VAL, -HUGE_VAL}) {
        t.cells = {{Weight(1)}, {Weight::approx(bad)}};
        for (ExportFormat f : exportFormats()) {
            auto r = exportTable(t, f);
            QVERIFY(!r.ok());
            QCOMPARE(r.error(), u"cannot export: row 2 ('b'), column 1 ('x') is not a finite number; expected a finite weight"_s);
        }
    }
}

// ---------------------------------------------------------------------------
// Data fits on degenerate data. Reference values: NumPy 1.24.2 lstsq and SciPy 1.10.1
// (stats.t.sf, stats.f.sf) on the raw observations, treatment coding.

namespace {

MatchedLevels levelsOf(const std::vector<std::vector<double>> &groups)
{
    MatchedLevels m;
    for (size_t g = 0; g < groups.size(); ++g) {
        m.levels << u"g%1"_s.arg(g + 1);
        RunningStats s;
        for (double y : groups[g])
            s.add(y);
        m.stats.push_back(s);
        m.sources.push_back({m.levels.back()});
    }
    return m;
}

Scheme treatment(int k)
{
    Factor f;
    for (int i = 0; i < k; ++i)
        f.levels << u"g%1"_s.arg(i + 1);
    return makeScheme(f, SchemeKind::Treatment).value();
}

Result<FitResult> fitTreatment(const std::vector<std::vector<double>> &groups)
{
    const Scheme s = treatment(int(groups.size()));
    const Analysis a = analyze(s);
    return fitLevels(levelsOf(groups), designRows(s), a.hypothesisValues, a.coefficientNames, true);
}

struct Expected
{
    std::vector<double> estimate, se, p;
    double sigma, df, f, fP;
};

void compareFit(const FitResult &fit, const Expected &e)
{
    for (size_t i = 0; i < e.estimate.size(); ++i) {
        QVERIFY(std::abs(fit.coefficients[i].estimate - e.estimate[i]) < 1e-12);
        QVERIFY(qFuzzyCompare(fit.coefficients[i].se, e.se[i]));
        QVERIFY2(std::abs(fit.coefficients[i].p - e.p[i]) < 1e-12, qPrintable(QString::number(fit.coefficients[i].p)));
    }
    QVERIFY(qFuzzyCompare(fit.sigma, e.sigma));
    QCOMPARE(fit.df, e.df);
    QVERIFY(qFuzzyCompare(fit.f, e.f));
    QVERIFY(std::abs(fit.fP - e.fP) < 1e-12);
    const QString json = QString::fromUtf8(QJsonDocument(fitResultToJson(fit, DataSummary{})).toJson());
    const QString problem = fuzz::checkNoNonFiniteNumber(json, true);
    QVERIFY2(problem.isEmpty(), qPrintable(problem));
}

} // namespace

void TestEdgeCases::fitWithOneObservationInALevel()
{
    auto fit = fitTreatment({{1, 2, 3}, {5}, {4, 6}});
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QVERIFY(std::isnan(fit->levelStats[1].sd())); // one value: no SD, shown as the missing mark (—)
    compareFit(*fit, {{2, 3, 3}, {0.6666666666666666, 1.3333333333333333, 1.0540925533894596},
                      {0.057668885622437174, 0.10993809639660251, 0.06532071006198009}, 1.1547005383792515, 3, 5.0625,
                      0.1092780442820017});
}

void TestEdgeCases::fitWithAZeroVarianceLevel()
{
    auto fit = fitTreatment({{2, 2, 2}, {1, 3}, {5, 6, 7}});
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QCOMPARE(fit->levelStats[0].sd(), 0.0);
    compareFit(*fit, {{2, 0, 4}, {0.5163977794943222, 0.816496580927726, 0.7302967433402214},
                      {0.011724811003954618, 1.0, 0.0027649603013049566}, 0.8944271909999159, 5, 18.75,
                      0.004747365678685366});
}

// Every response equal: no residual variation, so standard errors, t, p, intervals
// and F are undefined. Estimates are exact; the rest is not a confident 0 or infinity.
void TestEdgeCases::fitWithAllResponsesEqualRefusesTests()
{
    for (double v : {4.25, 0.1, 123456789.123, -1e-200}) {
        auto fit = fitTreatment({{v, v, v}, {v, v}, {v, v, v, v}});
        QVERIFY2(fit.ok(), qPrintable(fit.error()));
        // Estimates to rounding at the scale of the data (QR of the level means).
        QVERIFY(std::abs(fit->coefficients[0].estimate - v) <= 1e-15 * std::abs(v));
        QVERIFY2(std::abs(fit->coefficients[1].estimate) <= 4e-15 * std::abs(v),
                 qPrintable(QString::number(fit->coefficients[1].estimate)));
        QCOMPARE(fit->rss, 0.0);
        for (const FitCoefficient &c : fit->coefficients)
            QVERIFY2(std::isnan(c.t) && std::isnan(c.p) && std::isnan(c.ciLow), qPrintable(u"t %1 p %2"_s.arg(c.t).arg(c.p)));
        QVERIFY(std::isnan(fit->f) && std::isnan(fit->fP));
        QVERIFY2(fit->notes.join(u' ').contains(u"no residual variation"_s), qPrintable(fit->notes.join(u" | "_s)));
    }
}

// 10^7 values far from zero: the textbook sum-of-squares formula loses every digit;
// Welford's recurrence keeps them. Closed form for 0/1 alternating around 1e9:
// mean 1e9 + 0.5, variance 0.25 n / (n - 1).
void TestEdgeCases::runningStatsSurviveCancellation()
{
    constexpr int n = 10'000'000;
    RunningStats same, alternating;
    for (int i = 0; i < n; ++i) {
        same.add(1e9 + 0.1);
        alternating.add(1e9 + (i % 2));
    }
    QCOMPARE(same.mean, 1e9 + 0.1);
    QCOMPARE(same.m2, 0.0);
    QCOMPARE(same.sd(), 0.0);
    QVERIFY(std::abs(alternating.mean - (1e9 + 0.5)) < 1e-6);
    QVERIFY(std::abs(alternating.variance() / (0.25 * n / (n - 1)) - 1) < 1e-9);
}

// 10^7 identical rows streamed from a file in blocks (the file is written in chunks;
// nothing holds the 10^7 values): exact mean, zero SD, and a fit that says its tests
// are undefined instead of printing them.
void TestEdgeCases::tenMillionIdenticalValuesStreamed()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"identical.csv"_s);
    {
        QFile f(path);
        QVERIFY(f.open(QIODevice::WriteOnly));
        f.write("group,y\n");
        QByteArray chunk;
        for (int i = 0; i < 1000; ++i)
            chunk += i % 2 ? "b,100000000.1\n" : "a,100000000.1\n";
        for (int c = 0; c < 10'000; ++c)
            QCOMPARE(f.write(chunk), chunk.size());
    }
    DataReadOptions o;
    o.factorColumn = u"group"_s;
    o.responseColumn = u"y"_s;
    auto data = readLevelData(path, o);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    QCOMPARE(data->usedRows, 10'000'000);
    QCOMPARE(int(data->levels.size()), 2);
    for (const LevelStats &l : data->levels) {
        QCOMPARE(l.stats.n, 5e6);
        QCOMPARE(l.stats.mean, 100000000.1);
        QCOMPARE(l.stats.sd(), 0.0);
    }
    Factor f;
    f.levels = {u"a"_s, u"b"_s};
    auto fit = fitScheme(makeScheme(f, SchemeKind::Treatment).value(), *data);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QCOMPARE(fit->coefficients[0].estimate, 100000000.1);
    QCOMPARE(fit->coefficients[1].estimate, 0.0);
    QVERIFY(std::isnan(fit->coefficients[1].p));
    QVERIFY2(fit->notes.join(u' ').contains(u"no residual variation"_s), qPrintable(fit->notes.join(u" | "_s)));
}

QTEST_GUILESS_MAIN(TestEdgeCases)
#include "TestEdgeCases.moc"
