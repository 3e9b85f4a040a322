#include "core/data/DataFit.h"

#include "core/analysis/Analysis.h"
#include "core/base/NumberText.h"
#include "core/model/Scheme.h"

#include <Eigen/Cholesky>

#include <QJsonArray>

#include <boost/math/distributions/fisher_f.hpp>
#include <boost/math/distributions/students_t.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Errors become NaN results instead of exceptions.
using QuietPolicy = boost::math::policies::policy<
    boost::math::policies::domain_error<boost::math::policies::ignore_error>,
    boost::math::policies::pole_error<boost::math::policies::ignore_error>,
    boost::math::policies::overflow_error<boost::math::policies::ignore_error>,
    boost::math::policies::evaluation_error<boost::math::policies::ignore_error>>;

// Two-sided p-value of a t statistic.
double tTwoSidedP(double t, double df)
{
    if (std::isnan(t) || !(df > 0))
        return kNaN;
    if (std::isinf(t))
        return 0.0;
    const boost::math::students_t_distribution<double, QuietPolicy> dist(df);
    return std::min(1.0, 2.0 * boost::math::cdf(boost::math::complement(dist, std::fabs(t))));
}

double tQuantileUpper(double tailArea, double df)
{
    if (!(df > 0))
        return kNaN;
    const boost::math::students_t_distribution<double, QuietPolicy> dist(df);
    return boost::math::quantile(boost::math::complement(dist, tailArea));
}

double fUpperP(double f, double df1, double df2)
{
    if (std::isnan(f) || !(df1 > 0) || !(df2 > 0))
        return kNaN;
    if (std::isinf(f))
        return 0.0;
    const boost::math::fisher_f_distribution<double, QuietPolicy> dist(df1, df2);
    return boost::math::cdf(boost::math::complement(dist, std::max(0.0, f)));
}

QString quotedList(const QStringList &names)
{
    QStringList q;
    for (const QString &n : names)
        q << quoted(n);
    return q.join(u", "_s);
}

} // namespace

double fUpperTailP(double f, double df1, double df2)
{
    return fUpperP(f, df1, df2);
}

// ---------------------------------------------------------------------------
// Multiplicity

std::vector<double> adjustPValues(const std::vector<double> &p, Adjustment method)
{
    std::vector<double> out(p.size(), kNaN);
    std::vector<size_t> family;
    for (size_t i = 0; i < p.size(); ++i)
        if (!std::isnan(p[i]))
            family.push_back(i);
    const double m = double(family.size());
    switch (method) {
    case Adjustment::None:
        for (size_t i : family)
            out[i] = p[i];
        break;
    case Adjustment::Bonferroni:
        for (size_t i : family)
            out[i] = std::min(1.0, m * p[i]);
        break;
    case Adjustment::Sidak:
        // 1 - (1 - p)^m, written to keep precision for small p.
        for (size_t i : family)
            out[i] = p[i] >= 1.0 ? 1.0 : std::min(1.0, -std::expm1(m * std::log1p(-p[i])));
        break;
    case Adjustment::Holm: {
        std::vector<size_t> order = family;
        std::stable_sort(order.begin(), order.end(), [&p](size_t a, size_t b) { return p[a] < p[b]; });
        double running = 0.0;
        for (size_t r = 0; r < order.size(); ++r) {
            running = std::max(running, std::min(1.0, (m - double(r)) * p[order[r]]));
            out[order[r]] = running;
        }
        break;
    }
    }
    return out;
}

// ---------------------------------------------------------------------------
// Level matching

Result<LevelMapping> parseLevelMapping(const QString &text)
{
    LevelMapping mapping;
    const QStringList items = splitList(text);
    for (const QString &item : items) {
        const qsizetype eq = item.indexOf(u'=');
        const QString from = item.left(eq).trimmed();
        const QString to = item.mid(eq + 1).trimmed();
        if (eq < 0 || from.isEmpty() || to.isEmpty())
            return Result<LevelMapping>::failure(
                u"level mapping: %1 should read 'data name=scheme level'"_s.arg(quoted(item)));
        if (mapping.contains(from))
            return Result<LevelMapping>::failure(u"level mapping: %1 is mapped twice"_s.arg(quoted(from)));
        mapping.insert(from, to);
    }
    return mapping;
}

