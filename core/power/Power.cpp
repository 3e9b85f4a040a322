#include "core/power/Power.h"

#include "core/analysis/Analysis.h"
#include "core/model/Factor.h"
#include "core/base/JsonArray.h"
#include "core/base/NumberText.h"
#include "core/base/Weight.h"

// Boost 1.74's fisher_f quantile trips GCC's maybe-uninitialized check when inlined.
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#include <boost/math/distributions/fisher_f.hpp>
#include <boost/math/distributions/non_central_f.hpp>
#include <boost/math/distributions/non_central_t.hpp>
#include <boost/math/distributions/students_t.hpp>
#pragma GCC diagnostic pop

#include <Eigen/Cholesky>
#include <Eigen/Eigenvalues>

#include <QJsonArray>
#include <QRegularExpression>

#include <algorithm>
#include <cmath>
#include <exception>
#include <functional>
#include <numeric>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

namespace bm = boost::math;
namespace bp = boost::math::policies;
// Errors become NaN (checked by the callers) instead of exceptions; doubles are
// not promoted to long double (the results agree with SciPy well below 1e-9).
using Policy = bp::policy<bp::domain_error<bp::errno_on_error>, bp::pole_error<bp::errno_on_error>,
                          bp::overflow_error<bp::errno_on_error>, bp::evaluation_error<bp::errno_on_error>,
                          bp::rounding_error<bp::errno_on_error>, bp::promote_double<false>>;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

QString num(double x)
{
    return doubleToString(x);
}

// Short text for people: core's number formatter (the one mark for what is not a finite number).
QString shortNum(double x)
{
    return numberText(x);
}

// Means and SDs whose squares and ratios a double holds: beyond these the noncentrality
// overflows to infinity, or a variance to 0, and no power can be computed.
constexpr double kMaxMagnitude = 1e100;

bool positiveFinite(double x)
{
    return std::isfinite(x) && x > 0.0;
}

QString checkCount(const std::vector<double> &values, int levelCount, const QString &field)
{
    if (values.size() != size_t(levelCount))
        return u"%1: %2 values for %3 levels; give one per level"_s.arg(field).arg(values.size()).arg(levelCount);
    return {};
}

// Every value finite and, when positive is set, above 0.
QString checkValues(const std::vector<double> &values, const QString &field, bool positive, const QString &what)
{
    for (size_t i = 0; i < values.size(); ++i) {
        if (!std::isfinite(values[i]))
            return u"%1, item %2: not a finite number"_s.arg(field).arg(i + 1);
        if (positive && values[i] <= 0.0)
            return u"%1, item %2: %3 is not a positive %4; it must be above 0"_s.arg(field).arg(i + 1).arg(num(values[i]), what);
        if (std::abs(values[i]) > kMaxMagnitude || (positive && values[i] < 1.0 / kMaxMagnitude))
            return u"%1, item %2: %3 is beyond what power can be computed for; give magnitudes from 1e-100 to 1e100"_s.arg(field)
                .arg(i + 1)
                .arg(num(values[i]));
    }
    return {};
}

// The largest difference between means in SDs must keep the noncentrality finite.
QString checkSpread(const PowerSettings &s, const QString &field)
{
    const auto [lo, hi] = std::minmax_element(s.means.begin(), s.means.end());
    const double sd = s.perLevelSds() ? *std::min_element(s.sds.begin(), s.sds.end()) : s.sd;
    if ((*hi - *lo) / sd > kMaxMagnitude)
        return u"%1: the means differ by %2 SDs, beyond what power can be computed for (at most 1e100)"_s.arg(field, shortNum((*hi - *lo) / sd));
    return {};
}

// What the power at any sizes needs, worked out once: within participants the covariance and
// the Hotelling quadratic form of the means.
struct Design
{
    Design(const PowerSettings &s, int levels) : means(s.means), settings(s), k(levels)
    {
        if (!s.within())
            return;
        sigma = withinCovariance(s, k);
        // delta' (C Sigma C')^-1 delta with C the differences of levels 2..k from level 1: any
        // k - 1 independent contrasts give the same value.
        Eigen::MatrixXd c = Eigen::MatrixXd::Zero(k - 1, k);
        Eigen::VectorXd mu(k);
        for (int i = 0; i < k; ++i)
            mu[i] = means[size_t(i)];
        for (int i = 1; i < k; ++i) {
            c(i - 1, 0) = -1.0;
            c(i - 1, i) = 1.0;
        }
        const Eigen::VectorXd delta = c * mu;
        const Eigen::LDLT<Eigen::MatrixXd> ldlt(c * sigma * c.transpose());
        hotelling = ldlt.info() == Eigen::Success ? delta.dot(ldlt.solve(delta)) : kNaN;
    }

    const std::vector<double> &means;
    const PowerSettings &settings;
    int k = 0;
    Eigen::MatrixXd sigma;   // within: covariance of a participant's values
    double hotelling = 0.0;  // within: delta' (C Sigma C')^-1 delta

    double sdOf(int i) const { return settings.perLevelSds() ? settings.sds[size_t(i)] : settings.sd; }
};

struct ContrastValues
{
    double estimate = 0.0;
    double se = 0.0;
    double df = 0.0;
    double noncentrality = 0.0;
    double power = kNaN;
};

// Expected estimate, with values within rounding of zero made exactly zero.
double expectedEstimate(const Eigen::VectorXd &h, const std::vector<double> &means)
{
    double psi = 0.0;
    double scale = 0.0;
    for (Eigen::Index i = 0; i < h.size(); ++i) {
        psi += h[i] * means[size_t(i)];
        scale += std::abs(h[i] * means[size_t(i)]);
    }
    return std::abs(psi) <= 1e-12 * scale ? 0.0 : psi;
}

