#pragma once

#include "core/analysis/Adjustment.h"
#include "core/base/Result.h"
#include "core/model/Factor.h"

#include <Eigen/Dense>

#include <QJsonObject>
#include <QString>
#include <QStringList>

#include <functional>
#include <limits>
#include <optional>
#include <vector>

namespace cb {

struct Analysis;

// Power and sample size for planned contrasts of a one-factor design, from the
// exact noncentral t (contrasts) and noncentral F (omnibus) distributions.

// Family-wise adjustment of alpha across the contrasts that will be tested: Adjustment
// (core/analysis/Adjustment.h) except Holm's step-down procedure, which needs the observed
// p-values and so belongs to the data check.

// What the analyst expects and plans. k = number of levels.
struct PowerSettings
{
    std::vector<double> means; // k expected level means
    double sd = 1.0;           // common SD, used when sds is empty
    std::vector<double> sds;   // k per-level SDs; when given, contrasts use Welch–Satterthwaite df
    std::vector<double> n;     // k planned sizes; when empty, the sizes come from ratios and total
    std::vector<double> ratios; // k allocation ratios (empty: equal), used with total
    double total = 0.0;        // total N, used when n is empty
    double alpha = 0.05;       // family-wise alpha before adjustment
    bool oneSided = false;     // one-sided contrasts test psi > 0, in the direction each row is written
    double target = 0.8;       // target power for the sample-size search
    Adjustment adjustment = Adjustment::None;
    // Within participants (repeated measures): every participant gives a value at every level.
    // n then holds the number of participants P at every level (or total is P), ratios are not
    // used, and the covariance of a participant's values is Sigma = D R D, D the SDs (sd or sds)
    // on the diagonal and R the correlations: `correlation` between any two levels, or the full
    // k x k `correlations` when given.
    Measure measure = Measure::Between;
    double correlation = 0.0;
    Eigen::MatrixXd correlations;

