#include "core/power/MixedPower.h"

#include "core/analysis/Analysis.h"
#include "core/base/NumberText.h"
#include "core/base/Weight.h"

#include <Eigen/SVD>

#include <algorithm>
#include <cmath>
#include <numeric>
#include <tuple>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::vector<double> toDoubles(const std::vector<long long> &sizes)
{
    return {sizes.begin(), sizes.end()};
}

// A term of one part of a mixed design: its name and its columns in the part's scheme (first is
// the index among the columns, the intercept not counted).
struct PartTerm
{
    QString name;
    int first = 0;
    int count = 0;
};

struct Part
{
    Scheme scheme;
    std::vector<PartTerm> terms;
};

// The design's between factors (within = false) or within factors as one scheme over their
// cells (A-major, as mixedLayout numbers groups and within cells), with the terms among them;
// nullopt when there is no such factor. The within part always has an intercept: its first row
// is the participants' average.
Result<std::optional<Part>> partScheme(const Design &design, bool within)
{
    using R = Result<std::optional<Part>>;
    std::vector<int> chosen;
    for (size_t f = 0; f < design.factors.size(); ++f)
        if (design.factors[f].factor.isWithin() == within)
            chosen.push_back(int(f));
    const bool intercept = within || design.intercept;
    if (chosen.empty())
        return R(std::nullopt);
    if (chosen.size() == 1) {
        Part out;
        out.scheme = design.factors[size_t(chosen.front())];
        out.scheme.intercept = intercept;
        out.scheme.factor.plannedN.clear();
        out.terms.push_back({out.scheme.factor.name, 0, out.scheme.columnCount()});
        return R(std::optional(std::move(out)));
    }
    Design part;
    part.intercept = intercept;
    for (int f : chosen)
        part.factors.push_back(design.factors[size_t(f)]);
    const auto position = [&](int f) { return int(std::find(chosen.begin(), chosen.end(), f) - chosen.begin()); };
    for (const Term &t : design.terms) {
        Term mapped;
        bool inside = t.within < 0 || position(t.within) < int(chosen.size());
        for (int f : t.factors) {
            inside = inside && position(f) < int(chosen.size());
            mapped.factors.push_back(position(f));
        }
        mapped.within = t.within < 0 ? -1 : position(t.within);
        if (inside)
            part.terms.push_back(mapped);
    }
    auto cells = cellScheme(part);
    if (!cells)
        return R::failure(cells.error());
    Part out;
    out.scheme = cells.take();
    out.scheme.intercept = intercept;
    int first = 0;
    for (const Term &t : part.terms) {
        const int count = int(termColumns(part, t).size());
        out.terms.push_back({termName(part, t), first, count});
        first += count;
    }
    return R(std::optional(std::move(out)));
}


// The hypothesis row as groups x within cells.
Eigen::MatrixXd byGroup(const Eigen::VectorXd &h, const MixedLayout &layout)
{
    Eigen::MatrixXd m = Eigen::MatrixXd::Zero(layout.groups(), layout.withinCells());
    for (Eigen::Index cell = 0; cell < h.size(); ++cell)
        m(layout.groupOf[size_t(cell)], layout.withinOf[size_t(cell)]) = h[cell];
    return m;
}

// What the power at any group sizes needs: each group's covariance over the within cells.
struct MixedModel
{
    MixedModel(const PowerSettings &s, const MixedLayout &l) : settings(s), layout(l)
    {
        const int w = l.withinCells();
        Eigen::MatrixXd r = s.correlations;
        if (r.size() == 0) {
            r = Eigen::MatrixXd::Constant(w, w, s.correlation);
            r.diagonal().setOnes();
        }
        sigma.assign(size_t(l.groups()), Eigen::MatrixXd());
        for (int g = 0; g < l.groups(); ++g) {
            Eigen::VectorXd sd = Eigen::VectorXd::Constant(w, s.sd);
            if (s.perLevelSds())
                for (size_t cell = 0; cell < l.groupOf.size(); ++cell)
                    if (l.groupOf[cell] == g)
                        sd[l.withinOf[cell]] = s.sds[cell];
            sigma[size_t(g)] = sd.asDiagonal() * r * sd.asDiagonal();
        }
        mu = Eigen::MatrixXd::Zero(l.groups(), w);
        for (size_t cell = 0; cell < l.groupOf.size(); ++cell)
            mu(l.groupOf[cell], l.withinOf[cell]) = s.means[cell];
    }

