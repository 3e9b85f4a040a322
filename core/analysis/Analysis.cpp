#include "core/analysis/Analysis.h"

#include "core/analysis/HypothesisText.h"
#include "core/base/RationalMatrix.h"
#include "core/base/TextBuilder.h"

#include <Eigen/Cholesky>
#include <Eigen/Eigenvalues>
#include <Eigen/LU>
#include <Eigen/SVD>


#include <charconv>
#include <cmath>
#include <limits>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

constexpr double kEps = std::numeric_limits<double>::epsilon();
// Relative size below which a floating cross-product or sum counts as zero.
constexpr double kZeroTolerance = 1e-10;
// Above this condition number floating-point hypotheses have lost half their digits: said so.
constexpr double kPrecisionWarning = 1e8;
// Above this condition number the Gram matrix's eigenvalues lose too many digits:
// singular values come from an SVD of the scaled design instead.
constexpr double kGramConditionLimit = 1e3;

// Findings are rebuilt on every edit: per-column and per-pair texts are written with a
// TextBuilder (one allocation each), not QString::arg, which parses its pattern once per argument.

// "column 3 ('slope')"
TextBuilder &appendColumnLabel(TextBuilder &out, const Analysis &a, int j)
{
    out << u"column ";
    return out.appendInt(j + 1) << u" ('" << a.columnNames[j] << u"')";
}

void addFinding(Analysis &a, Finding::Severity sev, Finding::Topic topic, QString message, int c1 = -1, int c2 = -1)
{
    a.findings.push_back(Finding{sev, topic, std::move(message), c1, c2});
}

std::vector<std::vector<Weight>> toWeights(const RationalMatrix &m)
{
    std::vector<std::vector<Weight>> out(size_t(m.rows()), std::vector<Weight>(size_t(m.cols())));
    for (int r = 0; r < m.rows(); ++r)
        for (int c = 0; c < m.cols(); ++c)
            out[size_t(r)][size_t(c)] = Weight::exact(m(r, c));
    return out;
}

std::vector<std::vector<Weight>> toWeights(const Eigen::MatrixXd &m)
{
    std::vector<std::vector<Weight>> out(size_t(m.rows()), std::vector<Weight>(size_t(m.cols())));
    for (Eigen::Index r = 0; r < m.rows(); ++r)
        for (Eigen::Index c = 0; c < m.cols(); ++c)
            out[size_t(r)][size_t(c)] = Weight::approx(m(r, c));
    return out;
}

Eigen::MatrixXd toDouble(const std::vector<std::vector<Weight>> &w)
{
    if (w.empty())
        return {};
    Eigen::MatrixXd m(Eigen::Index(w.size()), Eigen::Index(w[0].size()));
    for (size_t r = 0; r < w.size(); ++r)
        for (size_t c = 0; c < w[r].size(); ++c)
            m(Eigen::Index(r), Eigen::Index(c)) = w[r][c].value();
    return m;
}

// "a + 2 b - 1/3 c" from (coefficient, name) pairs.
QString linearCombination(const std::vector<std::pair<Weight, QString>> &terms)
{
    QString s;
    for (const auto &[w, name] : terms) {
        const bool negative = w.value() < 0;
        QString mag = (negative ? Weight::exact(-w.rational()) : w).display();
        if (!w.isExact())
            mag = Weight::approx(std::abs(w.value())).display();
        const QString term = (mag == u"1"_s ? QString() : mag + u" "_s) + name;
        if (s.isEmpty())
            s = negative ? u"-"_s + term : term;
        else
            s += (negative ? u" - "_s : u" + "_s) + term;
    }
    return s.isEmpty() ? u"0"_s : s;
}

// Exact rank and dependencies of X (k x p): each non-pivot column in terms of pivot columns.
// A square X is reduced together with the identity, so one elimination also gives its inverse.
std::optional<RationalMatrix> exactRankAndInverse(Analysis &a, const RationalMatrix &x)
{
    const int k = x.rows(), p = x.cols();
    const bool square = k == p;
    RationalMatrix aug(k, square ? 2 * p : p);
    for (int r = 0; r < k; ++r) {
        for (int c = 0; c < p; ++c)
            aug(r, c) = x(r, c);
        if (square)
            aug(r, p + r) = 1;
    }
    const RationalMatrix::Echelon e = aug.echelon();
    std::vector<bool> isPivot(size_t(p), false);
    std::vector<int> pivots;
    for (int pcol : e.pivots)
        if (pcol < p) {
            isPivot[size_t(pcol)] = true;
            pivots.push_back(pcol);
        }
    a.rank = int(pivots.size());
    for (int c = 0; c < p; ++c) {
        if (isPivot[size_t(c)])
            continue;
        std::vector<std::pair<Weight, QString>> terms;
        for (size_t r = 0; r < pivots.size(); ++r)
            if (e.reduced(int(r), c) != 0)
                terms.emplace_back(Weight::exact(e.reduced(int(r), c)), a.coefficientNames[pivots[r]]);
        a.dependencies << a.coefficientNames[c] + u" = "_s + linearCombination(terms);
    }
    if (!square || a.rank < p)
        return std::nullopt;
    RationalMatrix inv(p, p);
    for (int r = 0; r < p; ++r)
        for (int c = 0; c < p; ++c)
            inv(r, c) = e.reduced(r, p + c);
    return inv;
}