Result<MatchedLevels> matchLevels(const QStringList &schemeLevels, const std::vector<LevelStats> &data,
                                  const LevelMapping &mapping)
{
    QStringList dataNames;
    for (const LevelStats &l : data)
        dataNames << l.name;
    for (auto it = mapping.cbegin(); it != mapping.cend(); ++it) {
        if (!dataNames.contains(it.key()))
            return Result<MatchedLevels>::failure(u"level mapping: %1 is not a level in the data (the data have %2)"_s.arg(
                quoted(it.key()), quotedList(dataNames)));
        if (!schemeLevels.contains(it.value()))
            return Result<MatchedLevels>::failure(
                u"level mapping: %1 is not a level of the scheme (the scheme has %2)"_s.arg(quoted(it.value()),
                                                                                           quotedList(schemeLevels)));
    }
    MatchedLevels out;
    out.levels = schemeLevels;
    out.stats.assign(size_t(schemeLevels.size()), RunningStats{});
    out.sources.assign(size_t(schemeLevels.size()), QStringList{});
    QStringList dataOnly;
    for (const LevelStats &l : data) {
        const QString target = mapping.value(l.name, l.name);
        const qsizetype i = schemeLevels.indexOf(target);
        if (i < 0) {
            dataOnly << l.name;
            continue;
        }
        out.stats[size_t(i)].merge(l.stats);
        out.sources[size_t(i)] << l.name;
    }
    QStringList schemeOnly;
    QStringList weightless;
    for (qsizetype i = 0; i < schemeLevels.size(); ++i) {
        if (out.sources[size_t(i)].isEmpty())
            schemeOnly << schemeLevels[i];
        else if (out.stats[size_t(i)].n <= 0.0)
            weightless << schemeLevels[i];
    }
    if (dataOnly.isEmpty() && schemeOnly.isEmpty() && weightless.isEmpty())
        return out;
    QStringList parts;
    if (!dataOnly.isEmpty())
        parts << u"in the data but not in the scheme: %1"_s.arg(quotedList(dataOnly));
    if (!schemeOnly.isEmpty())
        parts << u"in the scheme but not in the data: %1"_s.arg(quotedList(schemeOnly));
    if (!weightless.isEmpty())
        parts << u"in the data only with weight 0: %1"_s.arg(quotedList(weightless));
    QStringList hints;
    for (const QString &d : std::as_const(dataOnly))
        for (const QString &s : std::as_const(schemeOnly))
            if (d.compare(s, Qt::CaseInsensitive) == 0 || d.trimmed() == s.trimmed())
                hints << u"%1 looks like %2"_s.arg(quoted(d), quoted(s));
    QString message = u"the levels do not match; "_s + parts.join(u"; "_s)
        + u". Rename them, or map data names to scheme levels, before fitting"_s;
    if (!hints.isEmpty())
        message += u" ("_s + hints.join(u", "_s) + u")"_s;
    return Result<MatchedLevels>::failure(message);
}

Result<MatchedLevels> matchLevels(const QStringList &schemeLevels, const DataSummary &data, const LevelMapping &mapping)
{
    auto matched = matchLevels(schemeLevels, data.levels, mapping);
    if (!matched && data.skippedRows > 0)
        return Result<MatchedLevels>::failure(matched.error() + u". "_s + data.skippedReport());
    return matched;
}

// ---------------------------------------------------------------------------
// The fit