ContrastValues contrastAt(const Design &d, const Eigen::VectorXd &h, const std::vector<double> &n, double alpha)
{
    ContrastValues v;
    v.estimate = expectedEstimate(h, d.means);
    if (d.settings.within()) {
        // The participants' contrast scores h'y have variance h' Sigma h; one-sample t, P - 1 df.
        const double participants = n.front();
        v.se = std::sqrt(h.dot(d.sigma * h) / participants);
        v.df = participants - 1.0;
        v.noncentrality = v.estimate == 0.0 ? 0.0 : v.estimate / v.se;
        v.power = tTestPower(v.noncentrality, v.df, alpha, d.settings.oneSided);
        return v;
    }
    double var = 0.0;
    double welchDen = 0.0;
    double total = 0.0;
    for (int i = 0; i < d.k; ++i) {
        const double s = d.sdOf(i);
        const double a = h[i] * h[i] * s * s / n[size_t(i)];
        var += a;
        if (a > 0.0)
            welchDen += a * a / (n[size_t(i)] - 1.0);
        total += n[size_t(i)];
    }
    v.se = std::sqrt(var);
    // Welch (1947) and Satterthwaite (1946) degrees of freedom for a linear combination.
    v.df = d.settings.perLevelSds() ? var * var / welchDen : total - d.k;
    v.noncentrality = v.estimate == 0.0 ? 0.0 : v.estimate / v.se;
    v.power = tTestPower(v.noncentrality, v.df, alpha, d.settings.oneSided);
    return v;
}

struct OmnibusValues
{
    double df2 = 0.0;
    double effectSize = 0.0;
    double noncentrality = 0.0;
    double sd = 0.0;
    double power = kNaN;
};

OmnibusValues omnibusAt(const Design &d, const std::vector<double> &n, double alpha)
{
    OmnibusValues v;
    const bool allEqual = std::adjacent_find(d.means.begin(), d.means.end(), std::not_equal_to<>()) == d.means.end();
    if (d.settings.within()) {
        // Hotelling's T^2 = P delta_hat' S^-1 delta_hat; (P - k + 1) / ((P - 1)(k - 1)) T^2 follows the
        // noncentral F(k - 1, P - k + 1, lambda = P delta' (C Sigma C')^-1 delta).
        const double participants = n.front();
        v.df2 = participants - d.k + 1.0;
        v.effectSize = allEqual ? 0.0 : std::sqrt(d.hotelling);
        v.noncentrality = allEqual ? 0.0 : participants * d.hotelling;
        v.sd = std::sqrt(d.sigma.diagonal().mean());
        v.power = fTestPower(v.noncentrality, d.k - 1, v.df2, alpha);
        return v;
    }
    double total = 0.0;
    double weighted = 0.0;
    for (int i = 0; i < d.k; ++i) {
        total += n[size_t(i)];
        weighted += n[size_t(i)] * d.means[size_t(i)];
    }
    const double grand = weighted / total;
    double ss = 0.0;
    for (int i = 0; i < d.k; ++i) {
        const double dev = d.means[size_t(i)] - grand;
        ss += n[size_t(i)] * dev * dev;
    }
    v.df2 = total - d.k;
    double var = d.settings.sd * d.settings.sd;
    if (d.settings.perLevelSds()) {
        var = 0.0;
        for (int i = 0; i < d.k; ++i)
            var += (n[size_t(i)] - 1.0) * d.sdOf(i) * d.sdOf(i);
        var /= v.df2;
    }
    v.sd = std::sqrt(var);
    v.noncentrality = allEqual ? 0.0 : ss / var;
    v.effectSize = std::sqrt(v.noncentrality / total);
    v.power = fTestPower(v.noncentrality, d.k - 1, v.df2, alpha);
    return v;
}

std::vector<double> toDouble(const std::vector<long long> &sizes)
{
    return std::vector<double>(sizes.begin(), sizes.end());
}

// Smallest smallest-group size t (2 <= t <= cap) with powerAt(sizes(t)) >= target:
// doubling, then bisection. Power grows with t, so the bisection finds the smallest.
SampleSize searchSampleSize(const std::function<double(const std::vector<double> &)> &powerAt,
                            const std::vector<double> &ratios, double target, long long least = 2)
{
    auto meets = [&](long long t, double *power) {
        *power = powerAt(toDouble(groupSizesFor(t, ratios)));
        return *power >= target;
    };
    SampleSize out;
    double power = kNaN;
    long long failing = least - 1; // below the smallest size allowed
    long long passing = least;
    double passingPower = kNaN;
    while (!meets(passing, &power)) {
        if (std::isnan(power) || passing >= kPowerSearchCap) {
            out.power = power;
            return out;
        }
        failing = passing;
        passing = std::min(passing * 2, kPowerSearchCap);
    }
    passingPower = power;
    while (passing - failing > 1) {
        const long long mid = failing + (passing - failing) / 2;
        if (meets(mid, &power)) {
            passing = mid;
            passingPower = power;
        } else {
            failing = mid;
        }
    }
    out.reachable = true;
    out.perLevel = groupSizesFor(passing, ratios);
    out.total = std::accumulate(out.perLevel.begin(), out.perLevel.end(), 0LL);
    out.power = passingPower;
    return out;
}

QString unreachableNote(const SampleSize &s, double target, bool within)
{
    if (std::isnan(s.power))
        return u"the power could not be evaluated at some sizes; no sample size is given"_s;
    return u"power %1 is not reached with up to %2 %3 (power there: %4)"_s
        .arg(shortNum(target), QString::number(kPowerSearchCap), within ? u"participants"_s : u"in the smallest group"_s,
             shortNum(s.power));
}

// The ratios the search keeps: within participants one number, P (so a SampleSize holds {P}
// and its total is P).
std::vector<double> searchRatios(const PowerSettings &s, int levelCount)
{
    return s.within() ? std::vector<double>{1.0} : allocationRatios(s, levelCount);
}

