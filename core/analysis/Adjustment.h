#pragma once

#include <QString>

#include <optional>

namespace cb {

// How a family of contrasts is protected against multiplicity: a fit adjusts its p-values
// (adjustPValues, core/data/DataFit.h), power planning its per-test alpha (perTestAlpha,
// core/power/Power.h). Holm's step-down procedure needs the observed p-values, so power
// planning offers the others only (adjustsPower).
enum class Adjustment {
    None,
    Bonferroni, // p: min(1, m p); alpha: alpha / m
    Holm,       // step-down Bonferroni (Holm 1979, Scand. J. Statist. 6:65-70)
    Sidak,      // p: 1 - (1 - p)^m; alpha: 1 - (1 - alpha)^(1/m) (Sidak 1967, JASA 62:626-633)
};

QString adjustmentId(Adjustment adjustment);    // "none", "bonferroni", "holm", "sidak"
QString adjustmentTitle(Adjustment adjustment); // "None", "Bonferroni", "Holm (step-down)", "Šidák"
// Read as every id is read (core/base/NameTable.h).
std::optional<Adjustment> adjustmentFromId(const QString &id);
bool adjustsPower(Adjustment adjustment);
// "none, bonferroni, holm or sidak"; for power "none, bonferroni or sidak".
QString adjustmentIdList(bool forPower);

} // namespace cb