    // Estimate, SE, df and power of hypothesis row h at participants per group n.
    struct Values
    {
        double estimate = 0.0, se = 0.0, df = 0.0, noncentrality = 0.0, power = kNaN;
    };
    Values at(const Eigen::VectorXd &h, const std::vector<double> &n, double alpha) const
    {
        Values v;
        double scale = 0.0;
        for (Eigen::Index i = 0; i < h.size(); ++i) {
            v.estimate += h[i] * settings.means[size_t(i)];
            scale += std::abs(h[i] * settings.means[size_t(i)]);
        }
        if (std::abs(v.estimate) <= 1e-12 * scale)
            v.estimate = 0.0;
        const Eigen::MatrixXd hg = byGroup(h, layout);
        double var = 0.0;
        for (int g = 0; g < layout.groups(); ++g)
            var += hg.row(g).dot(sigma[size_t(g)] * hg.row(g).transpose()) / n[size_t(g)];
        v.se = std::sqrt(var);
        v.df = std::accumulate(n.begin(), n.end(), 0.0) - layout.groups();
        v.noncentrality = v.estimate == 0.0 ? 0.0 : v.estimate / v.se;
        v.power = tTestPower(v.noncentrality, v.df, alpha, settings.oneSided);
        return v;
    }

    // Hotelling's T^2 that the within cells are equal, averaged over the groups with equal weight:
    // delta = the groups' average of the differences of the within cells from the first, its
    // covariance V = sum_j D' Sigma_j D / (g^2 n_j), lambda = delta' V^-1 delta, an F with w - 1
    // and N - g - w + 2 df (exact when the groups share one covariance; then the pooled error is
    // Wishart). effectSize: sqrt(delta' S^-1 delta), S the groups' average covariance of the
    // differences, so that lambda = N f^2 for equal groups.
    struct Omnibus
    {
        double df2 = kNaN, effectSize = kNaN, noncentrality = kNaN, power = kNaN;
    };
    Omnibus omnibusAt(const std::vector<double> &n, double alpha) const
    {
        const int g = layout.groups();
        const int w = layout.withinCells();
        Eigen::MatrixXd diff = Eigen::MatrixXd::Zero(w, w - 1);
        for (int j = 1; j < w; ++j) {
            diff(0, j - 1) = -1.0;
            diff(j, j - 1) = 1.0;
        }
        Eigen::VectorXd delta = Eigen::VectorXd::Zero(w - 1);
        for (size_t cell = 0; cell < layout.groupOf.size(); ++cell)
            delta += diff.row(layout.withinOf[cell]).transpose() * settings.means[cell] / double(g);
        Eigen::MatrixXd v = Eigen::MatrixXd::Zero(w - 1, w - 1);
        Eigen::MatrixXd average = Eigen::MatrixXd::Zero(w - 1, w - 1);
        for (int j = 0; j < g; ++j) {
            const Eigen::MatrixXd s = diff.transpose() * sigma[size_t(j)] * diff;
            v += s / (double(g) * double(g) * n[size_t(j)]);
            average += s / double(g);
        }
        Omnibus o;
        o.df2 = std::accumulate(n.begin(), n.end(), 0.0) - g - w + 2;
        const Eigen::LDLT<Eigen::MatrixXd> ldlt(v);
        if (ldlt.info() != Eigen::Success || !ldlt.isPositive())
            return o;
        double scale = 1.0;
        for (double m : settings.means)
            scale = std::max(scale, std::abs(m));
        const bool equal = delta.cwiseAbs().maxCoeff() <= 1e-12 * scale;
        o.noncentrality = equal ? 0.0 : delta.dot(ldlt.solve(delta));
        o.effectSize = equal ? 0.0 : std::sqrt(delta.dot(average.ldlt().solve(delta)));
        if (o.df2 >= 1.0)
            o.power = fTestPower(o.noncentrality, w - 1, o.df2, alpha);
        return o;
    }