void putSampleSize(QJsonObject &o, const SampleSize &s, bool within)
{
    if (s.reachable && within) {
        o[u"n_required"_s] = double(s.total);
        o[u"n_required_total"_s] = double(s.total);
        o[u"power_at_n_required"_s] = jsonNumber(s.power);
    } else if (s.reachable) {
        QJsonArray a;
        for (long long v : s.perLevel)
            a.append(double(v));
        o[u"n_required"_s] = a;
        o[u"n_required_total"_s] = double(s.total);
        o[u"power_at_n_required"_s] = jsonNumber(s.power);
    } else {
        o[u"n_required"_s] = QJsonValue::Null;
        o[u"n_required_total"_s] = QJsonValue::Null;
        o[u"power_at_n_required"_s] = QJsonValue::Null;
    }
    o[u"reachable"_s] = s.reachable;
}

void putNumbers(QJsonObject &o, std::initializer_list<std::pair<const char16_t *, double>> numbers)
{
    for (const auto &[key, value] : numbers)
        o[QString::fromUtf16(key)] = jsonNumber(value);
}


// A correlation matrix for levelCount levels: square, finite, 1 on the diagonal, -1 to 1
// elsewhere, symmetric, positive definite. Messages name the cell (row and column from 1).
QString checkCorrelationMatrix(const Eigen::MatrixXd &r, int levelCount, const QString &field)
{
    if (r.rows() != levelCount || r.cols() != levelCount)
        return u"%1: a %2 x %3 matrix for %4 levels; give one row and one column per level"_s.arg(field)
            .arg(r.rows())
            .arg(r.cols())
            .arg(levelCount);
    const auto cell = [&](Eigen::Index i, Eigen::Index j) { return u"%1, row %2, column %3"_s.arg(field).arg(i + 1).arg(j + 1); };
    for (Eigen::Index i = 0; i < r.rows(); ++i)
        for (Eigen::Index j = 0; j < r.cols(); ++j) {
            const double v = r(i, j);
            if (!std::isfinite(v))
                return u"%1: not a finite number"_s.arg(cell(i, j));
            if (i == j && std::abs(v - 1.0) > 1e-12)
                return u"%1: %2 on the diagonal; a level's correlation with itself is 1"_s.arg(cell(i, j), num(v));
            if (std::abs(v) > 1.0)
                return u"%1: %2 is not a correlation; expected a number from -1 to 1"_s.arg(cell(i, j), num(v));
            if (j > i && std::abs(v - r(j, i)) > 1e-12)
                return u"%1: %2, but row %3, column %4 is %5; the matrix must be symmetric"_s.arg(cell(i, j), num(v))
                    .arg(j + 1)
                    .arg(i + 1)
                    .arg(num(r(j, i)));
        }
    // Positive definite: the smallest eigenvalue of each leading block; the first block that
    // fails names the row that makes the correlations impossible together.
    constexpr double kSmallest = 1e-10;
    if (Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd>(r, Eigen::EigenvaluesOnly).eigenvalues().minCoeff() > kSmallest)
        return {};
    Eigen::Index row = r.rows() - 1;
    for (Eigen::Index j = 2; j <= r.rows(); ++j)
        if (Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd>(r.topLeftCorner(j, j), Eigen::EigenvaluesOnly).eigenvalues().minCoeff()
            <= kSmallest) {
            row = j - 1;
            break;
        }
    return u"%1, row %2: with this row the correlations of the first %2 levels are not positive definite; no participants' "
           u"values can have these correlations together (lower the largest ones, or make them agree with each other)"_s
        .arg(field)
        .arg(row + 1);
}

// Within participants: one number of participants, no ratios, and correlations that a covariance
// can have. Between groups: no correlation.
Problem checkWithin(const PowerSettings &s, int levelCount, const std::function<QString(const char16_t *)> &field)
{
    const auto problem = [](const char16_t *key, QString message) { return Problem{std::move(message), QString::fromUtf16(key)}; };
    if (!s.within()) {
        if (s.correlation != 0.0 || s.correlations.size() != 0)
            return problem(s.correlations.size() != 0 ? u"correlations" : u"correlation",
                           u"%1: a correlation is used only when the factor is measured within participants"_s.arg(
                               field(s.correlations.size() != 0 ? u"correlations" : u"correlation")));
        return {};
    }
    if (!s.ratios.empty())
        return problem(u"ratios", u"%1: within participants every participant gives a value at every level, so there are no groups "
                                  u"to split; give the number of participants"_s.arg(field(u"ratios")));
    for (size_t i = 1; i < s.n.size(); ++i)
        if (s.n[i] != s.n[0])
            return problem(u"n", u"%1: within participants the same participants are at every level; give one number of "
                                 u"participants, not %2 and %3"_s.arg(field(u"n"), num(s.n[0]), num(s.n[i])));
    if (s.correlations.size() != 0) {
        if (QString e = checkCorrelationMatrix(s.correlations, levelCount, field(u"correlations")); !e.isEmpty())
            return problem(u"correlations", e);
        return {};
    }
    // A common correlation r gives eigenvalues 1 + (k - 1) r and 1 - r: positive for -1/(k - 1) < r < 1.
    const double lowest = -1.0 / (levelCount - 1);
    if (!std::isfinite(s.correlation) || s.correlation >= 1.0 || s.correlation <= lowest)
        return problem(u"correlation", u"%1: %2 is not a correlation %3 levels can share; expected a number above %4 and below 1"_s.arg(
                                           field(u"correlation"), num(s.correlation))
                                           .arg(levelCount)
                                           .arg(shortNum(lowest)));
    return {};
}

} // namespace

Eigen::MatrixXd withinCovariance(const PowerSettings &s, int levelCount)
{
    Eigen::MatrixXd r = s.correlations;
    if (r.size() == 0) {
        r = Eigen::MatrixXd::Constant(levelCount, levelCount, s.correlation);
        r.diagonal().setOnes();
    }
    Eigen::VectorXd sd(levelCount);
    for (int i = 0; i < levelCount; ++i)
        sd[i] = s.perLevelSds() ? s.sds[size_t(i)] : s.sd;
    return sd.asDiagonal() * r * sd.asDiagonal();
}

SampleSize smallestSampleSize(const std::function<double(const std::vector<double> &)> &powerAt,
                              const std::vector<double> &ratios, double target, long long least)
{
    return searchSampleSize(powerAt, ratios, target, least);
}