    bool perLevelSds() const { return !sds.empty(); }
    bool within() const { return measure == Measure::Within; }
};

// Within participants: the covariance of a participant's k values, D R D (see PowerSettings).
// Assumes settings that validatePowerSettings accepts.
Eigen::MatrixXd withinCovariance(const PowerSettings &settings, int levelCount);

// A correlation matrix from text: one row per line, numbers separated by commas, semicolons,
// tabs or spaces (a CSV or a pasted block); blank lines are skipped. where names the source
// in messages ("corr.csv, line 2, item 3: ..."). The matrix is checked against the levels by
// validatePowerSettings (square, symmetric, 1 on the diagonal, positive definite).
Result<Eigen::MatrixXd> parseCorrelationMatrix(const QString &text, const QString &where);

// Largest group size the sample-size search tries.
inline constexpr long long kPowerSearchCap = 10'000'000;
// The largest group size a power computation uses (exactly representable as a double).
inline constexpr long long kMaxGroupSize = 1'000'000'000'000'000;

// Result of a sample-size search. The search variable is the size of the
// smallest group; every group is that size times its ratio to the smallest
// ratio, rounded up.
struct SampleSize
{
    bool reachable = false;
    std::vector<long long> perLevel; // k sizes; empty when not reachable
    long long total = 0;
    double power = std::numeric_limits<double>::quiet_NaN(); // power at perLevel
};

// The smallest sizes from groupSizesFor(t, ratios), t from least up to kPowerSearchCap, at which
// powerAt(sizes) reaches target (power grows with t); the search computePower uses. When it is
// not reached, unreachedNote says why.
SampleSize smallestSampleSize(const std::function<double(const std::vector<double> &)> &powerAt,
                              const std::vector<double> &ratios, double target, long long least = 2);
QString unreachedNote(const SampleSize &size, double target, bool within);

// The power of one planned contrast (one hypothesis row h).
struct ContrastPower
{
    QString name;
    std::vector<double> weights;   // h, k values
    double estimate = 0.0;         // psi = h . mean
    double se = 0.0;               // sqrt(sum h_i^2 sigma_i^2 / n_i); within: sqrt(h' Sigma h / P)
    // psi over the SD, with h rescaled so its positive (or negative, whichever is
    // larger) weights sum to 1 (Kline 2013, "standardized contrast"); with per-level
    // SDs the SD is sqrt(sum h_i^2 s_i^2 / sum h_i^2).
    double effectSize = 0.0;
    double noncentrality = 0.0;    // psi / se
    double df = 0.0;               // N - k, or Welch–Satterthwaite; within: P - 1
    bool welch = false;
    double alpha = 0.0;            // per-test alpha after the adjustment
    double power = 0.0;            // at the planned sizes
    SampleSize required;           // smallest sizes reaching the target; not searched when psi is 0, or negative one-sided
    bool zeroEstimate = false;     // psi is 0: power equals alpha at every n
    bool fewerThanOmnibus = false; // reaches the target with a smaller total than the omnibus test
    QString part;                  // mixed design (MixedPower.h): "between", "within", "between × within"; else empty
    QStringList notes;
};

// The power of the test that all k means are equal: between groups the one-way ANOVA F-test;
// within participants Hotelling's (1931) T^2 on k - 1 differences of the levels, as an F with
// k - 1 and P - k + 1 df (it needs P >= k and assumes no sphericity).
struct OmnibusPower
{
    bool hotelling = false;     // within participants
    int df1 = 0;                // k - 1
    double df2 = 0.0;           // N - k; within: P - k + 1
    // Cohen's f = sqrt(sum n_i (mu_i - mu_w)^2 / N) / sigma; within: sqrt(delta' (C Sigma C')^-1 delta),
    // delta = C mu, C any k - 1 independent contrasts (the result does not depend on which)
    double effectSize = 0.0;
    double noncentrality = 0.0; // lambda = N f^2; within: P f^2
    double alpha = 0.0;         // the unadjusted alpha (one test)
    double power = 0.0;
    double sd = 0.0;            // the common SD, or the pooled SD from per-level SDs (within: the root mean variance)
    bool pooledFromLevelSds = false;
    SampleSize required;
    QStringList notes;
};

// A multivariate test of a mixed design (core/power/MixedPower.h, mixedTerms): Wilks' lambda as
// Rao's F, the data check's test, at the planned participants per group.
struct TermPower
{
    QString name;
    QString hypothesis;
    int df1 = 0;                // rows of L times columns of M
    double df2 = std::numeric_limits<double>::quiet_NaN(); // Rao's
    double noncentrality = std::numeric_limits<double>::quiet_NaN();
    double power = std::numeric_limits<double>::quiet_NaN();
    bool exact = true;          // min(rows of L, columns of M) = 1: the noncentral F is exact
    SampleSize required;
    QStringList notes;
};

struct PowerReport
{
    int levelCount = 0;
    bool within = false;          // sizes count participants (every one at every level)
    QStringList groups;           // mixed design (MixedPower.h): the between groups; sizes are participants per group
    std::optional<double> correlation; // within: the common correlation (none with a full matrix)
    std::vector<double> plannedN; // the planned sizes used, k values (within: P at each level)
    double plannedTotal = 0.0;
    double alpha = 0.05;
    double perTestAlpha = 0.05;
    Adjustment adjustment = Adjustment::None;
    bool oneSided = false;
    double target = 0.8;
    bool welch = false;
    std::vector<ContrastPower> contrasts;
    OmnibusPower omnibus;
    // A mixed design: its multivariate tests, the data check's (all within cells first), at alpha unadjusted.
    std::vector<TermPower> terms;
    // Within participants: the first contrast with a sample size, planned as separate groups
    // with the same means and SDs (equal groups), for withinExplanation; -1 when none.
    int comparedContrast = -1;
    SampleSize asGroups;
    QStringList notes;    // about these inputs
    QStringList cautions; // powerCautions()
};

// Empty when the settings fit a factor with levelCount levels; otherwise a message naming the
// field ("means: 3 values for 4 levels; give one per level") and that field's key ("means", "sds",
// "sd", "n", "ratios", "total", "alpha", "target", "adjust", "levels",
// "correlation", "correlations").
// fieldPrefix goes before each field name in the message ("--" gives "--means: ...").
Problem validatePowerSettings(const PowerSettings &settings, int levelCount, const QString &fieldPrefix = {});

// The planned sizes: settings.n, or total split by the ratios (not rounded).
std::vector<double> plannedSizes(const PowerSettings &settings, int levelCount);
// The ratios the sample-size search keeps: settings.ratios, else the planned n, else equal.
std::vector<double> allocationRatios(const PowerSettings &settings, int levelCount);
// Group sizes for a smallest group of `smallest`: ceil(smallest * r_i / min r).
std::vector<long long> groupSizesFor(long long smallest, const std::vector<double> &ratios);

// Alpha per contrast: alpha, alpha / m (Bonferroni) or 1 - (1 - alpha)^(1/m) (Šidák).
double perTestAlpha(double alpha, Adjustment adjustment, int tests);

// Power of a t-test whose statistic follows the noncentral t(df, noncentrality):
// two-sided P(T > t) + P(T < -t) with t the 1 - alpha/2 quantile of t(df);
// one-sided P(T > t) with t the 1 - alpha quantile. NaN when undefined.
double tTestPower(double noncentrality, double df, double alpha, bool oneSided);
// Power of an F-test under the noncentral F(df1, df2, lambda): P(F > f) with f the 1 - alpha quantile of F(df1, df2).
double fTestPower(double lambda, double df1, double df2, double alpha);

// Power and sample size for each row of contrastRows (m x k hypothesis rows on the
// level means, without an intercept row) and for the omnibus F-test.
// names: m names (missing ones become "contrast 1", ...).
Result<PowerReport> computePower(const Eigen::MatrixXd &contrastRows, const QStringList &names,
                                 const PowerSettings &settings);

// Power over a list of smallest-group sizes (the search variable; group sizes from
// groupSizesFor with allocationRatios). contrast indexes a row of contrastRows, the
// adjustment counting all rows; contrast = -1 gives the omnibus F-test.
Result<std::vector<double>> powerCurve(const Eigen::MatrixXd &contrastRows, int contrast,
                                       const PowerSettings &settings,
                                       const std::vector<long long> &smallestGroupSizes);
// About `points` sizes from 2 to `upTo` (at least 2 points), evenly spaced, whole and distinct.
std::vector<long long> powerCurveSizes(long long upTo, int points = 60);

// The contrast rows of an analysis: hypothesisValues without the intercept row
// (when there is one), named by columnNames. Fails when the coding is rank deficient.
struct ContrastRows
{
    Eigen::MatrixXd rows;
    QStringList names;
};
Result<ContrastRows> contrastRowsOf(const Analysis &analysis);

// Means from expected differences from a baseline level (which is taken as 0):
// differences has k - 1 values, for the levels other than baseline, in order.
std::vector<double> meansFromDifferences(const std::vector<double> &differences, int baseline);

// Numbers separated by commas; each may be written as a fraction ("1/3"). where names the field.
Result<std::vector<double>> parseNumberList(const QString &text, const QString &where);

// Cautions to show beside every power result; within participants also the one about the
// correlation, which is usually a guess.
QStringList powerCautions(bool within = false);
// Why the same means need far fewer participants within than between participants, in one
// sentence with the figures of a report (shown in the window beside a within factor's power).
QString withinExplanation(const PowerReport &report);

// {"levels", "planned_n", "alpha", "alpha_per_test", "adjustment", "sided", "target", "welch",
//  "contrasts": [{"name", "weights", "estimate", "se", "effect_size", "noncentrality", "df", "welch",
//                 "alpha", "power", "n_required" (per level, or null; within: the number of
//                 participants), "n_required_total", "reachable",
//                 "notes"}],
//  "omnibus": {"test" ("anova"; within: "hotelling"), "df1", "df2", "effect_size", "noncentrality", "alpha", "power", "sd", "n_required",
//              "n_required_total", "reachable", "notes"},
//  "measured" ("between" or "within"), "correlation" (within: the common one; null with a full matrix),
//  mixed design: "groups" (names), each contrast's "part", n_required per group, omnibus "test" "hotelling"
//  (all within cells equal, averaged over the groups),
//  "notes", "cautions"}
QJsonObject powerReportToJson(const PowerReport &report);

} // namespace cb