    // A multivariate test L B M = 0 (mixedTerms) at participants per group n, as the data check
    // computes it: B the between coding's coefficients (X: groups x p design rows) fitted by least
    // squares to the participants' values, Wilks' lambda as Rao's F with df1 = q c and df2 =
    // s (nu - (c - q + 1)/2) - (q c - 2)/2, nu = N - p, s = sqrt((q^2 c^2 - 4)/(q^2 + c^2 - 5)).
    // The population's H = Theta' A^-1 Theta with Theta = L B M, B = (X'WX)^-1 X'W mu (W the group
    // sizes, mu the cell means as groups x within cells), A = L (X'WX)^-1 L', and Sigma the groups'
    // pooled covariance. When min(q, c) = 1 the F is exactly noncentral F with lambda =
    // tr(H (M' Sigma M)^-1) (Hotelling's T^2, or the univariate F on the scores). Otherwise lambda =
    // df2 eta / (1 - eta), eta = 1 - Lambda^(1/s), Lambda = |E| / |E + H| with E = nu M' Sigma M:
    // the approximation of Muller & Peterson (1984, Comput. Stat. Data Anal. 2:143-158; cited from
    // memory), which tests/python/power_mixed_check.py checks by simulation.
    struct Term
    {
        double df2 = kNaN, noncentrality = kNaN, power = kNaN;
        bool exact = true;
    };
    Term termAt(const MixedTermTest &t, const Eigen::MatrixXd &x, const std::vector<double> &n, double alpha) const
    {
        const int g = layout.groups();
        const int w = layout.withinCells();
        const Eigen::VectorXd sizes = Eigen::Map<const Eigen::VectorXd>(n.data(), Eigen::Index(n.size()));
        const double total = sizes.sum();
        Eigen::MatrixXd pooled = Eigen::MatrixXd::Zero(w, w);
        for (int j = 0; j < g; ++j)
            pooled += (n[size_t(j)] - 1.0) * sigma[size_t(j)];
        pooled /= std::max(1.0, total - g);
        const double q = double(t.contrast.rows());
        const double c = double(t.transform.cols());
        const double nu = total - double(x.cols());
        const double s = q * q + c * c - 5.0 > 0.0 ? std::sqrt((q * q * c * c - 4.0) / (q * q + c * c - 5.0)) : 1.0;
        Term out;
        out.exact = std::min(q, c) <= 1.0;
        out.df2 = s * (nu - (c - q + 1.0) / 2.0) - (q * c - 2.0) / 2.0;
        const Eigen::MatrixXd xtwx = x.transpose() * sizes.asDiagonal() * x;
        const Eigen::LDLT<Eigen::MatrixXd> xldlt(xtwx);
        const Eigen::MatrixXd err = t.transform.transpose() * pooled * t.transform;
        const Eigen::LDLT<Eigen::MatrixXd> eldlt(err);
        if (xldlt.info() != Eigen::Success || !xldlt.isPositive() || eldlt.info() != Eigen::Success || !eldlt.isPositive())
            return out;
        const Eigen::MatrixXd b = xldlt.solve(x.transpose() * sizes.asDiagonal() * mu);
        const Eigen::MatrixXd theta = t.contrast * b * t.transform;
        const Eigen::MatrixXd a = t.contrast * xldlt.solve(t.contrast.transpose());
        const Eigen::MatrixXd h = theta.transpose() * a.ldlt().solve(theta);
        double scale = 1.0;
        for (double m : settings.means)
            scale = std::max(scale, std::abs(m));
        if (theta.cwiseAbs().maxCoeff() <= 1e-12 * scale)
            out.noncentrality = 0.0;
        else if (out.exact)
            out.noncentrality = (eldlt.solve(h)).trace();
        else {
            const Eigen::MatrixXd e = nu * err;
            const double logLambda = e.ldlt().vectorD().array().log().sum() - (e + h).ldlt().vectorD().array().log().sum();
            const double eta = 1.0 - std::exp(logLambda / s);
            out.noncentrality = eta >= 1.0 ? std::numeric_limits<double>::infinity() : out.df2 * eta / (1.0 - eta);
        }
        if (out.df2 >= 1.0 && nu >= c)
            out.power = fTestPower(out.noncentrality, q * c, out.df2, alpha);
        return out;
    }

