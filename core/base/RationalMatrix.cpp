#include "core/base/RationalMatrix.h"

#include <utility>

namespace cb {

RationalMatrix RationalMatrix::transposed() const
{
    RationalMatrix t(m_cols, m_rows);
    for (int r = 0; r < m_rows; ++r)
        for (int c = 0; c < m_cols; ++c)
            t(c, r) = (*this)(r, c);
    return t;
}

RationalMatrix RationalMatrix::operator*(const RationalMatrix &o) const
{
    RationalMatrix out(m_rows, o.m_cols);
    Rational term;
    for (int r = 0; r < m_rows; ++r)
        for (int i = 0; i < m_cols; ++i) {
            const Rational &a = (*this)(r, i);
            if (a == 0)
                continue;
            for (int c = 0; c < o.m_cols; ++c) {
                const Rational &b = o(i, c);
                if (b == 0)
                    continue;
                term = a * b;
                out(r, c) += term;
            }
        }
    return out;
}

// Fraction-free Gauss–Jordan elimination (Bareiss 1968, Math. Comp. 22(103), extended to the
// rows above the pivot): each row is first scaled to integers by the lcm of its denominators,
// which leaves the reduced form unchanged; every entry then stays a minor of that integer
// matrix, so each step's division by the previous pivot is exact and needs no gcd. The
// fractions are formed once, at the end, by dividing each row by its pivot.
RationalMatrix::Echelon RationalMatrix::echelon() const
{
    const int rows = m_rows, cols = m_cols;
    std::vector<mpz_class> a(size_t(rows) * size_t(cols));
    const auto at = [&](int r, int c) -> mpz_class & { return a[size_t(r) * size_t(cols) + size_t(c)]; };
    mpz_class scale;
    for (int r = 0; r < rows; ++r) {
        scale = 1;
        for (int c = 0; c < cols; ++c)
            mpz_lcm(scale.get_mpz_t(), scale.get_mpz_t(), (*this)(r, c).get_den_mpz_t());
        for (int c = 0; c < cols; ++c) {
            const Rational &q = (*this)(r, c);
            mpz_divexact(at(r, c).get_mpz_t(), scale.get_mpz_t(), q.get_den_mpz_t());
            at(r, c) *= q.get_num();
        }
    }
    Echelon e;
    mpz_class previous = 1, pivotValue, factor, t;
    int row = 0;
    for (int col = 0; col < cols && row < rows; ++col) {
        int pivot = -1;
        for (int r = row; r < rows; ++r)
            if (at(r, col) != 0) {
                pivot = r;
                break;
            }
        if (pivot < 0)
            continue;
        if (pivot != row)
            for (int c = 0; c < cols; ++c)
                std::swap(at(pivot, c), at(row, c));
        pivotValue = at(row, col);
        for (int r = 0; r < rows; ++r) {
            if (r == row)
                continue;
            factor = at(r, col);
            // a(r, c) = (pivot a(r, c) - factor a(row, c)) / previous, exactly.
            for (int c = 0; c < cols; ++c) {
                mpz_class &x = at(r, c);
                const mpz_class &y = at(row, c);
                if (x == 0 && (factor == 0 || y == 0))
                    continue;
                x *= pivotValue;
                if (factor != 0 && y != 0) {
                    t = factor * y;
                    x -= t;
                }
                mpz_divexact(x.get_mpz_t(), x.get_mpz_t(), previous.get_mpz_t());
            }
        }
        previous = pivotValue;
        e.pivots.push_back(col);
        ++row;
    }
    // Every pivot now equals the last one; each row divided by it is the reduced form.
    e.reduced = RationalMatrix(rows, cols);
    for (int r = 0; r < int(e.pivots.size()); ++r)
        for (int c = 0; c < cols; ++c) {
            if (at(r, c) == 0)
                continue;
            Rational &q = e.reduced(r, c);
            q.get_num() = at(r, c);
            q.get_den() = previous;
            q.canonicalize();
        }
    return e;
}

int RationalMatrix::rank() const
{
    return int(echelon().pivots.size());
}

std::optional<RationalMatrix> RationalMatrix::inverse() const
{
    if (m_rows != m_cols)
        return std::nullopt;
    const int n = m_rows;
    RationalMatrix aug(n, 2 * n);
    for (int r = 0; r < n; ++r) {
        for (int c = 0; c < n; ++c)
            aug(r, c) = (*this)(r, c);
        aug(r, n + r) = 1;
    }
    const Echelon e = aug.echelon();
    if (int(e.pivots.size()) < n || e.pivots[size_t(n - 1)] != n - 1)
        return std::nullopt;
    RationalMatrix inv(n, n);
    for (int r = 0; r < n; ++r)
        for (int c = 0; c < n; ++c)
            inv(r, c) = e.reduced(r, n + c);
    return inv;
}

} // namespace cb