Result<FitResult> fitLevels(const MatchedLevels &levels, const Eigen::MatrixXd &X, const Eigen::MatrixXd &H,
                            const QStringList &names, bool intercept, const FitOptions &options)
{
    using Fail = Result<FitResult>;
    const Eigen::Index k = Eigen::Index(levels.stats.size());
    const Eigen::Index p = X.cols();
    if (k < 1 || X.rows() != k)
        return Fail::failure(u"design: %1 rows for %2 levels; expected one row per level"_s.arg(X.rows()).arg(k));
    if (p < 1)
        return Fail::failure(u"design: no coefficients to estimate"_s);
    if (names.size() != p)
        return Fail::failure(u"design: %1 coefficient names for %2 columns"_s.arg(names.size()).arg(p));
    if (H.size() != 0 && (H.rows() != p || H.cols() != k))
        return Fail::failure(u"hypotheses: a %1 x %2 matrix; expected %3 x %4 (one row per coefficient)"_s.arg(H.rows())
                                 .arg(H.cols())
                                 .arg(p)
                                 .arg(k));
    if (!(options.alpha > 0.0 && options.alpha < 1.0))
        return Fail::failure(u"alpha: %1; expected a number between 0 and 1"_s.arg(options.alpha));
    if (!X.allFinite())
        return Fail::failure(u"design: the coding has a value that is not a finite number"_s);

    Eigen::VectorXd n(k), ybar(k);
    double within = 0.0;
    for (Eigen::Index j = 0; j < k; ++j) {
        const RunningStats &s = levels.stats[size_t(j)];
        if (!(s.n > 0.0))
            return Fail::failure(u"level %1 has no observations; every level needs data"_s.arg(quoted(levels.levels.value(j))));
        // Beyond this the squares and differences of the means overflow a double.
        constexpr double kMaxResponse = 1e150;
        if (!(std::abs(s.mean) <= kMaxResponse))
            return Fail::failure(u"level %1: the mean response is %2, too large to fit (its square overflows); rescale the response"_s
                                     .arg(quoted(levels.levels.value(j)), QString::number(s.mean, 'g', 4)));
        n[j] = s.n;
        ybar[j] = s.mean;
        within += s.m2;
    }
    if (!std::isfinite(within))
        return Fail::failure(u"the response varies too much to fit: its sum of squares within levels overflows; rescale the response"_s);
    const double totalN = n.sum();
    if (totalN < double(p))
        return Fail::failure(u"%1 observations for %2 coefficients; need at least as many observations as coefficients"_s
                                 .arg(totalN)
                                 .arg(p));

    // Weighted least squares on the k level means with weights n: with A = N^1/2 X,
    // b = (A'A)^-1 A' N^1/2 ybar, through a QR decomposition of A.
    const Eigen::VectorXd sqrtN = n.array().sqrt();
    const Eigen::MatrixXd A = sqrtN.asDiagonal() * X;
    Eigen::ColPivHouseholderQR<Eigen::MatrixXd> pivoted(A);
    pivoted.setThreshold(1e-10);
    if (pivoted.rank() < p)
        return Fail::failure(u"the coding columns are linearly dependent (rank %1 for %2 coefficients); "
                             "no unique fit exists"_s.arg(pivoted.rank())
                                 .arg(p));
    const Eigen::HouseholderQR<Eigen::MatrixXd> qr(A);
    const Eigen::MatrixXd R = qr.matrixQR().topRows(p).triangularView<Eigen::Upper>();
    const Eigen::MatrixXd Rinv = R.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(p, p));
    const Eigen::MatrixXd xtnxInv = Rinv * Rinv.transpose();
    const Eigen::VectorXd qty = qr.householderQ().transpose() * (sqrtN.array() * ybar.array()).matrix();
    const Eigen::VectorXd b = Rinv * qty.head(p);

    FitResult fit;
    fit.levels = levels.levels;
    fit.levelStats = levels.stats;
    fit.intercept = intercept;
    fit.alpha = options.alpha;
    fit.adjust = options.adjust;
    fit.totalN = totalN;
    fit.fittedMeans = X * b;
    const double between = (n.array() * (ybar - fit.fittedMeans).array().square()).sum();
    fit.rss = within + between;
    fit.df = totalN - double(p);
    // No residual variation (every observation equals its fitted mean, to rounding): the
    // standard errors are 0 and every test would claim certainty. They are left undefined.
    const double dataScale = within + (n.array() * ybar.array().square()).sum();
    const bool noResidual = fit.rss <= 1e-26 * dataScale;
    if (noResidual)
        fit.rss = 0.0;
    const double sigma2 = fit.df > 0 && !noResidual ? fit.rss / fit.df : kNaN;
    fit.sigma = std::sqrt(sigma2);
    fit.covariance = sigma2 * xtnxInv;
    fit.observedHypotheses = xtnxInv * X.transpose() * n.asDiagonal();

    // Does the column space hold the constant? Then F compares with the common-mean model.
    const Eigen::VectorXd ones = Eigen::VectorXd::Ones(k);
    const Eigen::VectorXd onesFit = X * X.colPivHouseholderQr().solve(ones);
    fit.centred = (onesFit - ones).norm() <= 1e-9 * std::sqrt(double(k));
    const double grand = n.dot(ybar) / totalN;
    if (fit.centred) {
        fit.tss = within + (n.array() * (ybar.array() - grand).square()).sum();
        fit.fDf1 = double(p - 1);
        fit.omnibusHypothesis = u"all level means are equal"_s;
    } else {
        fit.tss = within + (n.array() * ybar.array().square()).sum();
        fit.fDf1 = double(p);
        fit.omnibusHypothesis = u"every coefficient is zero (the model has no common mean to compare with)"_s;
    }
    fit.fDf2 = fit.df;
    fit.rSquared = fit.tss > 0 ? 1.0 - fit.rss / fit.tss : kNaN;
    if (fit.fDf1 > 0 && fit.df > 0 && !noResidual) {
        const double model = std::max(0.0, fit.tss - fit.rss);
        fit.f = fit.rss > 0 ? (model / fit.fDf1) / sigma2 : (model > 0 ? std::numeric_limits<double>::infinity() : kNaN);
        fit.fP = fUpperP(fit.f, fit.fDf1, fit.fDf2);
    } else {
        fit.f = kNaN;
        fit.fP = kNaN;
    }

    const double tCrit = tQuantileUpper(options.alpha / 2.0, fit.df);
    std::vector<double> familyP(size_t(p), kNaN);
    for (Eigen::Index i = 0; i < p; ++i) {
        FitCoefficient c;
        c.name = names[i];
        c.estimate = b[i];
        c.se = std::sqrt(fit.covariance(i, i));
        c.t = c.se > 0 ? c.estimate / c.se : (c.estimate == 0 ? kNaN : std::copysign(INFINITY, c.estimate));
        if (std::isnan(c.se))
            c.t = kNaN;
        c.p = tTwoSidedP(c.t, fit.df);
        c.ciLow = c.estimate - tCrit * c.se;
        c.ciHigh = c.estimate + tCrit * c.se;
        c.inFamily = !(intercept && i == 0);
        if (c.inFamily)
            familyP[size_t(i)] = c.p;
        if (H.size() != 0) {
            c.hypothesisEstimate = H.row(i).dot(ybar);
            const double scale = (H.row(i).transpose().array().abs() * ybar.array().abs()).sum();
            c.agrees = std::fabs(c.hypothesisEstimate - c.estimate) <= 1e-9 * std::max(1.0, scale);
        } else {
            c.hypothesisEstimate = kNaN;
        }
        fit.hypothesesAgree = fit.hypothesesAgree && c.agrees;
        fit.coefficients.push_back(c);
    }
    const std::vector<double> adjusted = adjustPValues(familyP, options.adjust);
    for (size_t i = 0; i < adjusted.size(); ++i)
        fit.coefficients[i].pAdjusted = adjusted[i];

    if (noResidual && fit.df > 0)
        fit.notes << u"no residual variation: every observation equals its fitted level mean, so standard errors, "
                     "tests and intervals are undefined"_s;
    if (!(fit.df > 0))
        fit.notes << u"no residual degrees of freedom (N equals the number of coefficients): standard errors, "
                     "tests and intervals cannot be computed"_s;
    if (!fit.hypothesesAgree)
        fit.notes << u"some coefficients estimate a different comparison than their hypothesis states: the coding "
                     "has fewer columns than levels minus one, so what it estimates depends on the group sizes, and "
                     "the observed sizes differ from the planned ones"_s;
    if (!fit.centred)
        fit.notes << u"the coding does not span a common mean, so F tests that every coefficient is zero and the "
                     "share of variance explained is measured about 0"_s;
    return fit;
}

