#pragma once

// Checks shared by the fuzz targets and tests/TestEdgeCases.cpp: each returns an
// empty string when the output is well formed, otherwise says what is wrong.

#include "core/analysis/Analysis.h"
#include "core/export/Export.h"
#include "core/model/Scheme.h"

#include <QByteArray>
#include <QString>

#include <cstddef>
#include <cstdint>

namespace cb::fuzz {

// The exported text of the table is well formed for its language: string
// literals closed on their line, brackets balanced outside strings and comments,
// ASCII only in code, no non-finite number, the CSV reads back to the same table,
// LaTeX braces and math balanced, Markdown rows with one cell per column.
QString checkExport(const ExportTable &table, ExportFormat format, const ExportOptions &options, const QString &text);

// Exports the table in every format, exact and not, and checks each.
QString checkAllExports(const ExportTable &table);

// No "nan", "inf" or "infinity" written as a number: whole words, any case,
// outside double-quoted JSON strings when json is set.
QString checkNoNonFiniteNumber(const QString &text, bool json = false);

// The analysis states nothing confident that is not finite: a full-rank
// analysis has finite hypotheses, a condition number is finite, VIFs are finite.
QString checkAnalysisFinite(const Analysis &analysis);

// True when no name of the scheme (factor, levels, columns, notes) contains a
// word that checkNoNonFiniteNumber would flag: then the report can be checked.
bool namesAreNeutral(const Scheme &scheme);

// Stops the fuzzer with the message (a finding) when it is not empty.
void require(const QString &problem, const char *where);

// Bytes to text as the tools read files: UTF-8.
QString textOf(const std::uint8_t *data, std::size_t size);

} // namespace cb::fuzz