// Floating rank and dependencies by modified Gram-Schmidt in column order. x holds the
// columns times scale (powers of two, see columnScales); dependencies are stated for the
// unscaled columns.
void floatRank(Analysis &a, const Eigen::MatrixXd &x, const Eigen::VectorXd &scale)
{
    const Eigen::Index k = x.rows(), p = x.cols();
    Eigen::MatrixXd q(k, p);      // orthonormal basis of kept columns
    Eigen::MatrixXd r = Eigen::MatrixXd::Zero(p, p); // kept columns = q * r (upper triangular)
    std::vector<int> kept;
    for (Eigen::Index c = 0; c < p; ++c) {
        Eigen::VectorXd v = x.col(c);
        const double norm = v.norm();
        Eigen::VectorXd coef = Eigen::VectorXd::Zero(Eigen::Index(kept.size()));
        for (int pass = 0; pass < 2; ++pass)
            for (size_t i = 0; i < kept.size(); ++i) {
                const double d = q.col(Eigen::Index(i)).dot(v);
                coef(Eigen::Index(i)) += d;
                v -= d * q.col(Eigen::Index(i));
            }
        const double resid = v.norm();
        if (norm == 0.0 || resid <= 1e-10 * norm) {
            // Dependent: x_c = Q coef = K R^-1 coef in terms of the kept columns K.
            std::vector<std::pair<Weight, QString>> terms;
            if (!kept.empty()) {
                const Eigen::Index nk = Eigen::Index(kept.size());
                const Eigen::VectorXd inK = r.topLeftCorner(nk, nk).triangularView<Eigen::Upper>().solve(coef);
                for (Eigen::Index i = 0; i < nk; ++i) {
                    if (std::abs(inK(i)) <= 1e-12 * std::max(1.0, inK.cwiseAbs().maxCoeff()))
                        continue;
                    const double v2 = inK(i) * scale(Eigen::Index(kept[size_t(i)])) / scale(c);
                    Weight w = Weight::approx(v2);
                    if (auto f = recogniseFraction(v2))
                        w = Weight::exact(*f);
                    terms.emplace_back(w, a.coefficientNames[kept[size_t(i)]]);
                }
            }
            a.dependencies << a.coefficientNames[int(c)] + u" = "_s + linearCombination(terms);
            continue;
        }
        const Eigen::Index i = Eigen::Index(kept.size());
        r.col(i).head(i) = coef;
        r(i, i) = resid;
        q.col(i) = v / resid;
        kept.push_back(int(c));
    }
    a.rank = int(kept.size());
    // Columns of r beyond the kept count are unused; r was built per kept column.
}

// A power of two per column that brings its largest magnitude near 1, so that no
// square or cross-product of weights from 1e-300 to 1e300 overflows or underflows.
// Multiplying by it is exact; every diagnostic is invariant to column scale.
Eigen::VectorXd columnScales(const Eigen::MatrixXd &x)
{
    Eigen::VectorXd scale(x.cols());
    for (Eigen::Index j = 0; j < x.cols(); ++j) {
        const double largest = x.col(j).cwiseAbs().maxCoeff();
        scale(j) = largest > 0 && std::isfinite(largest) ? std::ldexp(1.0, -std::ilogb(largest)) : 1.0;
    }
    return scale;
}

// Singular values of diag(sqrt n) X with unit-length columns, descending, plus the SVD when needed.
struct Scaled
{
    Eigen::VectorXd colNorm; // norms before scaling
    Eigen::VectorXd sv;      // descending
    bool anyZeroColumn = false;
    bool usedSvd = false;
    Eigen::BDCSVD<Eigen::MatrixXd> svd;
};

// A'A for a tall A, computed as a symmetric rank update and returned in full.
Eigen::MatrixXd symmetricProduct(const Eigen::MatrixXd &a)
{
    Eigen::MatrixXd g = Eigen::MatrixXd::Zero(a.cols(), a.cols());
    g.selfadjointView<Eigen::Lower>().rankUpdate(a.transpose());
    // The upper triangle mirrored in place (no second k x k matrix: analyses run on every edit).
    g.triangularView<Eigen::StrictlyUpper>() = g.transpose();
    return g;
}

// Singular values of A, descending, from the eigenvalues of its Gram matrix g = A'A.
Eigen::VectorXd singularValuesFromGram(const Eigen::MatrixXd &g, bool &ok)
{
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(g, Eigen::EigenvaluesOnly);
    ok = es.info() == Eigen::Success;
    const Eigen::VectorXd ev = es.eigenvalues().cwiseMax(0.0); // ascending
    const Eigen::Index p = ev.size();
    Eigen::VectorXd sv(p);
    for (Eigen::Index i = 0; i < p; ++i)
        sv(i) = std::sqrt(ev(p - 1 - i));
    return sv;
}

// A square Z's singular values from the Gram matrices of Z and of its inverse. An eigenvalue of a
// Gram matrix is accurate to about eps times the largest one, so sigma_i from Z's Gram matrix has a
// relative error near eps (sigma_max / sigma_i)^2 and 1 / sigma_i from the inverse's near
// eps (sigma_i / sigma_min)^2 plus the inverse's own eps cond: taking each value from the side where it
// is large keeps every error near eps cond, without the cost of an SVD. False when zInverse is not
// usable (not finite, or the design too ill-conditioned for this route).
bool singularValuesWithInverse(Scaled &s, const Eigen::MatrixXd &zInverse)
{
    // Above this condition number the route's error (about eps cond) is no longer far below 1e-9.
    constexpr double kInverseRouteLimit = 1e6;
    if (!zInverse.allFinite())
        return false;
    bool ok = false;
    const Eigen::VectorXd inv = singularValuesFromGram(symmetricProduct(zInverse), ok); // 1 / sigma, descending
    if (!ok || !(inv(0) > 0))
        return false;
    const Eigen::Index p = s.sv.size();
    const double smax = s.sv(0);
    const double smin = 1.0 / inv(0);
    if (!(smax / smin <= kInverseRouteLimit))
        return false;
    const double middle = std::sqrt(smax * smin);
    for (Eigen::Index i = 0; i < p; ++i) {
        // Singular values in descending order: the i-th largest of Z is 1 / the i-th smallest of Z^-1.
        const double fromInverse = 1.0 / inv(p - 1 - i);
        if (fromInverse < middle)
            s.sv(i) = fromInverse;
    }
    return true;
}