Result<FitResult> fitScheme(const Scheme &scheme, const DataSummary &data, const FitOptions &options,
                            const LevelMapping &mapping)
{
    const QString invalid = scheme.validate();
    if (!invalid.isEmpty())
        return Result<FitResult>::failure(u"scheme: "_s + invalid);
    auto matched = matchLevels(scheme.factor.levels, data, mapping);
    if (!matched)
        return Result<FitResult>::failure(matched.error());
    const Analysis analysis = analyze(scheme);
    if (!analysis.fullRank)
        return Result<FitResult>::failure(u"the coding columns are linearly dependent: %1; no unique fit exists"_s.arg(
            analysis.dependencies.join(u"; "_s)));
    auto fit = fitLevels(*matched, designRows(scheme), analysis.hypothesisValues, analysis.coefficientNames,
                         scheme.intercept, options);
    if (!fit)
        return fit;
    for (size_t i = 0; i < fit->coefficients.size(); ++i)
        fit->coefficients[i].hypothesis = analysis.hypothesisCombinations.value(qsizetype(i));
    if (scheme.factor.isWithin() && data.participantIndex < 0)
        fit->cautions << independentRowsCaution({scheme.factor.name});
    return fit;
}

QString independentRowsCaution(const QStringList &withinFactors)
{
    QStringList quoted;
    for (const QString &f : withinFactors)
        quoted << u"'%1'"_s.arg(f);
    return u"%1 %2 measured within participants, but the data were read without a participant column: every row is "
           u"taken as an independent observation, so the SEs, t, p and intervals ignore that a participant's values go "
           u"together and can be wrong in either direction; name the column that says whose each row is (the participant "
           u"column) for the by-participant analysis"_s.arg(quoted.join(u" and "_s), withinFactors.size() == 1 ? u"is"_s : u"are"_s);
}