    const PowerSettings &settings;
    const MixedLayout &layout;
    std::vector<Eigen::MatrixXd> sigma;
    Eigen::MatrixXd mu; // the cell means as groups x within cells
};

Problem problem(const QString &key, QString message)
{
    return Problem{std::move(message), key};
}

Problem checkRows(const Eigen::MatrixXd &rows, const PowerSettings &s, const MixedLayout &layout)
{
    if (Problem p = validateMixedPowerSettings(s, layout); !p.isEmpty())
        return p;
    if (rows.cols() != Eigen::Index(layout.groupOf.size()))
        return problem(u"contrasts"_s, u"contrasts: %1 weights per row for %2 cells"_s.arg(rows.cols()).arg(layout.groupOf.size()));
    for (Eigen::Index r = 0; r < rows.rows(); ++r)
        if (!rows.row(r).allFinite() || (rows.row(r).array() == 0.0).all())
            return problem(u"contrasts"_s, u"contrast %1: its weights are not finite numbers, or all 0"_s.arg(r + 1));
    return {};
}

} // namespace

bool hasWithinFactor(const Design &design)
{
    return std::any_of(design.factors.begin(), design.factors.end(), [](const Scheme &f) { return f.factor.isWithin(); });
}

MixedLayout mixedLayout(const Design &design)
{
    MixedLayout out;
    const int cells = design.cellCount();
    out.groupOf.resize(size_t(cells));
    out.withinOf.resize(size_t(cells));
    for (int cell = 0; cell < cells; ++cell) {
        const std::vector<int> levels = cellLevels(design, cell);
        int group = 0;
        int within = 0;
        QStringList groupName;
        QStringList withinName;
        for (size_t f = 0; f < design.factors.size(); ++f) {
            const Factor &factor = design.factors[f].factor;
            int &index = factor.isWithin() ? within : group;
            index = index * factor.levelCount() + levels[f];
            (factor.isWithin() ? withinName : groupName) << factor.levels[levels[f]];
        }
        out.groupOf[size_t(cell)] = group;
        out.withinOf[size_t(cell)] = within;
        const QString g = groupName.isEmpty() ? u"all"_s : groupName.join(cellJoiner());
        if (group >= out.groupNames.size())
            out.groupNames.resize(group + 1);
        out.groupNames[group] = g;
        if (within >= out.withinNames.size())
            out.withinNames.resize(within + 1);
        out.withinNames[within] = withinName.join(cellJoiner());
    }
    return out;
}