QString unreachedNote(const SampleSize &size, double target, bool within)
{
    return unreachableNote(size, target, within);
}

Result<Eigen::MatrixXd> parseCorrelationMatrix(const QString &text, const QString &where)
{
    using R = Result<Eigen::MatrixXd>;
    static const QRegularExpression separators(u"[,;\\t ]+"_s);
    std::vector<std::vector<double>> rows;
    const QStringList lines = text.split(u'\n');
    for (qsizetype l = 0; l < lines.size(); ++l) {
        const QString line = lines[l].trimmed();
        if (line.isEmpty())
            continue;
        const QStringList items = line.split(separators, Qt::SkipEmptyParts);
        std::vector<double> row;
        for (qsizetype i = 0; i < items.size(); ++i) {
            const Result<Weight> w = parseWeight(items[i]);
            if (!w)
                return R::failure(u"%1, line %2, item %3: %4"_s.arg(where).arg(l + 1).arg(i + 1).arg(w.error()));
            row.push_back(w->value());
        }
        if (!rows.empty() && row.size() != rows.front().size())
            return R::failure(u"%1, line %2: %3 values, but the first row has %4; give a square matrix, one row per line"_s.arg(where)
                                  .arg(l + 1)
                                  .arg(row.size())
                                  .arg(rows.front().size()));
        rows.push_back(std::move(row));
        if (rows.size() > size_t(kMaxLevels))
            return R::failure(u"%1: more than %2 rows; a factor has at most %2 levels"_s.arg(where).arg(kMaxLevels));
    }
    if (rows.empty())
        return R::failure(u"%1: no values; expected a correlation matrix, one row per line"_s.arg(where));
    if (rows.size() != rows.front().size())
        return R::failure(u"%1: %2 rows of %3 values; a correlation matrix is square"_s.arg(where).arg(rows.size()).arg(rows.front().size()));
    Eigen::MatrixXd m(Eigen::Index(rows.size()), Eigen::Index(rows.size()));
    for (size_t i = 0; i < rows.size(); ++i)
        for (size_t j = 0; j < rows.size(); ++j)
            m(Eigen::Index(i), Eigen::Index(j)) = rows[i][j];
    return R(std::move(m));
}

Problem validatePowerSettings(const PowerSettings &s, int levelCount, const QString &fieldPrefix)
{
    const std::function<QString(const char16_t *)> field = [&](const char16_t *name) { return fieldPrefix + QString::fromUtf16(name); };
    // A list of one value per level, each finite (and above 0 when positive is set).
    const auto levelList = [&](const std::vector<double> &values, const char16_t *key, bool positive, const QString &what) {
        QString e = checkCount(values, levelCount, field(key));
        if (e.isEmpty())
            e = checkValues(values, field(key), positive, what);
        return e.isEmpty() ? Problem{} : Problem{e, QString::fromUtf16(key)};
    };
    const auto problem = [](const char16_t *key, QString message) { return Problem{std::move(message), QString::fromUtf16(key)}; };
    if (levelCount < kMinLevels)
        return problem(u"levels", u"levels: power needs at least %1 levels, got %2"_s.arg(kMinLevels).arg(levelCount));
    if (!adjustsPower(s.adjustment))
        return problem(u"adjust", u"%1: %2 needs the observed p-values; plan with %3"_s.arg(field(u"adjust"), adjustmentTitle(s.adjustment), adjustmentIdList(true)));
    if (Problem p = levelList(s.means, u"means", false, {}); !p.isEmpty())
        return p;
    if (s.perLevelSds()) {
        if (Problem p = levelList(s.sds, u"sds", true, u"standard deviation"_s); !p.isEmpty())
            return p;
    } else if (!positiveFinite(s.sd)) {
        return problem(u"sd", u"%1: %2 is not a positive standard deviation; the SD must be above 0"_s.arg(field(u"sd"), num(s.sd)));
    } else if (QString e = checkValues({s.sd}, field(u"sd"), true, u"standard deviation"_s); !e.isEmpty()) {
        return problem(u"sd", e);
    }
    if (QString e = checkSpread(s, field(u"means")); !e.isEmpty())
        return problem(u"means", e);
    if (Problem p = checkWithin(s, levelCount, field); !p.isEmpty())
        return p;
    if (!s.n.empty()) {
        if (!s.ratios.empty())
            return problem(u"n", u"%1 and %2: give planned sizes per level, or ratios with a total, not both"_s.arg(field(u"n"), field(u"ratios")));
        if (Problem p = levelList(s.n, u"n", true, u"group size"_s); !p.isEmpty())
            return p;
        for (size_t i = 0; i < s.n.size(); ++i)
            if (s.n[i] < 2.0)
                return problem(u"n", u"%1, item %2: %3 per level is too few; every level needs at least 2"_s.arg(field(u"n")).arg(i + 1).arg(num(s.n[i])));
    } else {
        if (!s.ratios.empty())
            if (Problem p = levelList(s.ratios, u"ratios", true, u"ratio"_s); !p.isEmpty())
                return p;
        if (!positiveFinite(s.total))
            return problem(u"total", u"%1: give the total N (above 0) with the ratios, or planned sizes per level"_s.arg(field(u"total")));
        const std::vector<double> n = plannedSizes(s, levelCount);
        for (size_t i = 0; i < n.size(); ++i)
            if (n[i] < 2.0)
                return problem(u"total", u"%1: %2 leaves level %3 with %4; every level needs at least 2"_s.arg(field(u"total"), num(s.total)).arg(i + 1).arg(shortNum(n[i])));
    }
    if (!(s.alpha > 0.0 && s.alpha < 1.0))
        return problem(u"alpha", u"%1: %2 is not between 0 and 1 (both excluded)"_s.arg(field(u"alpha"), num(s.alpha)));
    if (!(s.target > 0.0 && s.target < 1.0))
        return problem(u"target", u"%1: %2 is not between 0 and 1 (both excluded)"_s.arg(field(u"target"), num(s.target)));
    if (s.target <= s.alpha)
        return problem(u"target", u"%1: %2 is not above alpha (%3); a target power must exceed alpha"_s.arg(field(u"target"), num(s.target), num(s.alpha)));
    return {};
}

