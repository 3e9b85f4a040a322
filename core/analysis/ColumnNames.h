#pragma once

#include "core/analysis/Analysis.h"
#include "core/model/Scheme.h"

#include <QString>

#include <vector>

// Column names that say what the column tests (DEVELOPERS.md, "Column names").
namespace cb {

// The name the tool gives coding column `column` after what its coefficient tests in `analysis`
// (the analysis of `scheme`). A standard scheme's columns keep the names of its definition
// ("B vs A", "A vs mean", "linear"). Otherwise the hypothesis is named when it has a short form:
// "C vs A" (one level minus another), "1/2 (A, B vs C)" (a scaled difference of two averages),
// "A vs later", "D vs earlier", "B vs others", "A vs mean", "A vs weighted mean", "linear" (a
// polynomial trend over the positions), "A" or "mean of A, B" (a mean itself, without an
// intercept); else its combination of level means when short ("(2 A + B)/3 - C"), else
// "column 2". A rank-deficient coding tests nothing identifiable: "column 2".
QString generatedColumnName(const Scheme &scheme, const Analysis &analysis, int column);

// A column the user named whose hypothesis is no longer the one it was named for.
bool nameIsStale(const Scheme &scheme, const Analysis &analysis, int column);

// The naming pass (run by settled() on every study): in a custom scheme every column the user
// has not named takes its generated name, and a named column without namedFor records the
// hypothesis it tests now. Analyses the scheme only when something needs it.
Scheme withCurrentNames(Scheme scheme);

} // namespace cb
