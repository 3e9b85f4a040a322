#pragma once
// Shared by the export tests and the fuzz checks: CSV written by exportTable(..., ExportFormat::Csv)
// read back into a table through the project's one CSV reader (cb::readRecordsFromBytes).
#include "core/data/DataReader.h"
#include "core/export/Export.h"

namespace cb::test {

// The first record holds the row header and the column names, each further record a row name
// and one weight per column. Names lose the writer's guard (unguardCsv); cells parse with
// parseStoredWeight, as the scheme files store weights. Errors name the line and field:
// "CSV line 3, field 2 (column 'a'): weight ... is too small ...".
inline Result<ExportTable> readExportedCsv(const QString &text)
{
    using namespace Qt::StringLiterals;
    using Out = Result<ExportTable>;
    auto read = readRecordsFromBytes(text.toUtf8(), u"CSV"_s, ',');
    if (!read)
        return Out::failure(read.error());
    const std::vector<DataRecord> &records = read->records;
    if (records.size() < 2)
        return Out::failure(u"CSV: expected a header row and at least one row of weights, found %1 row(s)"_s.arg(records.size()));
    const DataRecord &head = records.front();
    if (head.fields.size() < 2)
        return Out::failure(u"CSV line %1: the header has %2 field(s); expected the row header and at least one column name"_s
                                .arg(head.line)
                                .arg(head.fields.size()));
    ExportTable table;
    table.title = u"Imported table"_s;
    table.variableName = u"table"_s;
    table.rowHeader = unguardCsv(head.fields.front());
    table.columnHeader = u"column"_s;
    for (qsizetype j = 1; j < head.fields.size(); ++j)
        table.columnNames.append(unguardCsv(head.fields[j]));
    for (size_t r = 1; r < records.size(); ++r) {
        const DataRecord &rec = records[r];
        if (rec.fields.size() != head.fields.size())
            return Out::failure(u"CSV line %1: %2 field(s); expected %3 like the header (a name and one weight per column)"_s
                                    .arg(rec.line)
                                    .arg(rec.fields.size())
                                    .arg(head.fields.size()));
        table.rowNames.append(unguardCsv(rec.fields.front()));
        std::vector<Weight> row;
        row.reserve(size_t(rec.fields.size() - 1));
        for (qsizetype j = 1; j < rec.fields.size(); ++j) {
            auto w = parseStoredWeight(rec.fields[j]);
            if (!w)
                return Out::failure(u"CSV line %1, field %2 (column %3): "_s.arg(rec.line).arg(j + 1).arg(quoted(table.columnNames[j - 1]))
                                    + w.error());
            row.push_back(w.value());
        }
        table.cells.push_back(std::move(row));
    }
    return table;
}

} // namespace cb::test