std::vector<double> plannedSizes(const PowerSettings &s, int levelCount)
{
    if (!s.n.empty())
        return s.n;
    if (s.within())
        return std::vector<double>(size_t(levelCount), s.total);
    std::vector<double> r = s.ratios.empty() ? std::vector<double>(size_t(levelCount), 1.0) : s.ratios;
    const double sum = std::accumulate(r.begin(), r.end(), 0.0);
    for (double &v : r)
        v = s.total * v / sum;
    return r;
}

std::vector<double> allocationRatios(const PowerSettings &s, int levelCount)
{
    if (!s.ratios.empty())
        return s.ratios;
    if (!s.n.empty())
        return s.n;
    return std::vector<double>(size_t(levelCount), 1.0);
}

std::vector<long long> groupSizesFor(long long smallest, const std::vector<double> &ratios)
{
    const double least = *std::min_element(ratios.begin(), ratios.end());
    std::vector<long long> out;
    out.reserve(ratios.size());
    for (double r : ratios) {
        // The relative tolerance keeps 3 * (1/3) / (1/3) from rounding up to 4.
        const double exact = double(smallest) * (r / least);
        // Ratios far apart (planned n of 1e100 and 1e10) would overflow the integer: such a group
        // is as large as the search goes, and its power is computed at that size.
        const double size = std::min(std::ceil(exact * (1.0 - 1e-12)), double(kMaxGroupSize));
        out.push_back(std::max(smallest, static_cast<long long>(size)));
    }
    return out;
}

double perTestAlpha(double alpha, Adjustment adjustment, int tests)
{
    if (tests <= 1)
        return alpha;
    switch (adjustment) {
    case Adjustment::None:
        return alpha;
    case Adjustment::Bonferroni:
        return alpha / tests;
    case Adjustment::Sidak:
        return -std::expm1(std::log1p(-alpha) / tests);
    case Adjustment::Holm: // refused by validatePowerSettings; its first step is Bonferroni's
        return alpha / tests;
    }
    return alpha;
}

namespace {

// The boundary to Boost.Math. The policy above turns its errors into NaN, but some of its
// internal steps use the default policy and throw (non_central_beta truncates lambda / 2 to an
// int: a noncentrality above about 4e9 throws a rounding_error). No library error may end the
// process: whatever escapes becomes NaN, which callers report as "could not be evaluated".
template<typename F>
double evaluated(F &&f) noexcept
{
    try {
        return f();
    } catch (...) {
        return kNaN;
    }
}

} // namespace

double tTestPower(double noncentrality, double df, double alpha, bool oneSided)
{
    if (!(df > 0.0) || !(alpha > 0.0 && alpha < 1.0) || !std::isfinite(noncentrality))
        return kNaN;
    return evaluated([&] {
        const bm::students_t_distribution<double, Policy> central(df);
        const double critical = bm::quantile(bm::complement(central, oneSided ? alpha : alpha / 2.0));
        if (noncentrality == 0.0) {
            // The central case: the test's own size, alpha (up to rounding).
            const double upper = bm::cdf(bm::complement(central, critical));
            return oneSided ? upper : 2.0 * upper;
        }
        const bm::non_central_t_distribution<double, Policy> shifted(df, noncentrality);
        const double upper = bm::cdf(bm::complement(shifted, critical));
        if (oneSided)
            return upper;
        return upper + bm::cdf(shifted, -critical);
    });
}

double fTestPower(double lambda, double df1, double df2, double alpha)
{
    if (!(df1 > 0.0) || !(df2 > 0.0) || !(alpha > 0.0 && alpha < 1.0) || !(lambda >= 0.0) || !std::isfinite(lambda))
        return kNaN;
    return evaluated([&] {
        const bm::fisher_f_distribution<double, Policy> central(df1, df2);
        const double critical = bm::quantile(bm::complement(central, alpha));
        if (lambda == 0.0)
            return bm::cdf(bm::complement(central, critical));
        const bm::non_central_f_distribution<double, Policy> shifted(df1, df2, lambda);
        return bm::cdf(bm::complement(shifted, critical));
    });
}

