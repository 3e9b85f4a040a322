#pragma once

#include "core/analysis/Analysis.h"
#include "core/model/Design.h"

#include <QString>
#include <QStringList>

#include <vector>

namespace cb {

// A design with empty cells (planned n = 0, or no rows in the data) is analysed over the cells
// that have observations: the design matrix X_r is X's rows for those cells, and the design's terms
// can be estimated when X_r has full column rank. The hypotheses are then the rows of
// (X_r' N_r X_r)^-1 X_r' N_r over those cells (X_r^-1 when as many cells remain as coefficients),
// and each is compared with what the same coefficient tests in the full design.

// One coefficient whose hypothesis the empty cells change.
struct HypothesisShift
{
    int coefficient = 0;            // row of the hypothesis matrix (0 is the intercept when there is one)
    QString label;                  // "b3 late vs early"
    QString term;                   // its term, "mowing"
    QString before;                 // its combination of cell means in the full design
    QString after;                  // ... over the cells with observations
    std::vector<Weight> beforeRow;  // weights over every cell of the design
    std::vector<Weight> afterRow;   // ... 0 at the empty cells
    QStringList emptyWeights;       // "grass·late 1/3": weights the full design put on the empty cells
    QStringList reweighted;         // "bare·late 1/3 → 5/9": other cells whose weight changes
    QString words;                  // the sentence the reports and the window show
};

// A coefficient that cannot be estimated from the cells with observations.
struct UnestimableCoefficient
{
    int coefficient = 0;
    QString label;
    QString term;
    bool onlyInEmptyCells = false; // its column is 0 at every cell with observations
};

struct EmptyCellEffects
{
    QStringList emptyCells;      // names, in the design's cell order
    QString why;                 // "planned n = 0" or "no rows in the data"
    bool estimable = true;
    int rank = 0;                // of X_r
    int coefficients = 0;        // columns of X (p)
    std::vector<UnestimableCoefficient> unestimable;
    QStringList leaveOut;        // terms whose removal alone makes the rest estimable, highest order first
    QString refusal;             // the reason, naming the cells and terms, when not estimable
    // The full design the hypotheses are compared with: the same terms, every empty cell at the mean
    // size of the others (fullCellN, written as a fraction).
    QString fullCellN;
    std::vector<HypothesisShift> shifts;
    QStringList unchanged;       // labels of the coefficients that test the same as in the full design
    QString summary;             // one sentence: which coefficients test something different
};

// Cell sizes with each empty cell (0) replaced by the mean of the others; empty when d has none.
std::vector<Rational> filledCellN(const Design &d);

// The check and the comparison. cellsScheme: cellScheme(d) over every cell; kept: the cells with
// observations (ascending indices); reduced: the analysis over those cells (nullptr when the terms
// are not estimable, which this function decides first: call it with nullptr, then again with the
// analysis when estimable). why: how the cells are empty, for the messages.
EmptyCellEffects checkEmptyCells(const Design &d, const Scheme &cellsScheme, const std::vector<int> &kept, const QString &why);
void compareWithFullDesign(EmptyCellEffects &effects, const Design &d, const std::vector<int> &kept, const Analysis &reduced);

// The scheme over the kept cells only: their names as levels, the columns' weights at those cells,
// their planned sizes.
Scheme keptCellsScheme(const Scheme &cellsScheme, const std::vector<int> &kept, const std::vector<Rational> &cellN);

// A row over the kept cells, written over every cell (0 at the empty ones).
std::vector<Weight> overAllCells(const std::vector<Weight> &row, const std::vector<int> &kept, int cellCount);

} // namespace cb
