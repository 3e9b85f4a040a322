#pragma once
// The options of the summary query, shared by `export --format sql-summary` (prints the query)
// and `fit --database` (runs it): --table, --participant, --variance, --centre; the columns
// come from --factor, --response and --weight, which each command adds itself.

#include "core/base/Result.h"
#include "core/data/SummaryQuery.h"

#include <QCommandLineParser>

namespace cb::cli {

void addSummaryQueryOptions(QCommandLineParser &parser);
// factorColumns: one per factor (the command decides the default for a design).
Result<SummaryQuerySpec> summaryQuerySpec(const QCommandLineParser &parser, const QStringList &factorColumns);
// The options that only the summary query reads, for a command to refuse them elsewhere.
QStringList summaryQueryOnlyOptions();

} // namespace cb::cli