namespace {

// Validation shared by computePower and powerCurve.
Problem checkRows(const Eigen::MatrixXd &rows, const PowerSettings &s)
{
    if (Problem p = validatePowerSettings(s, int(rows.cols())); !p.isEmpty())
        return p;
    for (Eigen::Index r = 0; r < rows.rows(); ++r) {
        if (!rows.row(r).allFinite())
            return Problem{u"contrast %1: a weight is not a finite number"_s.arg(r + 1), u"contrasts"_s};
        if ((rows.row(r).array() == 0.0).all())
            return Problem{u"contrast %1: every weight is 0, so it tests nothing"_s.arg(r + 1), u"contrasts"_s};
    }
    return {};
}

// Why a power is shown as '-': the inputs that the distribution could not be evaluated at.
QString unevaluatedNote(const QString &distribution, double noncentrality, double df, double alpha)
{
    return u"the power at the planned sizes could not be evaluated (noncentral %1 with noncentrality %2, df %3, "
           u"alpha %4 are beyond what it can be computed for); it is shown as '-' and is not reliable"_s
        .arg(distribution, shortNum(noncentrality), shortNum(df), shortNum(alpha));
}

void describeContrast(ContrastPower &c, const PowerSettings &s, double target)
{
    const double sum = std::accumulate(c.weights.begin(), c.weights.end(), 0.0);
    double sumAbs = 0.0;
    for (double w : c.weights)
        sumAbs += std::abs(w);
    if (std::abs(sum) > 1e-12 * sumAbs)
        c.notes << u"its weights sum to %1, not 0: it tests a level of the means, not only their differences, "
                   u"so its power depends on where the means lie"_s.arg(shortNum(sum));
    if (std::isnan(c.power))
        c.notes << unevaluatedNote(u"t"_s, c.noncentrality, c.df, c.alpha);
    if (c.zeroEstimate) {
        c.notes << u"the expected estimate is 0: power equals alpha (%1) at every n, and no sample size reaches "
                   u"the target"_s.arg(shortNum(c.alpha));
        return;
    }
    if (s.oneSided && c.estimate < 0.0) {
        c.notes << u"the expected estimate is negative but the one-sided test looks for a positive one, so power "
                   u"stays below alpha at every n; reverse the contrast's signs if a negative difference is expected"_s;
        return;
    }
    if (!c.required.reachable)
        c.notes << unreachableNote(c.required, target, s.within());
}

// The first contrast with a sample size, planned again as separate equal groups with the same
// means and SDs (for withinExplanation).
void compareWithGroups(PowerReport &report, const Eigen::MatrixXd &rows, const PowerSettings &settings)
{
    PowerSettings groups = settings;
    groups.measure = Measure::Between;
    groups.correlation = 0.0;
    groups.correlations.resize(0, 0);
    groups.n.assign(size_t(report.levelCount), std::max(2.0, report.plannedTotal));
    groups.total = 0.0;
    const Design design(groups, report.levelCount);
    for (size_t r = 0; r < report.contrasts.size(); ++r) {
        if (!report.contrasts[r].required.reachable)
            continue;
        const Eigen::VectorXd h = rows.row(Eigen::Index(r)).transpose();
        const double alpha = report.contrasts[r].alpha;
        report.comparedContrast = int(r);
        report.asGroups = searchSampleSize([&](const std::vector<double> &nn) { return contrastAt(design, h, nn, alpha).power; },
                                           std::vector<double>(size_t(report.levelCount), 1.0), settings.target);
        return;
    }
}

} // namespace

Result<PowerReport> computePower(const Eigen::MatrixXd &contrastRows, const QStringList &names,
                                 const PowerSettings &settings)
{
    using R = Result<PowerReport>;
    if (Problem problem = checkRows(contrastRows, settings); !problem.isEmpty())
        return R::failure(std::move(problem));

    const int k = int(contrastRows.cols());
    const int m = int(contrastRows.rows());
    const Design design(settings, k);
    const std::vector<double> n = plannedSizes(settings, k);
    const std::vector<double> ratios = searchRatios(settings, k);
    const bool within = settings.within();
    // Hotelling's test needs P - k + 1 >= 1 error df.
    const long long leastForOmnibus = within ? k : 2;

    PowerReport report;
    report.levelCount = k;
    report.within = within;
    if (within && settings.correlations.size() == 0)
        report.correlation = settings.correlation;
    report.plannedN = n;
    report.plannedTotal = within ? n.front() : std::accumulate(n.begin(), n.end(), 0.0);
    report.alpha = settings.alpha;
    report.perTestAlpha = perTestAlpha(settings.alpha, settings.adjustment, m);
    report.adjustment = settings.adjustment;
    report.oneSided = settings.oneSided;
    report.target = settings.target;
    report.welch = settings.perLevelSds() && !within;
    report.cautions = powerCautions(within);

    // Omnibus F-test, at the unadjusted alpha.
    OmnibusPower &o = report.omnibus;
    const OmnibusValues ov = omnibusAt(design, n, settings.alpha);
    o.hotelling = within;
    o.df1 = k - 1;
    o.df2 = ov.df2;
    o.effectSize = ov.effectSize;
    o.noncentrality = ov.noncentrality;
    o.alpha = settings.alpha;
    o.power = ov.power;
    o.sd = ov.sd;
    o.pooledFromLevelSds = settings.perLevelSds() && !within;
    const bool allEqual = ov.noncentrality == 0.0;
    if (!allEqual)
        o.required = searchSampleSize([&](const std::vector<double> &nn) { return omnibusAt(design, nn, settings.alpha).power; },
                                      ratios, settings.target, leastForOmnibus);
    if (within && n.front() < k)
        o.notes << u"Hotelling's test needs at least as many participants as levels (%1); with %2 it cannot be computed"_s.arg(k).arg(
            shortNum(n.front()));
    if (o.pooledFromLevelSds)
        o.notes << u"with per-level SDs the F-test's power uses their pooled SD (%1, weighted by n - 1); the "
                   u"F-test assumes equal SDs, so this is an approximation"_s.arg(shortNum(o.sd));
    if (std::isnan(o.power))
        o.notes << unevaluatedNote(u"F"_s, o.noncentrality, o.df2, o.alpha);
    if (allEqual)
        o.notes << u"all expected means are equal: the F-test's power equals alpha at every n"_s;
    else if (!o.required.reachable)
        o.notes << unreachableNote(o.required, settings.target, within);

    for (int r = 0; r < m; ++r) {
        ContrastPower c;
        c.name = r < names.size() && !names[r].isEmpty() ? names[r] : u"contrast %1"_s.arg(r + 1);
        const Eigen::VectorXd h = contrastRows.row(r).transpose();
        c.weights.assign(h.data(), h.data() + h.size());
        c.alpha = report.perTestAlpha;
        c.welch = settings.perLevelSds() && !within;
        const ContrastValues v = contrastAt(design, h, n, c.alpha);
        c.estimate = v.estimate;
        c.se = v.se;
        c.df = v.df;
        c.noncentrality = v.noncentrality;
        c.power = v.power;
        c.zeroEstimate = v.estimate == 0.0;

        // Standardized contrast: weights rescaled so that each side sums to 1 (Kline 2013).
        double positive = 0.0;
        double negative = 0.0;
        double squares = 0.0;
        double weightedVar = 0.0;
        for (int i = 0; i < k; ++i) {
            (h[i] > 0 ? positive : negative) += std::abs(h[i]);
            squares += h[i] * h[i];
            weightedVar += h[i] * h[i] * design.sdOf(i) * design.sdOf(i);
        }
        const double sdRef = settings.perLevelSds() ? std::sqrt(weightedVar / squares) : settings.sd;
        c.effectSize = c.estimate / (std::max(positive, negative) * sdRef);

        const bool wrongDirection = settings.oneSided && c.estimate < 0.0; // power < alpha at every n
        if (!c.zeroEstimate && !wrongDirection)
            c.required = searchSampleSize([&](const std::vector<double> &nn) { return contrastAt(design, h, nn, c.alpha).power; },
                                          ratios, settings.target);
        c.fewerThanOmnibus = c.required.reachable && o.required.reachable && c.required.total < o.required.total;
        describeContrast(c, settings, settings.target);
        if (c.fewerThanOmnibus)
            c.notes << u"reaches the target with %1 = %2, fewer than the omnibus %3 needs (%1 = %4)"_s
                           .arg(within ? u"P"_s : u"N"_s)
                           .arg(c.required.total)
                           .arg(within ? u"Hotelling test"_s : u"F-test"_s)
                           .arg(o.required.total);
        report.contrasts.push_back(std::move(c));
    }

    if (within)
        compareWithGroups(report, contrastRows, settings);

    // Notes about the inputs as a whole.
    if (allEqual)
        report.notes << u"all expected means are equal, so every contrast whose weights sum to 0 has an expected "
                        u"estimate of 0 and power equal to alpha; enter the means you expect"_s;
    if (within)
        report.notes << u"within participants: each contrast is tested on the participants' own contrast scores (one-sample t "
                        u"with P - 1 df, its own error term, no sphericity assumed); the omnibus test is Hotelling's T\u00b2 on "
                        u"the %1 differences of the levels (F with %1 and P - %1 df)"_s.arg(k - 1);
    if (within && settings.correlations.size() == 0)
        report.notes << u"the covariance comes from one correlation (%1) between every two levels and the SDs"_s.arg(
            shortNum(settings.correlation));
    if (settings.perLevelSds() && !within)
        report.notes << u"per-level SDs: the contrasts use Welch\u2013Satterthwaite degrees of freedom (Welch 1947; "
                        u"Satterthwaite 1946) with the noncentral t, the usual approximation for unequal SDs"_s;
    if (settings.oneSided)
        report.notes << u"one-sided tests look for a positive estimate (psi > 0), in the direction each contrast is written"_s;
    if (std::any_of(n.begin(), n.end(), [](double v) { return v != std::floor(v); }))
        report.notes << u"the planned sizes from the ratios and total are not whole numbers; power uses them as "
                        u"they are, round them to plan real groups"_s;
    if (m > 1) {
        if (settings.adjustment == Adjustment::None)
            report.notes << u"%1 contrasts are tested without adjustment: the chance of at least one false positive "
                            u"can reach %2"_s.arg(m).arg(shortNum(1.0 - std::pow(1.0 - settings.alpha, m)));
        else
            report.notes << u"%1 adjustment across %2 contrasts: each is tested at alpha = %3"_s
                                .arg(adjustmentTitle(settings.adjustment))
                                .arg(m)
                                .arg(shortNum(report.perTestAlpha));
        report.notes << u"Holm's step-down procedure (Holm 1979) needs the observed p-values and is applied in the "
                        u"data check; it rejects at least what Bonferroni rejects, so the Bonferroni power is a lower "
                        u"bound for it"_s;
    }
    return R(std::move(report));
}

