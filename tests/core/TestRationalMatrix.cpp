// The exact elimination (fraction-free Gauss–Jordan) against the textbook Gauss–Jordan
// elimination on rationals, written out here as the reference, on random matrices: square
// and wide, full rank and rank deficient (repeated, combined and zero rows and columns).
#include "core/base/RationalMatrix.h"

#include <QTest>

#include <random>

using namespace cb;

class TestRationalMatrix : public QObject
{
    Q_OBJECT
private slots:
    void echelonMatchesTextbookGaussJordan();
    void inverseTimesMatrixIsIdentity();
    void singularMatrixHasNoInverse();
};

namespace {

// Textbook Gauss–Jordan on rationals: scale the pivot row to 1, clear the column above and below.
RationalMatrix::Echelon textbookEchelon(const RationalMatrix &m)
{
    RationalMatrix a = m;
    std::vector<int> pivots;
    int row = 0;
    for (int col = 0; col < a.cols() && row < a.rows(); ++col) {
        int pivot = row;
        while (pivot < a.rows() && a(pivot, col) == 0)
            ++pivot;
        if (pivot == a.rows())
            continue;
        for (int c = 0; c < a.cols(); ++c)
            std::swap(a(pivot, c), a(row, c));
        const Rational inv = 1 / a(row, col);
        for (int c = 0; c < a.cols(); ++c)
            a(row, c) *= inv;
        for (int r = 0; r < a.rows(); ++r)
            if (r != row) {
                const Rational f = a(r, col);
                for (int c = 0; c < a.cols(); ++c)
                    a(r, c) -= f * a(row, c);
            }
        pivots.push_back(col);
        ++row;
    }
    return {a, pivots};
}

// GMP compares rationals in canonical form only.
Rational frac(int num, int den)
{
    Rational q(num, den);
    q.canonicalize();
    return q;
}

RationalMatrix randomMatrix(std::mt19937 &rng, int rows, int cols)
{
    std::uniform_int_distribution<int> num(-9, 9), den(1, 7), pct(0, 99);
    RationalMatrix m(rows, cols);
    for (int r = 0; r < rows; ++r)
        for (int c = 0; c < cols; ++c)
            m(r, c) = pct(rng) < 20 ? Rational(0) : frac(num(rng), den(rng));
    // Rank deficiency in about half: a repeated row, a combination of rows, a zero column.
    const int kind = pct(rng) % 6;
    if (rows >= 3 && kind == 0)
        for (int c = 0; c < cols; ++c)
            m(2, c) = m(0, c);
    if (rows >= 3 && kind == 1)
        for (int c = 0; c < cols; ++c)
            m(rows - 1, c) = Rational(2, 3) * m(0, c) - m(1, c);
    if (kind == 2)
        for (int r = 0; r < rows; ++r)
            m(r, cols / 2) = 0;
    return m;
}

} // namespace

void TestRationalMatrix::echelonMatchesTextbookGaussJordan()
{
    std::mt19937 rng(31337u);
    int deficient = 0;
    for (int trial = 0; trial < 300; ++trial) {
        const int rows = 1 + int(rng() % 9), cols = 1 + int(rng() % 14);
        const RationalMatrix m = randomMatrix(rng, rows, cols);
        const RationalMatrix::Echelon got = m.echelon(), want = textbookEchelon(m);
        QCOMPARE(got.pivots, want.pivots);
        for (int r = 0; r < rows; ++r)
            for (int c = 0; c < cols; ++c)
                QVERIFY2(got.reduced(r, c) == want.reduced(r, c),
                         qPrintable(QStringLiteral("trial %1, entry (%2, %3)").arg(trial).arg(r).arg(c)));
        deficient += int(got.pivots.size()) < std::min(rows, cols) ? 1 : 0;
    }
    QVERIFY(deficient >= 50); // the mix really covered rank-deficient matrices
}

void TestRationalMatrix::inverseTimesMatrixIsIdentity()
{
    std::mt19937 rng(4242u);
    for (int n : {1, 2, 5, 12, 30}) {
        RationalMatrix m(n, n);
        std::uniform_int_distribution<int> num(-20, 20), den(1, 9);
        for (int r = 0; r < n; ++r)
            for (int c = 0; c < n; ++c)
                m(r, c) = frac(num(rng), den(rng)) + (r == c ? Rational(50) : Rational(0)); // diagonally dominant: invertible
        const auto inv = m.inverse();
        QVERIFY(inv.has_value());
        const RationalMatrix product = m * *inv;
        for (int r = 0; r < n; ++r)
            for (int c = 0; c < n; ++c)
                QVERIFY(product(r, c) == (r == c ? 1 : 0));
    }
}

void TestRationalMatrix::singularMatrixHasNoInverse()
{
    RationalMatrix m(3, 3);
    const int values[3][3] = {{1, 2, 3}, {4, 5, 6}, {7, 8, 9}}; // row 3 = 2 row 2 - row 1
    for (int r = 0; r < 3; ++r)
        for (int c = 0; c < 3; ++c)
            m(r, c) = values[r][c];
    QVERIFY(!m.inverse().has_value());
    QCOMPARE(m.rank(), 2);
}

QTEST_GUILESS_MAIN(TestRationalMatrix)
#include "TestRationalMatrix.moc"