Result<MixedTerms> mixedTerms(const Design &design)
{
    using R = Result<MixedTerms>;
    auto betweenPart = partScheme(design, false);
    auto withinPart = partScheme(design, true);
    if (!betweenPart || !withinPart)
        return R::failure(!betweenPart ? betweenPart.error() : withinPart.error());
    if (!*withinPart)
        return R::failure(u"the design has no factor measured within participants"_s);
    MixedTerms out;
    if (*betweenPart)
        out.between = (*betweenPart)->scheme;
    out.betweenDesign = out.between ? designRows(*out.between) : Eigen::MatrixXd::Ones(1, 1);
    const Analysis withinAnalysis = analyze((*withinPart)->scheme);
    if (withinAnalysis.hypothesisValues.size() == 0)
        return R::failure(u"the within factors' coding is rank deficient, so its columns have no unique contrasts to test"_s);
    out.withinRows = withinAnalysis.hypothesisValues;
    out.withinNames = withinAnalysis.columnNames;

    const Eigen::MatrixXd &hv = out.withinRows;
    const Eigen::Index w = hv.cols();
    const Eigen::MatrixXd &groupRows = out.betweenDesign;
    const bool grouped = groupRows.rows() > 1;
    const QString overGroups = grouped ? u", averaged over the groups with equal weight"_s : QString();
    const auto add = [&](QString name, QString hypothesis, Eigen::MatrixXd l, Eigen::MatrixXd m) {
        out.tests.push_back({std::move(name), std::move(hypothesis), std::move(l), std::move(m)});
    };
    const Eigen::MatrixXd average = groupRows.colwise().mean();
    const bool saturated = hv.rows() == w;
    add(u"all within cells"_s,
        saturated ? u"the %1 within cells have equal means%2"_s.arg(w).arg(overGroups) : u"every within column is 0%1"_s.arg(overGroups), average,
        hv.bottomRows(hv.rows() - 1).transpose());
    const auto withinRowsOf = [&](const PartTerm &t) { return Eigen::MatrixXd(hv.middleRows(1 + t.first, t.count).transpose()); };
    const std::vector<PartTerm> &withinTerms = (*withinPart)->terms;
    if (withinTerms.size() > 1)
        for (const PartTerm &t : withinTerms)
            add(t.name, u"every column of %1 is 0%2"_s.arg(t.name, overGroups), average, withinRowsOf(t));
    // Between terms need the between coding's intercept (its columns are then the terms' contrasts).
    if (!out.between || !out.between->intercept)
        return R(std::move(out));
    const Eigen::MatrixXd averageOverCells = Eigen::VectorXd::Constant(w, 1.0 / double(w));
    for (const PartTerm &b : (*betweenPart)->terms) {
        Eigen::MatrixXd l = Eigen::MatrixXd::Zero(b.count, groupRows.cols());
        for (int i = 0; i < b.count; ++i)
            l(i, 1 + b.first + i) = 1.0;
        add(b.name, u"every column of %1 is 0 on the participants' averages over the within cells"_s.arg(b.name), l, averageOverCells);
        for (const PartTerm &t : withinTerms) {
            const QString name = b.name + kCrossJoiner.toString() + t.name;
            add(name, u"every column of %1 is 0: %2's contrasts do not differ with %3"_s.arg(name, t.name, b.name), l, withinRowsOf(t));
        }
    }
    return R(std::move(out));
}

QString mixedPartText(MixedPart part)
{
    switch (part) {
    case MixedPart::Between:
        return u"between"_s;
    case MixedPart::Within:
        return u"within"_s;
    case MixedPart::Interaction:
        return u"between \u00d7 within"_s;
    case MixedPart::Combined:
        break;
    }
    return u"combined"_s;
}

MixedPart mixedPart(const Eigen::VectorXd &h, const MixedLayout &layout)
{
    const Eigen::MatrixXd m = byGroup(h, layout);
    const Eigen::JacobiSVD<Eigen::MatrixXd> svd(m, Eigen::ComputeThinU | Eigen::ComputeThinV);
    const Eigen::VectorXd s = svd.singularValues();
    if (s.size() > 1 && s[1] > 1e-9 * s[0])
        return MixedPart::Combined;
    const Eigen::VectorXd a = svd.matrixU().col(0);
    const Eigen::VectorXd c = svd.matrixV().col(0);
    const double tolerance = 1e-9 * c.cwiseAbs().maxCoeff();
    if (c.maxCoeff() - c.minCoeff() <= tolerance)
        return MixedPart::Between;
    return std::abs(a.sum()) <= 1e-9 * a.cwiseAbs().sum() ? MixedPart::Interaction : MixedPart::Within;
}