// Z = diag(sqrt n) X D^-1, D the column norms, from gram = X' diag(n) X (Z'Z = D^-1 gram D^-1,
// so Z itself is formed only for the SVD fallback). xsInverse: the inverse of x when it is
// square (nullptr otherwise or when it is singular).
void scaledSingularValues(Scaled &s, const Eigen::MatrixXd &x, const Eigen::VectorXd &sqrtN, const Eigen::MatrixXd &gram,
                          const Eigen::MatrixXd *xsInverse)
{
    s.colNorm = gram.diagonal().cwiseSqrt();
    Eigen::VectorXd unit(s.colNorm.size()); // 1 / norm; a zero column stays as it is
    for (Eigen::Index c = 0; c < s.colNorm.size(); ++c) {
        s.anyZeroColumn = s.anyZeroColumn || !(s.colNorm(c) > 0);
        unit(c) = s.colNorm(c) > 0 ? 1.0 / s.colNorm(c) : 1.0;
    }
    bool ok = false;
    s.sv = singularValuesFromGram(unit.asDiagonal() * gram * unit.asDiagonal(), ok);
    const Eigen::Index p = s.sv.size();
    if (ok && s.sv(p - 1) >= s.sv(0) / kGramConditionLimit)
        return;
    // Z^-1 = diag(column norms) X^-1 diag(1 / sqrt n).
    if (ok && xsInverse && !s.anyZeroColumn
        && singularValuesWithInverse(s, s.colNorm.asDiagonal() * *xsInverse * sqrtN.cwiseInverse().asDiagonal()))
        return;
    // Singular vectors only when the pseudo-inverse will need them (fewer columns than
    // levels); a square design is inverted by LU, which stays accurate here.
    const Eigen::MatrixXd z = sqrtN.asDiagonal() * x * unit.asDiagonal();
    const bool vectors = z.cols() < z.rows();
    s.svd.compute(z, vectors ? Eigen::ComputeThinU | Eigen::ComputeThinV : 0);
    // With more columns than rows (k columns and an intercept) the SVD gives k values;
    // the other p - k are exactly zero.
    s.sv = Eigen::VectorXd::Zero(p);
    s.sv.head(s.svd.singularValues().size()) = s.svd.singularValues();
    s.usedSvd = true;
}

struct Zero
{
    // Exact or relative-tolerance zero test for a floating value against a scale.
    static bool test(double v, double scale) { return std::abs(v) <= kZeroTolerance * scale; }
};

