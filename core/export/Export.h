#pragma once

#include "core/analysis/Analysis.h"
#include "core/base/Result.h"
#include "core/model/Scheme.h"
#include "core/base/Weight.h"

#include <QList>
#include <QString>
#include <QStringList>

#include <optional>
#include <vector>

namespace cb {

// A named matrix ready to be written out: rows x columns of weights with a name
// per row and per column. Names are untrusted text (they may come from any
// scheme file); every exporter escapes or rewrites them for its language.
struct ExportTable
{
    QString title;           // one line for people, e.g. "Coding matrix of irrigation"
    QString variableName;    // suggested identifier in code, e.g. "coding"
    QString rowHeader;       // what a row is: "level" or "coefficient"
    QString columnHeader;    // what a column is: "column" or "level"
    QStringList rowNames;    // one per row
    QStringList columnNames; // one per column
    std::vector<std::vector<Weight>> cells; // rows x columns

    int rowCount() const { return int(rowNames.size()); }
    int columnCount() const { return int(columnNames.size()); }
    // Empty when the table can be written: at least one row and column, every
    // row has one cell per column, every value finite. Otherwise names the cell.
    QString validate() const;
};

enum class ExportFormat { Csv, Cpp, R, Python, Julia, Matlab, Latex, Markdown };

// All formats in menu order.
QList<ExportFormat> exportFormats();
// Stable identifier used on the command line: "csv", "cpp", "r", "python", "julia", "matlab", "latex", "markdown".
QString exportFormatId(ExportFormat format);
// Name for menus: "CSV (RFC 4180)", "C++ (Eigen and std::array)", ...
QString exportFormatTitle(ExportFormat format);
// File suffix without the dot: "csv", "hpp", "R", "py", "jl", "m", "tex", "md".
QString exportFormatSuffix(ExportFormat format);
std::optional<ExportFormat> exportFormatFromId(const QString &id);

struct ExportOptions
{
    // true: exact weights as fractions ("-2/3"; in code the division "-2.0 / 3",
    // in LaTeX \frac). CSV writes every exact weight so; the other formats only
    // those whose numerator and denominator are at most 2^53, and the decimal
    // otherwise. false: decimals, the shortest text that reads back as the
    // double nearest to the weight. Either way code evaluates to that nearest double.
    bool exact = false;
    // Identifier for code formats; empty means the table's variableName. It is
    // rewritten into a safe identifier (see exportIdentifier).
    QString variableName;
};

// The text of the table in the format. Fails when the table is not valid (see
// ExportTable::validate).
Result<QString> exportTable(const ExportTable &table, ExportFormat format, const ExportOptions &options = {});

// A name as it was before the CSV writer guarded it: the writer puts an apostrophe
// before a name a spreadsheet would run as a formula ("=1+2", "@x"; OWASP, "CSV
// Injection") or one that starts with an apostrophe; this removes exactly that one.
QString unguardCsv(const QString &csvName);

// The coding matrix of a scheme: one row per level, one column per coding column.
// Fails when a column does not have one weight per level.
Result<ExportTable> codingTable(const Scheme &scheme);
// The hypothesis matrix of an analysis: one row per coefficient (intercept first),
// one column per level mean. Fails when the coding is rank deficient.
Result<ExportTable> hypothesisTable(const Analysis &analysis);

// The identifier used in code for a requested name: ASCII letters, digits and
// '_', starting with a letter, at most 40 characters, never a reserved word of
// any exported language (nor "np"); "table" when nothing usable is left.
QString exportIdentifier(const QString &requested);

} // namespace cb