Problem validateMixedPowerSettings(const PowerSettings &s, const MixedLayout &layout, const QString &fieldPrefix)
{
    const int cells = int(layout.groupOf.size());
    const auto field = [&](const char16_t *name) { return fieldPrefix + QString::fromUtf16(name); };
    if (!s.ratios.empty())
        return problem(u"ratios"_s, u"%1: a mixed design takes the participants per group from the cell sizes, or a total split "
                                    u"equally over the groups"_s.arg(field(u"ratios")));
    // The cells as separate groups: means, SDs, sizes, alpha and target.
    PowerSettings cellsAlone = s;
    cellsAlone.measure = Measure::Between;
    cellsAlone.correlation = 0.0;
    cellsAlone.correlations.resize(0, 0);
    if (s.n.empty()) // the total counts participants, each at every within cell
        cellsAlone.total = s.total * layout.withinCells();
    if (Problem p = validatePowerSettings(cellsAlone, cells, fieldPrefix); !p.isEmpty())
        return p;
    if (!s.n.empty()) {
        std::vector<int> first(size_t(layout.groups()), -1);
        for (int cell = 0; cell < cells; ++cell) {
            int &f = first[size_t(layout.groupOf[size_t(cell)])];
            if (f < 0)
                f = cell;
            else if (s.n[size_t(cell)] != s.n[size_t(f)])
                return problem(u"n"_s, u"%1: group '%2' has %3 participants in one within cell and %4 in another; its participants "
                                       u"give a value in every within cell, so its cells' sizes must agree"_s
                                           .arg(field(u"n"), layout.groupNames[layout.groupOf[size_t(cell)]], doubleToString(s.n[size_t(f)]),
                                                doubleToString(s.n[size_t(cell)])));
        }
    }
    // The correlations over the within cells, checked as a within factor of that many levels.
    PowerSettings within;
    within.measure = Measure::Within;
    within.means.assign(size_t(layout.withinCells()), 0.0);
    within.n.assign(size_t(layout.withinCells()), 2.0);
    within.correlation = s.correlation;
    within.correlations = s.correlations;
    if (Problem p = validatePowerSettings(within, layout.withinCells(), fieldPrefix); !p.isEmpty()) {
        p.message += u" (the within cells: %1)"_s.arg(layout.withinNames.join(u", "_s));
        return p;
    }
    return {};
}

std::vector<double> groupSizes(const PowerSettings &s, const MixedLayout &layout)
{
    std::vector<double> out(size_t(layout.groups()), s.total / layout.groups());
    if (!s.n.empty())
        for (size_t cell = layout.groupOf.size(); cell-- > 0;)
            out[size_t(layout.groupOf[cell])] = s.n[cell];
    return out;
}