// c holds the coding columns times scale (powers of two); sums and cross-products are
// given back unscaled.
// cwc: c' diag(n) c for the scaled columns (a block of the design's weighted Gram matrix).
// squareInverse: for a square design with an intercept, its inverse (the hypotheses), which gives
// the VIFs without another decomposition.
void columnDiagnostics(Analysis &a, const Scheme &s, bool exact, const Eigen::MatrixXd &c, const Eigen::VectorXd &scale,
                       const Eigen::VectorXd &n, const Eigen::MatrixXd &cwc, const Eigen::MatrixXd *squareInverse)
{
    const int m = a.columnCount;
    const int k = a.levelCount;
    a.columnSums.assign(size_t(m), Weight());
    a.sumsToZero.assign(size_t(m), false);
    a.orthogonal = SquareTable<bool>(m);
    a.orthogonalInDesign = SquareTable<bool>(m);
    a.crossProducts = SquareTable<Weight>(m);
    a.designCrossProducts = SquareTable<Weight>(m);
    Eigen::MatrixXd designCov(m, m);
    std::vector<bool> constant(size_t(m), false);
    if (exact) {
        RationalMatrix cq(k, m);
        for (int j = 0; j < m; ++j)
            for (int i = 0; i < k; ++i)
                cq(i, j) = s.columns[size_t(j)].weights[size_t(i)].rational();
        const std::vector<Rational> nq = s.factor.sizes();
        Rational total = 0;
        for (const Rational &v : nq)
            total += v;
        std::vector<Rational> sums(static_cast<size_t>(m)), wsums(static_cast<size_t>(m));
        for (int j = 0; j < m; ++j)
            for (int i = 0; i < k; ++i) {
                sums[size_t(j)] += cq(i, j);
                wsums[size_t(j)] += nq[size_t(i)] * cq(i, j);
            }
        for (int j = 0; j < m; ++j) {
            a.columnSums[size_t(j)] = Weight::exact(sums[size_t(j)]);
            a.sumsToZero[size_t(j)] = sums[size_t(j)] == 0;
        }
        Rational t;
        for (int i = 0; i < m; ++i)
            for (int j = i; j < m; ++j) {
                Rational dot = 0, wdot = 0;
                for (int l = 0; l < k; ++l) {
                    t = cq(l, i) * cq(l, j);
                    dot += t;
                    wdot += nq[size_t(l)] * t;
                }
                wdot -= wsums[size_t(i)] * wsums[size_t(j)] / total;
                const Weight cross = Weight::exact(dot), designCross = Weight::exact(wdot);
                for (const auto &[row, col] : {std::pair{i, j}, std::pair{j, i}}) {
                    a.crossProducts.set(row, col, cross);
                    a.designCrossProducts.set(row, col, designCross);
                    a.orthogonal.set(row, col, dot == 0);
                    a.orthogonalInDesign.set(row, col, wdot == 0);
                }
            }
        // Correlations exactly, as r^2 = d_ij^2 / (d_ii d_jj): the cross-products themselves
        // may lie beyond the range of a double.
        for (int i = 0; i < m; ++i)
            constant[size_t(i)] = a.designCrossProducts(i, i).rational() == 0;
        for (int i = 0; i < m; ++i)
            for (int j = 0; j < m; ++j) {
                const Rational &dij = a.designCrossProducts(i, j).rational();
                if (constant[size_t(i)] || constant[size_t(j)] || dij == 0) {
                    designCov(i, j) = 0.0;
                    continue;
                }
                const Rational r2 = dij * dij / (a.designCrossProducts(i, i).rational()
                                                 * a.designCrossProducts(j, j).rational());
                designCov(i, j) = std::copysign(std::sqrt(nearestDouble(r2)), sgn(dij));
            }
    } else {
        const double total = n.sum();
        const Eigen::VectorXd sums = c.colwise().sum().transpose();
        const Eigen::VectorXd abssums = c.cwiseAbs().colwise().sum().transpose();
        const Eigen::VectorXd wsums = c.transpose() * n;
        // With equal sizes c'c is c' diag(n) c / n: one product serves both.
        const bool equalSizes = (n.array() == n(0)).all();
        const Eigen::MatrixXd cross = equalSizes ? Eigen::MatrixXd(cwc / n(0)) : symmetricProduct(c);
        const Eigen::MatrixXd wcross = cwc - wsums * wsums.transpose() / total;
        const Eigen::VectorXd wsq = cwc.diagonal();
        const auto unscaled = [&](double v, int i, int j) { return Weight::approx(v / scale(i) / scale(j)); };
        for (int j = 0; j < m; ++j) {
            a.columnSums[size_t(j)] = Weight::approx(sums(j) / scale(j));
            a.sumsToZero[size_t(j)] = Zero::test(sums(j), abssums(j));
        }
        for (int i = 0; i < m; ++i)
            for (int j = 0; j < m; ++j) {
                a.crossProducts.set(i, j, unscaled(cross(i, j), i, j));
                a.designCrossProducts.set(i, j, unscaled(wcross(i, j), i, j));
                a.orthogonal.set(i, j, Zero::test(cross(i, j), std::sqrt(cross(i, i) * cross(j, j))));
                a.orthogonalInDesign.set(i, j, Zero::test(wcross(i, j), std::sqrt(wsq(i) * wsq(j))));
            }
        designCov = wcross;
        for (int j = 0; j < m; ++j)
            constant[size_t(j)] = Zero::test(wcross(j, j), wsq(j));
    }
    // Correlations and VIF from the centred, n-weighted cross-products (floating: VIF is a diagnostic).
    // VIF_j = [R^-1]_jj over the non-constant columns; undefined when R is singular.
    std::vector<int> live;
    for (int j = 0; j < m; ++j)
        if (!constant[size_t(j)])
            live.push_back(j);
    a.vif.assign(size_t(m), std::nullopt);
    a.correlation = Eigen::MatrixXd::Constant(m, m, std::numeric_limits<double>::quiet_NaN());
    const Eigen::Index nl = Eigen::Index(live.size());
    Eigen::MatrixXd r(nl, nl);
    for (Eigen::Index i = 0; i < nl; ++i)
        for (Eigen::Index j = 0; j < nl; ++j) {
            const int li = live[size_t(i)], lj = live[size_t(j)];
            r(i, j) = designCov(li, lj) / std::sqrt(designCov(li, li) * designCov(lj, lj));
            a.correlation(li, lj) = r(i, j);
        }
    if (squareInverse && nl == m && m > 0) {
        // VIF_j = [(X' diag(n) X)^-1]_jj times the centred, n-weighted sum of squares of column j, and
        // (X' diag(n) X)^-1 = H diag(1/n) H' for the square X with inverse H.
        // Used when the VIFs are small enough that R is certainly well conditioned:
        // cond_1(R) <= m cond_2(R) <= m^2 sum VIF (lambda_max <= trace R = m, 1 / lambda_min <= trace R^-1).
        const Eigen::ArrayXd invN = n.cwiseInverse().array();
        std::vector<double> vif(static_cast<size_t>(m));
        double sum = 0;
        for (int j = 0; j < m; ++j) {
            // Row j + 1 of the scaled inverse is H's row over scale(j), as column j of c is scaled by it.
            vif[size_t(j)] = (squareInverse->row(j + 1).transpose().array().square() * invN).sum() * designCov(j, j);
            sum += vif[size_t(j)];
        }
        if (std::isfinite(sum) && double(m) * double(m) * sum < 1e12) {
            for (int j = 0; j < m; ++j)
                a.vif[size_t(j)] = vif[size_t(j)];
            return;
        }
    }
    if (nl > 0) {
        // diag(R^-1) from the Cholesky factor: R^-1 = L^-T L^-1, so entry i is |column i of L^-1|^2.
        Eigen::LLT<Eigen::MatrixXd> llt(r);
        if (llt.info() == Eigen::Success && llt.rcond() > 1e-13) {
            const Eigen::MatrixXd linv = llt.matrixL().solve(Eigen::MatrixXd::Identity(nl, nl));
            for (Eigen::Index i = 0; i < nl; ++i)
                a.vif[size_t(live[size_t(i)])] = linv.col(i).squaredNorm();
        }
    }
}

// A cross-product for a message: beyond the range of a double it is described, not shown as inf.
TextBuilder &appendShownValue(TextBuilder &out, const Weight &w)
{
    return w.isExact() || std::isfinite(w.value()) ? out.appendWeight(w) : out << u"beyond the range of double precision";
}