// ---------------------------------------------------------------------------
// By participant

ParticipantCells participantCells(const Scheme &scheme, const DataSummary &data, const LevelMapping &mapping)
{
    const int k = scheme.levelCount();
    const int participants = int(data.participants.size());
    ParticipantCells out;
    out.means = Eigen::MatrixXd::Constant(participants, k, kNaN);
    out.firstLines.assign(size_t(participants), std::vector<qint64>(size_t(k), 0));
    auto matched = matchLevels(scheme.factor.levels, data, mapping);
    if (!matched)
        return out;
    // Data level -> scheme level.
    std::vector<int> levelOf(data.levels.size(), -1);
    for (int j = 0; j < k; ++j)
        for (const QString &source : matched->sources[size_t(j)])
            levelOf[size_t(data.levelIndex(source))] = j;
    for (int p = 0; p < participants; ++p) {
        std::vector<RunningStats> cells(static_cast<size_t>(k));
        for (size_t d = 0; d < data.levels.size(); ++d) {
            const int j = levelOf[d];
            if (j < 0 || data.participantCells[size_t(p)][d].n <= 0)
                continue;
            cells[size_t(j)].merge(data.participantCells[size_t(p)][d]);
            const qint64 line = size_t(p) < data.participantFirstLines.size() && d < data.participantFirstLines[size_t(p)].size()
                                    ? data.participantFirstLines[size_t(p)][d]
                                    : 0;
            qint64 &first = out.firstLines[size_t(p)][size_t(j)];
            if (line > 0 && (first == 0 || line < first))
                first = line;
        }
        for (int j = 0; j < k; ++j)
            if (cells[size_t(j)].n > 0)
                out.means(p, j) = cells[size_t(j)].mean;
    }
    return out;
}