Result<std::vector<double>> powerCurve(const Eigen::MatrixXd &contrastRows, int contrast,
                                       const PowerSettings &settings,
                                       const std::vector<long long> &smallestGroupSizes)
{
    using R = Result<std::vector<double>>;
    if (Problem problem = checkRows(contrastRows, settings); !problem.isEmpty())
        return R::failure(std::move(problem));
    if (contrast < -1 || contrast >= contrastRows.rows())
        return R::failure(u"contrast: %1 is not a contrast index; expected -1 (omnibus) to %2"_s.arg(contrast).arg(contrastRows.rows() - 1));
    const int k = int(contrastRows.cols());
    const Design design(settings, k);
    const std::vector<double> ratios = searchRatios(settings, k);
    const double alpha = perTestAlpha(settings.alpha, settings.adjustment, int(contrastRows.rows()));
    std::vector<double> out;
    out.reserve(smallestGroupSizes.size());
    for (size_t i = 0; i < smallestGroupSizes.size(); ++i) {
        const long long t = smallestGroupSizes[i];
        if (t < 2)
            return R::failure(u"sizes, item %1: %2 per level is too few; every level needs at least 2"_s.arg(i + 1).arg(t));
        const std::vector<double> n = toDouble(groupSizesFor(t, ratios));
        if (contrast < 0)
            out.push_back(omnibusAt(design, n, settings.alpha).power);
        else
            out.push_back(contrastAt(design, contrastRows.row(contrast).transpose(), n, alpha).power);
    }
    return R(std::move(out));
}

std::vector<long long> powerCurveSizes(long long upTo, int points)
{
    upTo = std::max(upTo, 3LL);
    points = std::max(points, 2);
    std::vector<long long> out;
    for (int i = 0; i < points; ++i) {
        const long long v = 2 + std::llround(double(upTo - 2) * i / (points - 1));
        if (out.empty() || v != out.back())
            out.push_back(v);
    }
    return out;
}

Result<ContrastRows> contrastRowsOf(const Analysis &analysis)
{
    using R = Result<ContrastRows>;
    if (analysis.hypothesisValues.size() == 0)
        return R::failure(u"scheme: the coding is rank deficient (rank %1 of %2 coefficients), so its coefficients "
                          u"have no unique hypotheses to plan power for"_s.arg(analysis.rank).arg(analysis.coefficientCount));
    const Eigen::Index skip = analysis.intercept ? 1 : 0;
    ContrastRows out;
    out.rows = analysis.hypothesisValues.bottomRows(analysis.hypothesisValues.rows() - skip);
    out.names = analysis.columnNames;
    return R(std::move(out));
}