void diagnosticFindings(Analysis &a, const Eigen::MatrixXd &columns)
{
    const int m = a.columnCount;
    using S = Finding::Severity;
    using T = Finding::Topic;
    for (int j = 0; j < m; ++j)
        if (!a.sumsToZero[size_t(j)]) {
            TextBuilder t;
            appendColumnLabel(t, a, j) << u" sums to ";
            t.appendWeight(a.columnSums[size_t(j)])
                << u", not 0: it is not a centred contrast, so the intercept is not the unweighted grand mean";
            addFinding(a, S::Info, T::ColumnSum, t.toString(), j);
        }
    // Identical columns. In floating point, two cheap necessary conditions come first: equal
    // norms and equal projections on a fixed vector r (|r.ci - r.cj| <= |r| |ci - cj|).
    Eigen::VectorXd norms, projections;
    double rNorm = 0;
    if (!a.exact) {
        const Eigen::Index k = columns.rows();
        Eigen::VectorXd r(k);
        for (Eigen::Index i = 0; i < k; ++i)
            r(i) = 1.0 + std::fmod(0.6180339887 * double(i + 1), 1.0);
        rNorm = r.norm();
        norms.resize(m);
        projections.resize(m);
        for (int j = 0; j < m; ++j) {
            norms(j) = columns.col(j).stableNorm();
            const double scale = norms(j) > 0 ? norms(j) : 1.0;
            projections(j) = (columns.col(j) / scale).dot(r) * scale; // scaled to avoid overflow
        }
    }
    const double slack = std::sqrt(kZeroTolerance);
    for (int i = 0; i < m; ++i)
        for (int j = i + 1; j < m; ++j) {
            if (!a.exact) {
                const double bound = slack * std::max(norms(i), norms(j));
                if (std::abs(norms(i) - norms(j)) > bound || std::abs(projections(i) - projections(j)) > rNorm * bound)
                    continue; // certainly not identical
            }
            bool same = true;
            // Compare through the cross-products: |ci - cj|^2 = ci.ci + cj.cj - 2 ci.cj.
            if (a.exact) {
                same = a.crossProducts(i, i).rational() + a.crossProducts(j, j).rational()
                           - 2 * a.crossProducts(i, j).rational() == 0;
            } else {
                // |ci - cj|^2 <= tolerance |ci|^2, with norms that neither overflow nor underflow.
                const double d = (columns.col(i) - columns.col(j)).stableNorm(), ni = columns.col(i).stableNorm();
                same = d == 0.0 || (ni > 0 && (d / ni) * (d / ni) <= kZeroTolerance);
            }
            if (same) {
                TextBuilder t;
                (t << u"columns ").appendInt(i + 1) << u" and ";
                t.appendInt(j + 1) << u" are identical";
                addFinding(a, S::Problem, T::Rank, t.toString(), i, j);
            }
        }
    // Non-orthogonal pairs, summarised when there are many.
    auto pairs = [&](const SquareTable<bool> &orth, QStringView how, const SquareTable<Weight> &values) {
        constexpr int kListed = 6;
        TextBuilder list;
        int count = 0;
        for (int i = 0; i < m; ++i)
            for (int j = i + 1; j < m; ++j) {
                if (orth(i, j) || ++count > kListed)
                    continue;
                if (count > 1)
                    list << u", ";
                list.appendInt(i + 1) << u" and ";
                list.appendInt(j + 1) << u" (";
                appendShownValue(list, values(i, j)) << u')';
            }
        if (count == 0)
            return;
        TextBuilder msg;
        msg.appendInt(count) << u" of ";
        msg.appendInt(static_cast<long long>(m) * (m - 1) / 2) << u" column pairs are not orthogonal " << how << u": " << list.view();
        if (count > kListed)
            msg << u", ...";
        addFinding(a, S::Info, T::Orthogonality, msg.toString());
    };
    pairs(a.orthogonal, u"as written (cross-product in brackets)", a.crossProducts);
    pairs(a.orthogonalInDesign, u"under the planned n (centred, n-weighted cross-product in brackets)", a.designCrossProducts);

    if (a.conditionNumber && !a.exact && *a.conditionNumber >= kPrecisionWarning) {
        addFinding(a, S::Caution, T::Collinearity,
                   u"condition number %1: the floating-point hypotheses may have lost about %2 of their 16 significant "
                   "digits; give exact weights (fractions, at most %3 levels) to have them computed exactly"_s
                       .arg(QString::number(*a.conditionNumber, 'g', 2))
                       .arg(int(std::floor(std::log10(*a.conditionNumber))))
                       .arg(kExactLevelLimit));
    } else if (!a.conditionNumber && a.fullRank) {
        addFinding(a, S::Caution, T::Collinearity,
                   u"the coding is singular to floating-point precision (condition number above about 1e15)%1"_s.arg(
                       a.exact ? u" although exact arithmetic finds full rank: the hypotheses shown are exact, but a "
                                 "floating-point fit of this coding is unreliable"_s
                               : QString()));
    }
    if (a.conditionNumber) {
        for (size_t i = 0; i < a.conditionIndices.size(); ++i)
            if (a.conditionIndices[i] >= kConditionIndexFlag) {
                addFinding(a, S::Caution, T::Collinearity,
                           u"condition number %1: at least one condition index is 30 or more, a sign of strong collinearity "
                           "(Belsley, Kuh & Welsch 1980; the threshold is common practice)"_s
                               .arg(QString::number(*a.conditionNumber, 'g', 4)));
                break;
            }
    }
    for (int j = 0; j < m; ++j) {
        const auto &v = a.vif[size_t(j)];
        if (!v || *v < kVifCaution)
            continue;
        const bool serious = *v >= kVifProblem;
        TextBuilder t;
        appendColumnLabel(t, a, j) << u" has VIF ";
        t.appendGeneral(*v, 4) << (serious ? u" (10 or more: serious collinearity, common practice)"
                                           : u" (5 or more: notable collinearity, common practice)");
        addFinding(a, serious ? S::Problem : S::Caution, T::Collinearity, t.toString(), j);
    }
    bool anyUndefined = false;
    for (int j = 0; j < m; ++j) {
        if (std::isnan(a.correlation(j, j))) { // NaN marks a constant column
            TextBuilder t;
            appendColumnLabel(t, a, j) << u" is constant across the levels: its VIF and correlations are undefined";
            addFinding(a, S::Caution, T::Collinearity, t.toString(), j);
        } else if (!a.vif[size_t(j)]) {
            anyUndefined = true;
        }
    }
    if (anyUndefined)
        addFinding(a, S::Caution, T::Collinearity,
                   u"VIF is undefined: the centred coding columns are linearly dependent (for example one-hot columns always sum to 1)"_s);
}

// The steps of analyze(), in the order it takes them.