Result<PowerReport> computeMixedPower(const Eigen::MatrixXd &rows, const QStringList &names, const PowerSettings &settings,
                                      const MixedLayout &layout, const MixedTerms *terms)
{
    using R = Result<PowerReport>;
    if (Problem p = checkRows(rows, settings, layout); !p.isEmpty())
        return R::failure(std::move(p));
    const MixedModel model(settings, layout);
    const std::vector<double> n = groupSizes(settings, layout);
    const int m = int(rows.rows());
    const int g = layout.groups();

    PowerReport report;
    report.levelCount = int(rows.cols());
    report.within = true;
    report.groups = layout.groupNames;
    if (settings.correlations.size() == 0)
        report.correlation = settings.correlation;
    for (size_t cell = 0; cell < layout.groupOf.size(); ++cell)
        report.plannedN.push_back(n[size_t(layout.groupOf[cell])]);
    report.plannedTotal = std::accumulate(n.begin(), n.end(), 0.0);
    report.alpha = settings.alpha;
    report.perTestAlpha = perTestAlpha(settings.alpha, settings.adjustment, m);
    report.adjustment = settings.adjustment;
    report.oneSided = settings.oneSided;
    report.target = settings.target;
    report.cautions = powerCautions(true);
    double rmsSd = settings.sd;
    if (settings.perLevelSds()) {
        double squares = 0.0;
        for (double v : settings.sds)
            squares += v * v;
        rmsSd = std::sqrt(squares / double(settings.sds.size()));
    }
    // The omnibus test: all within cells equal, averaged over the groups (the data check's omnibus).
    const MixedModel::Omnibus om = model.omnibusAt(n, settings.alpha);
    const int w = layout.withinCells();
    report.omnibus = OmnibusPower{.hotelling = true, .df1 = w - 1, .df2 = om.df2, .effectSize = om.effectSize,
                                  .noncentrality = om.noncentrality, .alpha = settings.alpha, .power = om.power, .sd = rmsSd,
                                  .pooledFromLevelSds = false, .required = {}, .notes = {}};
    OmnibusPower &o = report.omnibus;
    o.notes << u"tests that the %1 within cells are equal, averaged over the groups with equal weight: Hotelling's T\u00b2 as an F "
               u"with %2 and %3 df (the data check's omnibus test; its other multivariate tests, of the between and between "
               u"\u00d7 within terms, are listed with their power)"_s.arg(w).arg(w - 1).arg(w == 2 ? u"N - g"_s : u"N - g - %1"_s.arg(w - 2));
    if (om.noncentrality == 0.0)
        o.notes << u"the within cells' expected means, averaged over the groups, are equal: the test's power equals alpha at every n"_s;
    else {
        long long least = 2; // the smallest group size at which the test has a denominator df
        while (least < kPowerSearchCap) {
            const std::vector<long long> sizes = groupSizesFor(least, n);
            if (std::accumulate(sizes.begin(), sizes.end(), 0LL) >= g + w - 1)
                break;
            ++least;
        }
        o.required = smallestSampleSize([&](const std::vector<double> &nn) { return model.omnibusAt(nn, settings.alpha).power; }, n,
                                        settings.target, least);
        if (!o.required.reachable)
            o.notes << unreachedNote(o.required, settings.target, false);
    }
    if (om.df2 < 1.0)
        o.notes << u"the test needs more participants than g + w - 2 = %1; with %2 it cannot be computed"_s.arg(g + w - 2).arg(
            numberText(report.plannedTotal, 10));
    if (settings.perLevelSds())
        o.notes << u"with per-cell SDs that differ between groups its F is an approximation (the groups' covariances differ)"_s;
    if (terms)
        for (const MixedTermTest &t : terms->tests) {
            TermPower tp;
            tp.name = t.name;
            tp.hypothesis = t.hypothesis;
            tp.df1 = int(t.contrast.rows() * t.transform.cols());
            const MixedModel::Term at = model.termAt(t, terms->betweenDesign, n, settings.alpha);
            std::tie(tp.df2, tp.noncentrality, tp.power, tp.exact) = std::tuple(at.df2, at.noncentrality, at.power, at.exact);
            if (!tp.exact)
                tp.notes << u"approximate: Wilks' Λ with more than one root, its power from the noncentral F of Muller & "
                            u"Peterson (1984)"_s;
            if (std::isnan(at.noncentrality))
                tp.notes << u"not computed: the between coding or the covariance of the term's scores is singular"_s;
            else if (at.noncentrality == 0.0)
                tp.notes << u"the expected means satisfy its hypothesis: power equals alpha at every n"_s;
            else {
                long long least = 2; // the smallest group size at which the test has a denominator df
                while (least < kPowerSearchCap && !(model.termAt(t, terms->betweenDesign, toDoubles(groupSizesFor(least, n)), settings.alpha).df2 >= 1.0))
                    ++least;
                tp.required = smallestSampleSize(
                    [&](const std::vector<double> &nn) { return model.termAt(t, terms->betweenDesign, nn, settings.alpha).power; }, n,
                    settings.target, least);
                if (!tp.required.reachable)
                    tp.notes << unreachedNote(tp.required, settings.target, false);
            }
            report.terms.push_back(std::move(tp));
        }
    bool combined = false;
    for (int r = 0; r < m; ++r) {
        ContrastPower c;
        c.name = r < names.size() && !names[r].isEmpty() ? names[r] : u"contrast %1"_s.arg(r + 1);
        const Eigen::VectorXd h = rows.row(r).transpose();
        c.weights.assign(h.data(), h.data() + h.size());
        const MixedPart part = mixedPart(h, layout);
        combined = combined || part == MixedPart::Combined;
        c.part = mixedPartText(part);
        c.alpha = report.perTestAlpha;
        const MixedModel::Values v = model.at(h, n, c.alpha);
        std::tie(c.estimate, c.se, c.df, c.noncentrality, c.power) = std::tuple(v.estimate, v.se, v.df, v.noncentrality, v.power);
        c.zeroEstimate = v.estimate == 0.0;
        // Standardized as between groups (Kline 2013): each side of the weights summing to 1, over the
        // root mean square of the cells' SDs.
        const double side = std::max(h.cwiseMax(0.0).sum(), -h.cwiseMin(0.0).sum());
        c.effectSize = c.estimate / (side * rmsSd);
        if (part == MixedPart::Combined)
            c.notes << u"its weights are not one contrast of the groups times one of the within cells, so its scores' variance "
                       u"is not one pooled variance and the t with N - g df is an approximation"_s;
        if (c.zeroEstimate)
            c.notes << u"the expected estimate is 0: power equals alpha at every n"_s;
        else if (settings.oneSided && c.estimate < 0.0)
            c.notes << u"the expected estimate is negative but the one-sided test looks for a positive one"_s;
        else {
            c.required = smallestSampleSize([&](const std::vector<double> &nn) { return model.at(h, nn, c.alpha).power; }, n,
                                            settings.target);
            if (!c.required.reachable)
                c.notes << unreachedNote(c.required, settings.target, false);
        }
        report.contrasts.push_back(std::move(c));
    }
    report.notes << u"mixed design: %1 groups between participants (%2), each participant at all %3 within cells (%4)"_s.arg(g)
                        .arg(layout.groupNames.join(u", "_s))
                        .arg(layout.withinCells())
                        .arg(layout.withinNames.join(u", "_s));
    report.notes << u"between columns compare the participants' averages over the within cells; within columns test a "
                    u"contrast of the within cells on each participant's contrast score, averaged over the groups; between "
                    u"\u00d7 within columns compare those scores across groups. Each column has its own error term, the "
                    u"pooled within-group variance of its scores, with N - g df (Maxwell & Delaney 2004, ch. 14); no "
                    u"sphericity is assumed, the covariance is taken to be the same in every group"_s;
    if (settings.perLevelSds())
        report.notes << u"per-cell SDs that differ between groups break the equal-covariance assumption of the pooled error"_s;
    if (report.terms.size() > 1)
        report.notes << u"the data check's %1 multivariate tests (Wilks' \u039b) are each planned at alpha = %2, not adjusted for "
                        u"multiplicity: with several of them the chance of at least one false positive is higher"_s
                            .arg(report.terms.size())
                            .arg(numberText(settings.alpha));
    if (combined)
        report.notes << u"some columns mix parts (see their notes); their power is approximate"_s;
    if (m > 1 && settings.adjustment != Adjustment::None)
        report.notes << u"%1 adjustment across %2 columns: each is tested at alpha = %3"_s.arg(adjustmentTitle(settings.adjustment))
                            .arg(m)
                            .arg(numberText(report.perTestAlpha));
    return R(std::move(report));
}