Result<FitResult> fitParticipants(const Scheme &scheme, const DataSummary &data, const FitOptions &options, const LevelMapping &mapping)
{
    using R = Result<FitResult>;
    if (data.participantIndex < 0)
        return R::failure(u"no participant column was read; name the column that says whose each row is"_s);
    // The between-groups fit of the pooled data gives the levels, their order and the checks.
    auto fit = fitScheme(scheme, data, options, mapping);
    if (!fit)
        return fit;
    const Analysis analysis = analyze(scheme);
    const ParticipantCells cellsOf = participantCells(scheme, data, mapping);
    const int k = scheme.levelCount();
    const int participants = int(data.participants.size());
    const Eigen::MatrixXd &y = cellsOf.means;
    FitResult &f = fit.value();
    f.byParticipant = true;
    f.participants = participants;
    std::vector<bool> complete(size_t(participants), true);
    for (int p = 0; p < participants; ++p) {
        QStringList lacks;
        for (int j = 0; j < k; ++j)
            if (std::isnan(y(p, j)))
                lacks << quoted(scheme.factor.levels[j]);
        if (lacks.size() >= k - 1)
            return R::failure(u"participant %1 has values at one level only; measured within participants, each gives a value "
                              u"at every level (is the factor measured between participants?)"_s.arg(quoted(data.participants[p])));
        if (!lacks.isEmpty()) {
            complete[size_t(p)] = false;
            f.incompleteParticipants << u"%1 (no %2)"_s.arg(data.participants[p], lacks.join(u", "_s));
        }
    }
    f.completeParticipants = int(std::count(complete.begin(), complete.end(), true));

    // Each coefficient on the participants' contrast scores.
    const Eigen::MatrixXd &h = analysis.hypothesisValues;
    const double tailArea = options.alpha / 2.0;
    std::vector<double> pFamily;
    for (size_t c = 0; c < f.coefficients.size(); ++c) {
        FitCoefficient &coef = f.coefficients[c];
        RunningStats scores;
        for (int p = 0; p < participants; ++p) {
            double score = 0.0;
            bool usable = true;
            for (int j = 0; j < k && usable; ++j) {
                const double w = h(Eigen::Index(c), j);
                if (w == 0.0)
                    continue;
                usable = !std::isnan(y(p, j));
                score += w * y(p, j);
            }
            if (usable)
                scores.add(score);
        }
        coef.participants = int(scores.n);
        coef.df = scores.n - 1.0;
        coef.estimate = scores.n > 0 ? scores.mean : kNaN;
        coef.se = scores.sd() / std::sqrt(scores.n);
        coef.t = coef.estimate / coef.se;
        coef.p = tTwoSidedP(coef.t, coef.df);
        const double tCrit = tQuantileUpper(tailArea, coef.df);
        coef.ciLow = coef.estimate - tCrit * coef.se;
        coef.ciHigh = coef.estimate + tCrit * coef.se;
        pFamily.push_back(coef.inFamily ? coef.p : kNaN);
    }
    const std::vector<double> adjusted = adjustPValues(pFamily, options.adjust);
    for (size_t c = 0; c < f.coefficients.size(); ++c)
        f.coefficients[c].pAdjusted = adjusted[c];

    // Hotelling's T^2 on the differences from the first level, over the complete participants.
    const int n = f.completeParticipants;
    f.omnibusHypothesis = u"Hotelling's T\u00b2: all %1 level means are equal (over the %2 participants with every level)"_s.arg(k).arg(n);
    f.fDf1 = k - 1;
    f.fDf2 = n - k + 1;
    f.f = f.fP = kNaN;
    if (n >= k) {
        Eigen::MatrixXd d(n, k - 1);
        for (int p = 0, row = 0; p < participants; ++p) {
            if (!complete[size_t(p)])
                continue;
            for (int j = 1; j < k; ++j)
                d(row, j - 1) = y(p, j) - y(p, 0);
            ++row;
        }
        const Eigen::VectorXd mean = d.colwise().mean();
        const Eigen::MatrixXd centred = d.rowwise() - mean.transpose();
        const Eigen::MatrixXd cov = centred.transpose() * centred / double(n - 1);
        const Eigen::LDLT<Eigen::MatrixXd> ldlt(cov);
        if (ldlt.info() == Eigen::Success && ldlt.isPositive() && ldlt.vectorD().minCoeff() > 1e-14 * cov.diagonal().maxCoeff()) {
            const double t2 = n * mean.dot(ldlt.solve(mean));
            f.f = t2 * (n - k + 1) / (double(n - 1) * (k - 1));
            f.fP = fUpperP(f.f, f.fDf1, f.fDf2);
        } else {
            f.notes << u"the participants' differences between levels do not vary in every direction, so Hotelling's test "
                       u"cannot be computed"_s;
        }
    } else {
        f.notes << u"Hotelling's test needs at least as many participants with every level as levels (%1); %2 have every level"_s.arg(k).arg(n);
    }
    f.notes.prepend(u"by participant: %1 participants; each coefficient is tested on the participants' own contrast scores "
                    u"(one-sample t with P - 1 df, its own error term, no sphericity assumed)"_s.arg(participants));
    if (!f.incompleteParticipants.isEmpty())
        f.notes << (f.incompleteParticipants.size() == 1
                        ? u"1 participant lacks a level and is left out of the tests that need it: %1"_s
                        : u"%1 participants lack a level and are left out of the tests that need it: %2"_s.arg(f.incompleteParticipants.size()))
                       .arg(f.incompleteParticipants.join(u"; "_s));
    return fit;
}

