#pragma once

#include "core/base/Result.h"
#include "core/model/Scheme.h"

#include <QString>
#include <QStringList>

#include <string_view>
#include <vector>

namespace cb {

// Joins the parts of a crossed name: terms ("margin × mowing"), interaction columns
// ("wide vs narrow × late vs early") and the name of a design's cell factor.
inline constexpr QStringView kCrossJoiner = u" \u00d7 ";
// Joins a cell's levels, the first factor first: "grass·early" (a middle dot, UTF-8 here: a
// slash or a colon would read as division or a formula operator in hypothesis texts such as
// "(grass·late - bare·late)/2"). The data reader joins a row's factor values the same
// way, so a data file's cells match the design's.
inline constexpr std::string_view kCellJoiner = "\u00b7";
inline QString cellJoiner()
{
    return QString::fromUtf8(kCellJoiner.data(), qsizetype(kCellJoiner.size()));
}

// A term of a crossed design: a main effect ({A}), an interaction ({A, B}, {A, B, C}),
// or a factor's contrasts nested within each level of another (factors = {A}, within = B).
struct Term
{
    std::vector<int> factors; // indices into Design::factors, ascending
    int within = -1;          // for nested terms: the factor whose levels split A's contrasts
    friend bool operator==(const Term &, const Term &) = default;
};

// Two or three crossed factors, each with its own coding; cells are all level
// combinations, ordered with the first factor varying slowest ("A-major").
struct Design
{
    std::vector<Scheme> factors; // each with its factor (name, levels) and coding columns
    std::vector<Term> terms;
    std::vector<Rational> cellN; // planned n per cell, A-major; empty means equal; 0 marks an empty cell
    bool intercept = true;
    QString notes;

    int cellCount() const;
    QStringList cellNames() const; // "weekly·sandy" (levels joined by kCellJoiner)
    // Empty when valid; otherwise names the field and what was expected.
    QString validate() const;
    // The full factorial model: every main effect and every interaction.
    static std::vector<Term> fullFactorial(int factorCount);
    friend bool operator==(const Design &, const Design &) = default;
};

// A cell's level index for each factor, and back (A-major: the first factor varies slowest).
std::vector<int> cellLevels(const Design &design, int cell);
int cellIndex(const Design &design, const std::vector<int> &levels);

QString termName(const Design &design, const Term &term); // "A", "A x B", "A within B"

// The design as one factor whose levels are the cells, columns the Kronecker products
// of the factors' codings (C_A (x) C_B ...), with constant vectors for factors not in a term.
Result<Scheme> cellScheme(const Design &design);
// The columns one term contributes to cellScheme().
std::vector<Column> termColumns(const Design &design, const Term &term);
// A factor's name in messages and files, "A", "B", ... when it has none.
QString factorLabel(const Design &design, int factor);

} // namespace cb
