#pragma once
// The options of the summary query, shared by `export --format sql-summary` (prints the query)
// and `fit --database` (runs it): --table, --participant, --variance, --centre; the columns
// come from --factor, --response and --weight, which each command adds itself.

#include "core/base/Result.h"
#include "core/data/SummaryQuery.h"

#include <QCommandLineParser>

namespace cb::cli {

// participantOption: whether to add --participant here (fit has its own, for the by-participant
// analysis; with --database it asks for the two-level form).
void addSummaryQueryOptions(QCommandLineParser &parser, bool participantOption = true);
// factorColumns: one per factor (the command decides the default for a design).
Result<SummaryQuerySpec> summaryQuerySpec(const QCommandLineParser &parser, const QStringList &factorColumns);
// The options that only the summary query reads, for a command to refuse them elsewhere
// (--participant is not among them: fit reads it for data files too).
QStringList summaryQueryOnlyOptions();

} // namespace cb::cli