Result<MultivariateTest> wilksTest(const Eigen::MatrixXd &X, const Eigen::MatrixXd &Y, const Eigen::MatrixXd &L, const Eigen::MatrixXd &M)
{
    using R = Result<MultivariateTest>;
    const Eigen::Index n = X.rows();
    const Eigen::Index p = X.cols();
    const Eigen::Index q = M.cols();
    const Eigen::Index h = L.rows();
    const double nu = double(n - p);
    if (q < 1 || h < 1)
        return R::failure(u"nothing to test"_s);
    if (nu < double(q))
        return R::failure(u"%1 participants with every within cell; the test needs at least %2"_s.arg(n).arg(p + q));
    const Eigen::MatrixXd xtx = X.transpose() * X;
    const Eigen::LDLT<Eigen::MatrixXd> xtxLdlt(xtx);
    if (xtxLdlt.info() != Eigen::Success || !xtxLdlt.isPositive() || xtxLdlt.vectorD().minCoeff() <= 1e-12 * xtx.diagonal().maxCoeff())
        return R::failure(u"a group has no participant with every within cell, so the groups' scores cannot all be estimated"_s);
    const Eigen::MatrixXd z = Y * M;
    const Eigen::MatrixXd b = xtxLdlt.solve(X.transpose() * z);
    const Eigen::MatrixXd residual = z - X * b;
    const Eigen::MatrixXd e = residual.transpose() * residual;
    const Eigen::MatrixXd lb = L * b;
    const Eigen::MatrixXd middle = L * xtxLdlt.solve(L.transpose());
    const Eigen::MatrixXd hyp = lb.transpose() * middle.ldlt().solve(lb);
    const Eigen::LLT<Eigen::MatrixXd> eLlt(e);
    const Eigen::LLT<Eigen::MatrixXd> ehLlt(e + hyp);
    const double scale = std::max(e.diagonal().maxCoeff(), std::numeric_limits<double>::min());
    if (eLlt.info() != Eigen::Success || ehLlt.info() != Eigen::Success
        || eLlt.matrixL().toDenseMatrix().diagonal().minCoeff() <= 1e-7 * std::sqrt(scale))
        return R::failure(u"the participants' scores do not vary in every direction within the groups, so the error matrix is singular"_s);
    const Eigen::VectorXd le = eLlt.matrixL().toDenseMatrix().diagonal();
    const Eigen::VectorXd leh = ehLlt.matrixL().toDenseMatrix().diagonal();
    double logLambda = 0.0;
    for (Eigen::Index i = 0; i < q; ++i)
        logLambda += 2.0 * (std::log(le(i)) - std::log(leh(i)));
    MultivariateTest t;
    t.wilks = std::exp(logLambda);
    const double pq = double(q), hq = double(h);
    const double power = pq * pq + hq * hq - 5.0 > 0.0 ? std::sqrt((pq * pq * hq * hq - 4.0) / (pq * pq + hq * hq - 5.0)) : 1.0;
    t.df1 = pq * hq;
    t.df2 = (nu - (pq - hq + 1.0) / 2.0) * power - (pq * hq - 2.0) / 2.0;
    const double root = std::exp(logLambda / power);
    t.f = (1.0 - root) / root * t.df2 / t.df1;
    t.p = fUpperP(t.f, t.df1, t.df2);
    t.exact = std::min(q, h) <= 2;
    return R(t);
}

