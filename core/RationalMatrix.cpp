#include "RationalMatrix.h"

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

RationalMatrix::Echelon RationalMatrix::echelon() const
{
    Echelon e{*this, {}};
    RationalMatrix &a = e.reduced;
    int row = 0;
    Rational factor, term;
    for (int col = 0; col < m_cols && row < m_rows; ++col) {
        int pivot = -1;
        for (int r = row; r < m_rows; ++r)
            if (a(r, col) != 0) {
                pivot = r;
                break;
            }
        if (pivot < 0)
            continue;
        if (pivot != row)
            for (int c = 0; c < m_cols; ++c)
                std::swap(a(pivot, c), a(row, c));
        const Rational inv = 1 / a(row, col);
        for (int c = col; c < m_cols; ++c)
            a(row, c) *= inv;
        for (int r = 0; r < m_rows; ++r) {
            if (r == row || a(r, col) == 0)
                continue;
            factor = a(r, col);
            for (int c = col; c < m_cols; ++c) {
                if (a(row, c) == 0)
                    continue;
                term = factor * a(row, c);
                a(r, c) -= term;
            }
        }
        e.pivots.push_back(col);
        ++row;
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