// Counts and names: levels, coding columns and coefficients (the intercept first).
Analysis namesAndCounts(const Scheme &s)
{
    Analysis a;
    a.levelCount = s.levelCount();
    a.columnCount = s.columnCount();
    a.intercept = s.intercept;
    a.coefficientCount = a.columnCount + (s.intercept ? 1 : 0);
    a.levels = s.factor.levels;
    a.columnNames.reserve(a.columnCount);
    for (const Column &c : s.columns)
        a.columnNames << c.name;
    a.coefficientNames.reserve(a.coefficientCount);
    if (s.intercept)
        a.coefficientNames << kInterceptName.toString();
    a.coefficientNames << a.columnNames;
    return a;
}

// Exact arithmetic when every weight is a fraction and k is small enough; says why not otherwise.
void chooseArithmetic(Analysis &a, const Scheme &s)
{
    const bool allExact = s.allExact();
    a.exact = allExact && a.levelCount <= kExactLevelLimit;
    if (!allExact)
        addFinding(a, Finding::Severity::Info, Finding::Topic::ExactPath,
                   u"some weights are not exact fractions (for example orthonormal trends), so results are computed in floating point"_s);
    else if (a.levelCount > kExactLevelLimit)
        addFinding(a, Finding::Severity::Info, Finding::Topic::ExactPath,
                   u"%1 levels is above the exact-arithmetic limit of %2: results are computed in floating point and fractions are recognised from doubles"_s
                       .arg(a.levelCount).arg(kExactLevelLimit));
}

// The design X = [1 | C] (or C) in floating point, with what every later step shares.
struct FloatingDesign
{
    Eigen::VectorXd n;      // planned n per level
    Eigen::MatrixXd c;      // the coding columns, k x m
    Eigen::VectorXd scale;  // a power of two per column of X (see columnScales)
    Eigen::MatrixXd xs;     // X times scale
    std::optional<Eigen::MatrixXd> xsInverse; // xs^-1 when X is square
    Eigen::MatrixXd gram;   // xs' diag(n) xs
};

FloatingDesign floatingDesign(const Scheme &s, const std::vector<Rational> &nq, int p)
{
    const int k = s.levelCount(), m = s.columnCount();
    FloatingDesign d;
    d.n.resize(k);
    for (int i = 0; i < k; ++i)
        d.n(i) = nq[size_t(i)].get_d();
    d.c.resize(k, m);
    for (int j = 0; j < m; ++j)
        for (int i = 0; i < k; ++i)
            d.c(i, j) = s.columns[size_t(j)].weights[size_t(i)].value();
    Eigen::MatrixXd x(k, p);
    if (s.intercept)
        x.col(0).setOnes();
    x.rightCols(m) = d.c;
    // Floating work uses columns scaled by powers of two (exact; see columnScales).
    d.scale = columnScales(x);
    d.xs = x * d.scale.asDiagonal();
    // A square design's inverse serves the floating hypotheses and the small singular values.
    if (p == k)
        d.xsInverse = d.xs.partialPivLu().inverse();
    // X' diag(n) X of the scaled columns: serves the singular values and the column diagnostics.
    d.gram = symmetricProduct(d.n.cwiseSqrt().asDiagonal() * d.xs);
    return d;
}

// X with exact entries, for the exact path.
RationalMatrix exactDesign(const Scheme &s, int p)
{
    const int k = s.levelCount(), m = s.columnCount();
    const int first = s.intercept ? 1 : 0;
    RationalMatrix xq(k, p);
    for (int i = 0; i < k; ++i) {
        if (s.intercept)
            xq(i, 0) = 1;
        for (int j = 0; j < m; ++j)
            xq(i, j + first) = s.columns[size_t(j)].weights[size_t(i)].rational();
    }
    return xq;
}

// Rank and dependencies: exact elimination on the exact path (which also inverts a square X),
// column-by-column Gram-Schmidt when the singular values say the design is near singular.
std::optional<RationalMatrix> rankAndDependencies(Analysis &a, const FloatingDesign &d, const Scaled &sc,
                                                  const RationalMatrix &xq)
{
    const int p = a.coefficientCount;
    std::optional<RationalMatrix> xInverse;
    if (a.exact)
        xInverse = exactRankAndInverse(a, xq);
    else if (sc.anyZeroColumn || sc.sv(p - 1) <= sc.sv(0) * 1e-10)
        floatRank(a, d.xs, d.scale); // near-singular: find the dependencies column by column
    else
        a.rank = p; // well-conditioned: certainly full rank
    a.fullRank = a.rank == p;
    return xInverse;
}

// Condition number and condition indices from the singular values of the scaled design.
void conditionFromSingularValues(Analysis &a, const Scaled &sc)
{
    const int k = a.levelCount, p = a.coefficientCount;
    const double smax = sc.sv(0);
    const double smin = sc.sv(p - 1);
    const double negligible = smax * double(std::max(k, p)) * kEps;
    const bool singular = !a.fullRank || sc.anyZeroColumn || smin <= negligible;
    if (!singular)
        a.conditionNumber = smax / smin;
    a.conditionIndices.resize(size_t(p));
    for (int i = 0; i < p; ++i) {
        const double sv = sc.sv(p - 1 - i);
        a.conditionIndices[size_t(i)] = sv > negligible ? smax / sv : std::numeric_limits<double>::infinity();
    }
    std::sort(a.conditionIndices.begin(), a.conditionIndices.end());
}

// Exact hypotheses: X^-1 for a square X, else (X'WX)^-1 X'W.
void exactHypotheses(Analysis &a, const RationalMatrix &xq, const std::optional<RationalMatrix> &xInverse,
                     const std::vector<Rational> &nq)
{
    const int k = a.levelCount, p = a.coefficientCount;
    RationalMatrix h;
    if (p == k) {
        h = *xInverse;
    } else {
        RationalMatrix xtw = xq.transposed();
        for (int r = 0; r < p; ++r)
            for (int i = 0; i < k; ++i)
                xtw(r, i) *= nq[size_t(i)];
        h = *(xtw * xq).inverse() * xtw;
    }
    a.hypotheses = toWeights(h);
}

