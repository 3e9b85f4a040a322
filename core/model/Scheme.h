#pragma once

#include "core/model/Factor.h"
#include "core/base/Weight.h"

#include <QString>
#include <QStringList>

#include <optional>
#include <vector>

namespace cb {

// The standard codings. Each is defined by what its coefficients mean
// (see DEVELOPERS.md, "Schemes").
enum class SchemeKind {
    Indicator,
    Treatment,
    Sum,
    WeightedEffect,
    Simple,
    Helmert,
    ReverseHelmert,
    Successive,
    Polynomial,
    Custom,
};

// Stable identifiers used in files and on the command line: "treatment", "weighted-effect", ...
QString schemeId(SchemeKind kind);
// Names for people: "Treatment (dummy)", ...
QString schemeTitle(SchemeKind kind);
// One sentence saying what the coefficients mean.
QString schemeSummary(SchemeKind kind);
// Reads an id as every id is read (core/base/NameTable.h: spaces and letter case do not count).
std::optional<SchemeKind> schemeFromId(const QString &id);
// "indicator, treatment, ..., polynomial" (and ", custom" when asked), for help texts and messages.
QString schemeIdList(bool withCustom = false);
QList<SchemeKind> standardSchemes(); // all but Custom
bool schemeUsesReference(SchemeKind kind);

// How the polynomial scheme scales its columns.
enum class PolynomialForm {
    Orthonormal, // unit-length columns (floating)
    Integer,     // smallest integer multiples (exact), where the trend values are rational
};

// One coding column: a name and a weight per level.
// A column the user has not named (named == false) is named by the tool after what it tests
// (core/analysis/ColumnNames.h), and the name follows every edit. A column the user named keeps
// its name; namedFor holds the hypothesis row (weights on the level means) it tested when it was
// named, so that the window can say when the column has come to test something else. An empty
// namedFor is filled in with the current hypothesis by the naming pass (withCurrentNames).
struct Column
{
    Column() = default;
    Column(QString name_, std::vector<Weight> weights_) : name(std::move(name_)), weights(std::move(weights_)) {}

    QString name;
    std::vector<Weight> weights;
    bool named = false;
    std::vector<Weight> namedFor;
    friend bool operator==(const Column &, const Column &) = default;
};

// The document: a factor, how it is coded, and notes.
struct Scheme
{
    Factor factor;
    SchemeKind kind = SchemeKind::Custom;
    // Reference level (treatment, simple) or base level coded -1 (sum, weighted effect).
    int reference = -1;
    PolynomialForm polynomialForm = PolynomialForm::Orthonormal;
    bool polynomialWeighted = false; // polynomial trends orthogonal under the planned n
    bool intercept = true;
    std::vector<Column> columns;
    QString notes;

    int levelCount() const { return factor.levelCount(); }
    int columnCount() const { return int(columns.size()); }
    bool allExact() const;
    // Empty when valid: levels valid, every column has one weight per level, 1 <= m <= k (k+1 for indicator).
    QString validate() const;
    friend bool operator==(const Scheme &, const Scheme &) = default;
};

// Options for a standard scheme. reference < 0 means the default:
// the first level for treatment and simple, the last for sum and weighted effect.
struct SchemeOptions
{
    int reference = -1;
    PolynomialForm polynomialForm = PolynomialForm::Orthonormal;
    bool polynomialWeighted = false;
};

int defaultReference(SchemeKind kind, int levelCount);
// The options a standard scheme was made with (its reference only where its kind has one).
SchemeOptions schemeOptions(const Scheme &scheme);

// The columns of a standard scheme for a factor. Fails for Custom, for an
// invalid factor, or for an integer polynomial whose trends are not rational.
Result<std::vector<Column>> standardColumns(const Factor &factor, SchemeKind kind, const SchemeOptions &options = {});

// A whole scheme of the given kind (intercept on, except for indicator where it is off).
Result<Scheme> makeScheme(const Factor &factor, SchemeKind kind, const SchemeOptions &options = {});

// "linear", "quadratic", ..., "degree 6": the name of a polynomial trend.
QString degreeName(int degree);

// Orthogonal polynomial trends of degree 1..k-1 over the positions, orthogonal
// under the weights w (all 1 for the unweighted version), unnormalised.
// Exact when positions and weights are exact; std::nullopt otherwise.
std::optional<std::vector<std::vector<Rational>>> exactPolynomialTrends(const std::vector<Rational> &x,
                                                                        const std::vector<Rational> &w);
std::vector<std::vector<double>> floatPolynomialTrends(const std::vector<double> &x, const std::vector<double> &w);

} // namespace cb