// ---------------------------------------------------------------------------
// JSON

QJsonObject fitResultToJson(const FitResult &fit, const DataSummary &data)
{
    QJsonArray levels;
    for (size_t j = 0; j < fit.levelStats.size(); ++j) {
        const RunningStats &s = fit.levelStats[j];
        levels.append(QJsonObject{{u"name"_s, fit.levels.value(qsizetype(j))},
                                  {u"n"_s, jsonNumber(s.n)},
                                  {u"rows"_s, double(s.rows)},
                                  {u"mean"_s, jsonNumber(s.mean)},
                                  {u"sd"_s, jsonNumber(s.sd())}});
    }
    QJsonArray coefficients;
    for (const FitCoefficient &c : fit.coefficients) {
        QJsonObject o{{u"name"_s, c.name},
                      {u"estimate"_s, jsonNumber(c.estimate)},
                      {u"se"_s, jsonNumber(c.se)},
                      {u"t"_s, jsonNumber(c.t)},
                      {u"p"_s, jsonNumber(c.p)},
                      {u"p_adjusted"_s, jsonNumber(c.pAdjusted)},
                      {u"ci_low"_s, jsonNumber(c.ciLow)},
                      {u"ci_high"_s, jsonNumber(c.ciHigh)},
                      {u"hypothesis_estimate"_s, jsonNumber(c.hypothesisEstimate)},
                      {u"agrees"_s, c.agrees}};
        if (!c.hypothesis.isEmpty())
            o.insert(u"hypothesis"_s, c.hypothesis);
        if (fit.byParticipant) {
            o.insert(u"df"_s, jsonNumber(c.df));
            o.insert(u"participants"_s, c.participants);
        }
        coefficients.append(o);
    }
    QJsonArray first;
    for (const RowProblem &r : data.skipped)
        first.append(QJsonObject{{u"line"_s, double(r.line)}, {u"reason"_s, r.message}});
    QJsonObject out{
        {u"levels"_s, levels},
        {u"coefficients"_s, coefficients},
        {u"sigma"_s, jsonNumber(fit.sigma)},
        {u"df"_s, jsonNumber(fit.df)},
        {u"r_squared"_s, jsonNumber(fit.rSquared)},
        {u"f"_s, jsonNumber(fit.f)},
        {u"f_df1"_s, jsonNumber(fit.fDf1)},
        {u"f_df2"_s, jsonNumber(fit.fDf2)},
        {u"f_p"_s, jsonNumber(fit.fP)},
        {u"omnibus"_s, fit.omnibusHypothesis},
        {u"alpha"_s, fit.alpha},
        {u"adjust"_s, adjustmentId(fit.adjust)},
        {u"n"_s, jsonNumber(fit.totalN)},
        {u"notes"_s, QJsonArray::fromStringList(fit.notes)},
        {u"cautions"_s, QJsonArray::fromStringList(fit.cautions)},
        {u"skipped_rows"_s, QJsonObject{{u"count"_s, double(data.skippedRows)}, {u"first"_s, first}}},
        {u"data"_s, QJsonObject{{u"source"_s, data.source},
                                {u"summary_table"_s, data.fromSummaryTable},
                                {u"weighted"_s, data.weighted},
                                {u"rows"_s, double(data.records)},
                                {u"used_rows"_s, double(data.usedRows)}}},
    };
    if (fit.byParticipant) {
        out[u"omnibus"_s] = QJsonObject{{u"test"_s, u"hotelling"_s},      {u"hypothesis"_s, fit.omnibusHypothesis},
                                        {u"f"_s, jsonNumber(fit.f)},        {u"df1"_s, jsonNumber(fit.fDf1)},
                                        {u"df2"_s, jsonNumber(fit.fDf2)},   {u"p"_s, jsonNumber(fit.fP)},
                                        {u"participants"_s, fit.completeParticipants}};
        out[u"participants"_s] = QJsonObject{{u"count"_s, fit.participants},
                                             {u"complete"_s, fit.completeParticipants},
                                             {u"incomplete"_s, QJsonArray::fromStringList(fit.incompleteParticipants)}};
    }
    return out;
}

} // namespace cb
