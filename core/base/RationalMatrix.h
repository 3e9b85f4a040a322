#pragma once

#include "core/base/Weight.h"

#include <optional>
#include <vector>

namespace cb {

// A small dense matrix of exact rationals for the exact path (k up to a few dozen).
// Decompositions of floating matrices use Eigen; this class only does exact
// elimination, where every step is exact and no pivoting strategy is needed for accuracy.
class RationalMatrix
{
public:
    RationalMatrix() = default;
    RationalMatrix(int rows, int cols) : m_rows(rows), m_cols(cols), m_data(size_t(rows) * size_t(cols), Rational(0)) {}

    int rows() const { return m_rows; }
    int cols() const { return m_cols; }
    Rational &operator()(int r, int c) { return m_data[size_t(r) * size_t(m_cols) + size_t(c)]; }
    const Rational &operator()(int r, int c) const { return m_data[size_t(r) * size_t(m_cols) + size_t(c)]; }

    RationalMatrix transposed() const;
    RationalMatrix operator*(const RationalMatrix &other) const;

    struct Echelon;
    // Reduced row echelon form with the pivot column of each non-zero row.
    Echelon echelon() const;
    int rank() const;
    // The inverse of a square matrix, or nullopt when singular.
    std::optional<RationalMatrix> inverse() const;

private:
    int m_rows = 0;
    int m_cols = 0;
    std::vector<Rational> m_data;
};

struct RationalMatrix::Echelon
{
    RationalMatrix reduced;
    std::vector<int> pivots;
};

} // namespace cb