Result<PowerReport> computeMixedPower(const Eigen::MatrixXd &rows, const QStringList &names, const PowerSettings &settings,
                                      const Design &design)
{
    const auto terms = mixedTerms(design);
    return computeMixedPower(rows, names, settings, mixedLayout(design), terms ? &terms.value() : nullptr);
}

Result<std::vector<double>> mixedPowerCurve(const Eigen::MatrixXd &rows, int contrast, const PowerSettings &settings,
                                            const MixedLayout &layout, const std::vector<long long> &smallestGroupSizes)
{
    using R = Result<std::vector<double>>;
    if (Problem p = checkRows(rows, settings, layout); !p.isEmpty())
        return R::failure(std::move(p));
    if (contrast < -1 || contrast >= rows.rows())
        return R::failure(u"contrast: %1 is not a column index of a mixed design (-1 for the omnibus test, 0 to %2)"_s.arg(contrast).arg(
            rows.rows() - 1));
    const MixedModel model(settings, layout);
    const std::vector<double> ratios = groupSizes(settings, layout);
    const double alpha = perTestAlpha(settings.alpha, settings.adjustment, int(rows.rows()));
    std::vector<double> out;
    for (long long t : smallestGroupSizes) {
        const std::vector<long long> sizes = groupSizesFor(std::max(t, 2LL), ratios);
        const std::vector<double> nn(sizes.begin(), sizes.end());
        out.push_back(contrast < 0 ? model.omnibusAt(nn, settings.alpha).power : model.at(rows.row(contrast).transpose(), nn, alpha).power);
    }
    return R(std::move(out));
}

} // namespace cb