// Floating hypotheses: LU inverse (square), LDLT of X'WX, or the SVD pseudo-inverse when the
// scaled design is ill-conditioned. A result that is not finite is reported, not shown.
void floatingHypotheses(Analysis &a, const FloatingDesign &d, const Scaled &sc)
{
    const int k = a.levelCount, p = a.coefficientCount;
    // For X = Xs S^-1 the hypotheses are S (Xs' W Xs)^-1 Xs' W: rows scaled back below.
    Eigen::MatrixXd h;
    if (p == k) {
        h = *d.xsInverse;
    } else if (!sc.usedSvd) {
        const Eigen::MatrixXd xtw = d.xs.transpose() * d.n.asDiagonal();
        h = (xtw * d.xs).ldlt().solve(xtw);
    } else {
        // pinv(diag(sqrt n) X) diag(sqrt n) = D^-1 V S^-1 U' diag(sqrt n), with Z = diag(sqrt n) X D^-1.
        const Eigen::MatrixXd vs = sc.svd.matrixV() * sc.sv.cwiseInverse().asDiagonal();
        h = sc.colNorm.cwiseInverse().asDiagonal() * vs * sc.svd.matrixU().transpose() * d.n.cwiseSqrt().asDiagonal();
    }
    h = d.scale.asDiagonal() * h;
    if (h.allFinite()) {
        a.hypotheses = toWeights(h);
        return;
    }
    // Planned sizes of wildly different magnitudes can make the weighted design singular
    // to working precision although the coding has full rank: no number is shown.
    a.fullRank = false;
    addFinding(a, Finding::Severity::Problem, Finding::Topic::Rank,
               u"the hypotheses cannot be computed in floating point: weighted by the planned n, the design is "
               "singular to working precision; use planned sizes of less different magnitudes, or exact weights "
               "(at most %1 levels)"_s.arg(kExactLevelLimit));
}

// Each coefficient's hypothesis in symbols, in words and as a combination of level means.
void hypothesisTexts(Analysis &a, const std::vector<Rational> &nq)
{
    const int p = a.coefficientCount;
    for (QStringList *texts : {&a.hypothesisSymbols, &a.hypothesisWords, &a.hypothesisCombinations})
        texts->reserve(p);
    for (int r = 0; r < p; ++r) {
        const bool isIntercept = a.intercept && r == 0;
        TextBuilder label;
        (label << u"b").appendInt(a.intercept ? r : r + 1);
        const HypothesisText t = describeHypothesis(a.hypotheses[size_t(r)], a.levels, nq, isIntercept, label.view());
        a.hypothesisSymbols << t.symbols;
        a.hypothesisWords << t.words;
        a.hypothesisCombinations << t.combination;
    }
}

// The hypotheses each coefficient tests, exactly or in floating point, and their texts;
// a problem finding instead when the coefficients are not identifiable.
void impliedHypotheses(Analysis &a, const FloatingDesign &d, const Scaled &sc, const RationalMatrix &xq,
                       const std::optional<RationalMatrix> &xInverse, const std::vector<Rational> &nq)
{
    const int k = a.levelCount, m = a.columnCount, p = a.coefficientCount;
    a.dependsOnSizes = p < k;
    if (!a.fullRank) {
        addFinding(a, Finding::Severity::Problem, Finding::Topic::Rank,
                   u"rank %1 of %2: the coefficients are not identifiable, so no hypotheses can be given. Dependent: %3"_s
                       .arg(a.rank).arg(p).arg(a.dependencies.join(u"; "_s)));
        return;
    }
    if (a.exact)
        exactHypotheses(a, xq, xInverse, nq);
    else
        floatingHypotheses(a, d, sc);
    if (!a.fullRank)
        return;
    a.hypothesisValues = toDouble(a.hypotheses);
    if (a.dependsOnSizes)
        addFinding(a, Finding::Severity::Caution, Finding::Topic::DependsOnSizes,
                   u"%1 coding columns for %2 levels: the model is not saturated, so each coefficient is a least-squares "
                   "combination that depends on the group sizes (here the planned n); with other sizes it tests something else"_s
                       .arg(m).arg(k));
    hypothesisTexts(a, nq);
}

} // namespace

QString coefficientLabel(bool intercept, int index, const QString &name)
{
    return u"b%1 %2"_s.arg(intercept ? index : index + 1).arg(name);
}

Analysis analyze(const Scheme &s, AnalysisScope scope)
{
    Analysis a = namesAndCounts(s);
    if (QString e = s.validate(); !e.isEmpty()) {
        addFinding(a, Finding::Severity::Problem, Finding::Topic::Rank, e);
        return a;
    }
    chooseArithmetic(a, s);
    const int m = a.columnCount, p = a.coefficientCount;
    const std::vector<Rational> nq = s.factor.sizes();
    const FloatingDesign d = floatingDesign(s, nq, p);

    // Collinearity (always floating: singular values are irrational).
    Scaled sc;
    scaledSingularValues(sc, d.xs, d.n.cwiseSqrt(), d.gram, d.xsInverse ? &*d.xsInverse : nullptr);

    const RationalMatrix xq = a.exact ? exactDesign(s, p) : RationalMatrix();
    const std::optional<RationalMatrix> xInverse = rankAndDependencies(a, d, sc, xq);
    conditionFromSingularValues(a, sc);
    impliedHypotheses(a, d, sc, xq, xInverse, nq);
    if (scope == AnalysisScope::Hypotheses)
        return a;

    // The scaled inverse gives the VIFs of a square design with an intercept (floating path only).
    const bool inverseForVif = !a.exact && a.fullRank && s.intercept && d.xsInverse && a.conditionNumber
                               && *a.conditionNumber < 1e6;
    columnDiagnostics(a, s, a.exact, d.xs.rightCols(m), d.scale.tail(m), d.n, d.gram.bottomRightCorner(m, m),
                      inverseForVif ? &*d.xsInverse : nullptr);
    diagnosticFindings(a, d.c);
    return a;
}