std::vector<double> meansFromDifferences(const std::vector<double> &differences, int baseline)
{
    std::vector<double> out = differences;
    out.insert(out.begin() + baseline, 0.0);
    return out;
}

Result<std::vector<double>> parseNumberList(const QString &text, const QString &where)
{
    using R = Result<std::vector<double>>;
    const QStringList items = splitList(text);
    if (items.isEmpty())
        return R::failure(u"%1: no values; expected numbers separated by commas"_s.arg(where));
    std::vector<double> out;
    for (qsizetype i = 0; i < items.size(); ++i) {
        const Result<Weight> w = parseWeight(items[i]);
        if (!w)
            return R::failure(u"%1, item %2: %3"_s.arg(where).arg(i + 1).arg(w.error()));
        out.push_back(w->value());
    }
    return R(std::move(out));
}

QStringList powerCautions(bool within)
{
    QStringList out{
        u"Power rests on the expected means and SDs entered here: if the true differences are smaller or the "
        u"spread larger, the real power is lower than shown."_s,
        u"Contrasts are planned before the data are seen; comparisons picked after looking at the means do not "
        u"have the error rates assumed here."_s,
        u"Testing several contrasts raises the chance of at least one false positive; choose an adjustment "
        u"(Bonferroni or \u0160id\u00e1k here, Holm in the data check) when several will be tested."_s,
        u"These figures support the analyst's judgement and a statistician's review; they do not replace them."_s,
    };
    if (within)
        out.insert(1, u"Within participants the power rests on the correlation between a participant's values, which is "
                      u"usually a guess: if the true correlation is lower than entered, more participants are needed than "
                      u"shown; try a few values, or take it from earlier data."_s);
    return out;
}

QString withinExplanation(const PowerReport &r)
{
    if (!r.within || r.comparedContrast < 0 || !r.asGroups.reachable)
        return {};
    const ContrastPower &c = r.contrasts[size_t(r.comparedContrast)];
    return u"Within participants each contrast is tested on the participants' own contrast scores, which vary less the more a "
           u"participant's values go together: '%1' needs %2 participants here, while as separate groups with the same means "
           u"and SDs it would need %3 per group (%4 people)."_s.arg(c.name)
        .arg(c.required.total)
        .arg(r.asGroups.perLevel.front())
        .arg(r.asGroups.total);
}

QJsonObject powerReportToJson(const PowerReport &report)
{
    QJsonObject root;
    root[u"levels"_s] = report.levelCount;
    root[u"planned_n"_s] = jsonNumbers(report.plannedN);
    root[u"planned_total"_s] = jsonNumber(report.plannedTotal);
    root[u"alpha"_s] = report.alpha;
    root[u"alpha_per_test"_s] = report.perTestAlpha;
    root[u"adjustment"_s] = adjustmentId(report.adjustment);
    root[u"sided"_s] = report.oneSided ? u"one"_s : u"two"_s;
    root[u"target"_s] = report.target;
    root[u"welch"_s] = report.welch;
    root[u"measured"_s] = measureId(report.within ? Measure::Within : Measure::Between);
    root[u"correlation"_s] = report.correlation ? QJsonValue(*report.correlation) : QJsonValue(QJsonValue::Null);
    const bool perParticipant = report.within && report.groups.isEmpty(); // one number of participants
    if (!report.groups.isEmpty())
        root[u"groups"_s] = QJsonArray::fromStringList(report.groups);

    QJsonArray contrasts;
    for (const ContrastPower &c : report.contrasts) {
        QJsonObject o;
        o[u"name"_s] = c.name;
        o[u"weights"_s] = jsonNumbers(c.weights);
        putNumbers(o, {{u"estimate", c.estimate}, {u"se", c.se}, {u"effect_size", c.effectSize},
                       {u"noncentrality", c.noncentrality}, {u"df", c.df}, {u"alpha", c.alpha}, {u"power", c.power}});
        o[u"welch"_s] = c.welch;
        putSampleSize(o, c.required, perParticipant);
        if (!c.part.isEmpty())
            o[u"part"_s] = c.part;
        o[u"fewer_than_omnibus"_s] = c.fewerThanOmnibus;
        o[u"notes"_s] = QJsonArray::fromStringList(c.notes);
        contrasts.append(o);
    }
    root[u"contrasts"_s] = contrasts;

    const OmnibusPower &om = report.omnibus;
    QJsonObject o;
    o[u"test"_s] = om.hotelling ? u"hotelling"_s : u"anova"_s;
    o[u"df1"_s] = om.df1;
    putNumbers(o, {{u"df2", om.df2}, {u"effect_size", om.effectSize}, {u"noncentrality", om.noncentrality},
                   {u"alpha", om.alpha}, {u"power", om.power}, {u"sd", om.sd}});
    o[u"pooled_from_level_sds"_s] = om.pooledFromLevelSds;
    putSampleSize(o, om.required, perParticipant);
    o[u"notes"_s] = QJsonArray::fromStringList(om.notes);
    if (!report.terms.empty()) {
        // A mixed design: the data check's multivariate tests (its fit's omnibus.tests), all within cells first.
        QJsonArray tests;
        for (const TermPower &t : report.terms) {
            QJsonObject to{{u"name"_s, t.name}, {u"hypothesis"_s, t.hypothesis}, {u"test"_s, u"wilks"_s}, {u"df1"_s, t.df1},
                           {u"exact"_s, t.exact}};
            putNumbers(to, {{u"df2", t.df2}, {u"noncentrality", t.noncentrality}, {u"alpha", report.alpha}, {u"power", t.power}});
            putSampleSize(to, t.required, false);
            to[u"notes"_s] = QJsonArray::fromStringList(t.notes);
            tests.append(to);
        }
        o[u"tests"_s] = tests;
    }
    root[u"omnibus"_s] = o;

    root[u"notes"_s] = QJsonArray::fromStringList(report.notes);
    root[u"cautions"_s] = QJsonArray::fromStringList(report.cautions);
    return root;
}

} // namespace cb
