#pragma once

#include "core/model/Design.h"
#include "core/model/PowerPlan.h"
#include "core/base/Result.h"
#include "core/model/Scheme.h"

#include <QString>

namespace cb {

// What the window holds: one factor, or a design of 2-3 crossed factors. With one
// factor, design.factors[0] is the whole scheme (its own intercept and notes) and
// terms and cell n are unused. With two or more, design.intercept and design.notes
// are the study's and every factor's intercept follows design.intercept.
struct Study
{
    Design design;
    int active = 0;          // the factor the coding grid edits
    QString cellSizeNote;    // why the cell sizes were reset (shown beside them); empty normally
    PowerPlan power;         // the power planner's inputs, for the levels (a design: the cells)

    // The names the power plan's levels are kept under: the factor's levels, or the design's cells.
    QStringList powerLevelNames() const { return isDesign() ? design.cellNames() : activeScheme().factor.levels; }

    bool isDesign() const { return design.factors.size() >= 2; }
    int factorCount() const { return int(design.factors.size()); }
    const Scheme &activeScheme() const { return design.factors[size_t(active)]; }
    friend bool operator==(const Study &, const Study &) = default;
};

// The parts of a study that follow from the rest, made consistent: in a design every factor
// shares the design's intercept and notes, and a factor's planned n are its levels' totals over
// the cells (equal when the cells are, or when a level has no planned observations), so its
// one-factor panels and its n-dependent codings (weighted-effect) read the design's sizes. The
// power plan keeps the values of the current levels or cells only (prunedPlan).
// settled() (core/analysis/Settled.h) does this and then names the columns.
Study consistent(Study study);

// Pure edits, like SchemeEdits: each returns the next study or says why not.
Study studyOf(Scheme scheme);
// Replaces the active factor. Cell sizes follow the level names (a renamed level keeps its
// place when the count is unchanged); when they cannot, they go back to equal with a note.
Study withActiveScheme(const Study &study, Scheme next);
// A starter factor (two levels, centred +1/2 -1/2 coding) with a name not yet used.
Result<Study> withFactorAdded(const Study &study);
Result<Study> withFactorRemoved(const Study &study, int factor);
Result<Study> withActiveFactor(const Study &study, int factor);
// Includes or leaves out one term (kept in the order of candidateTerms()).
Result<Study> withTerm(const Study &study, const Term &term, bool included);
// Sets one cell's planned n (A-major index); equal sizes become explicit ones first.
Result<Study> withCellSize(const Study &study, int cell, const QString &text);
Study withEqualCellSizes(const Study &study);
Study withPowerPlan(Study study, PowerPlan plan);

// The terms one can choose for a design of `factorCount` factors: main effects,
// interactions, then each factor nested within each other one.
std::vector<Term> candidateTerms(int factorCount);
bool sameTerm(const Term &a, const Term &b);

} // namespace cb