Result<std::vector<Column>> codingFromHypotheses(const Factor &factor, const std::vector<std::vector<Weight>> &rows,
                                                 bool intercept, const std::optional<std::vector<Weight>> &interceptRow)
{
    using R = Result<std::vector<Column>>;
    if (QString e = factor.validate(); !e.isEmpty())
        return R::failure(e);
    const int k = factor.levelCount();
    const int m = int(rows.size());
    if (m == 0)
        return R::failure(u"hypotheses: give at least one row of weights on the level means"_s);
    if (m + (intercept ? 1 : 0) > k)
        return R::failure(u"hypotheses: %1 rows for %2 levels; at most %3 can be tested%4"_s
                              .arg(m).arg(k).arg(intercept ? k - 1 : k).arg(intercept ? u" beside the intercept"_s : QString()));
    for (int r = 0; r < m; ++r)
        if (int(rows[size_t(r)].size()) != k)
            return R::failure(u"hypotheses: row %1 has %2 weights for %3 levels; give one per level"_s.arg(r + 1).arg(rows[size_t(r)].size()).arg(k));
    std::vector<std::vector<Weight>> all;
    if (intercept) {
        std::vector<Weight> h0 = interceptRow.value_or(std::vector<Weight>(size_t(k), Weight::exact(Rational(1, k))));
        if (int(h0.size()) != k)
            return R::failure(u"intercept: %1 weights for %2 levels; give one per level"_s.arg(h0.size()).arg(k));
        all.push_back(std::move(h0));
    }
    all.insert(all.end(), rows.begin(), rows.end());
    const int p = int(all.size());
    bool exact = k <= kExactLevelLimit;
    for (const auto &row : all)
        for (const Weight &w : row)
            exact = exact && w.isExact();

    // With an intercept, [1 | C] H' ... requires H 1 = e1: the intercept row sums to 1, the others to 0.
    if (intercept) {
        for (int r = 0; r < p; ++r) {
            Rational sq = 0;
            double sd = 0, sa = 0;
            for (const Weight &w : all[size_t(r)]) {
                if (exact)
                    sq += w.rational();
                sd += w.value();
                sa += std::abs(w.value());
            }
            const Rational want = r == 0 ? 1 : 0;
            const bool okSum = exact ? sq == want : std::abs(sd - want.get_d()) <= kZeroTolerance * std::max(1.0, sa);
            // A sum of 300 digits is shown as a short number.
            const QString exactSum = exact ? rationalToString(sq) : QString();
            const QString sum = exact && exactSum.size() <= 24 ? exactSum : QString::number(exact ? nearestDouble(sq) : sd);
            if (!okSum)
                return R::failure(r == 0 ? u"intercept: its weights sum to %1; with an intercept they must sum to 1"_s.arg(sum)
                                         : u"hypotheses: row %1 sums to %2; with an intercept each comparison must sum to 0 "
                                           "(or turn the intercept off)"_s.arg(r).arg(sum));
        }
    }

    // X = pinv(H) = H' (H H')^-1; for a square H this is its inverse.
    std::vector<std::vector<Weight>> xcols; // p columns of k
    if (exact) {
        RationalMatrix h(p, k);
        for (int r = 0; r < p; ++r)
            for (int i = 0; i < k; ++i)
                h(r, i) = all[size_t(r)][size_t(i)].rational();
        const RationalMatrix ht = h.transposed();
        auto g = (h * ht).inverse();
        if (!g)
            return R::failure(u"hypotheses: the rows are linearly dependent, so no coding can test them all"_s);
        const RationalMatrix x = ht * *g;
        for (int c = 0; c < p; ++c) {
            std::vector<Weight> col;
            for (int i = 0; i < k; ++i)
                col.push_back(Weight::exact(x(i, c)));
            xcols.push_back(std::move(col));
        }
    } else {
        Eigen::MatrixXd h(p, k);
        for (int r = 0; r < p; ++r)
            for (int i = 0; i < k; ++i)
                h(r, i) = all[size_t(r)][size_t(i)].value();
        Eigen::JacobiSVD<Eigen::MatrixXd> svd(h, Eigen::ComputeThinU | Eigen::ComputeThinV);
        const Eigen::VectorXd sv = svd.singularValues();
        if (sv(p - 1) <= sv(0) * double(std::max(k, p)) * kEps)
            return R::failure(u"hypotheses: the rows are linearly dependent, so no coding can test them all"_s);
        const Eigen::MatrixXd x = svd.matrixV() * sv.cwiseInverse().asDiagonal() * svd.matrixU().transpose();
        for (int c = 0; c < p; ++c) {
            std::vector<Weight> col;
            for (int i = 0; i < k; ++i)
                col.push_back(Weight::approx(x(i, c)));
            xcols.push_back(std::move(col));
        }
    }
    std::vector<Column> out;
    for (int c = intercept ? 1 : 0; c < p; ++c)
        out.push_back(Column{u"c%1"_s.arg(intercept ? c : c + 1), std::move(xcols[size_t(c)])});
    return R(std::move(out));
}

Eigen::MatrixXd designRows(const Scheme &scheme)
{
    const Eigen::Index k = scheme.levelCount();
    const Eigen::Index offset = scheme.intercept ? 1 : 0;
    Eigen::MatrixXd X(k, scheme.columnCount() + offset);
    if (offset)
        X.col(0).setOnes();
    for (Eigen::Index c = 0; c < scheme.columnCount(); ++c)
        for (Eigen::Index j = 0; j < k; ++j)
            X(j, c + offset) = scheme.columns[size_t(c)].weights[size_t(j)].value();
    return X;
}

} // namespace cb
