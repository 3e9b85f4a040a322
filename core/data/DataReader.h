#pragma once

#include "core/base/Result.h"

#include <QByteArray>
#include <QString>
#include <QStringList>

#include <functional>
#include <optional>
#include <string_view>
#include <vector>

namespace cb {

// Count, mean and sum of squared deviations of one group, updated one value at a
// time with Welford's recurrence (Welford 1962, Technometrics 4:419-420) and merged
// with the pairwise formula of Chan, Golub & LeVeque (1983, Am. Statistician 37:242-247).
// With case weights, n is the sum of the weights and m2 = sum w (y - mean)^2.
struct RunningStats
{
    double n = 0.0;
    double mean = 0.0;
    double m2 = 0.0;
    qint64 rows = 0; // data rows that contributed (a row of weight w counts once)

    void add(double y)
    {
        ++rows;
        n += 1.0;
        const double delta = y - mean;
        mean += delta / n;
        m2 += delta * (y - mean);
    }
    void add(double y, double w)
    {
        ++rows;
        if (w == 0.0)
            return;
        n += w;
        const double delta = y - mean;
        mean += delta * (w / n);
        m2 += w * delta * (y - mean);
    }
    void merge(const RunningStats &other);
    // m2 / (n - 1); NaN when n <= 1.
    double variance() const;
    double sd() const;
    // The statistics of a group known only by its size, mean and SD.
    static RunningStats fromSummary(double n, double mean, double sd);
};

struct LevelStats
{
    QString name;
    RunningStats stats;
};

// A data row that was left out of the statistics, and why.
struct RowProblem
{
    qint64 line = 0; // physical line (1-based, the header is line 1) where the row starts
    QString message; // "response (column 'weight') 'abc' is not a number"
};

// Rows left out are all counted; the first ones are kept with their line numbers.
inline constexpr int kReportedRowProblems = 20;
// More distinct factor values than this stops the read (memory stays bounded).
inline constexpr int kMaxDataLevels = 10000;
// A single record (line, or lines joined by a quoted field) may not be longer than this.
inline constexpr qsizetype kMaxRecordBytes = 16 * 1024 * 1024;
inline constexpr qsizetype kDefaultBlockBytes = 1024 * 1024;

enum class HeaderMode {
    Detect,  // the first row is a header when the named columns are found in it,
             // or (columns given by number) when it has text where the next row has numbers
    Present,
    Absent,
};

struct DataReadOptions
{
    // Columns by header name, or by 1-based number ("2") when no header cell has that name.
    QString factorColumn;
    // Further factor columns of a crossed design (at most two): a row's level is then its factor
    // values joined with kCellJoiner in this order, as Design::cellNames() names the cells ("grass·early").
    QStringList moreFactorColumns;
    QString responseColumn;
    QString weightColumn; // empty: every row has weight 1
    // The column naming each row's participant, for a factor measured within participants: the
    // same pass then keeps every participant's cell statistics (DataSummary::participantCells).
    // A row without a participant stops the read with the line named.
    QString participantColumn;
    // The column naming each row's item (sentence, word, picture), read beside the participant column:
    // the same pass keeps every item's cell statistics too (DataSummary::itemCells), for the by-item
    // analysis. A row without an item stops the read with the line named.
    QString itemColumn;
    // 0: detect among tab, comma, semicolon and vertical bar.
    char delimiter = 0;
    HeaderMode header = HeaderMode::Detect;
    // Bytes read per block; memory use does not grow with the file. Small values are for tests.
    qsizetype blockBytes = kDefaultBlockBytes;
    // Called after each block with the bytes read so far; return false to cancel.
    std::function<bool(qint64 bytesRead)> progress;
};

// What one streaming pass over a long-format file found.
struct DataSummary
{
    QString source; // the file name used in messages; "standard input" for "-"
    char delimiter = ',';
    bool hasHeader = false;
    QStringList columns; // header cells, or "1", "2", ... without a header
    int factorIndex = -1; // 0-based column positions
    std::vector<int> moreFactorIndices; // the further factor columns, when given
    int responseIndex = -1;
    int weightIndex = -1;
    int participantIndex = -1;
    int itemIndex = -1;
    bool weighted = false;
    bool fromSummaryTable = false;

    std::vector<LevelStats> levels; // in order of first appearance
    // With a participant column: the participants in order of first appearance, and each one's
    // statistics per level ([participant][level], levels as in `levels`; n 0 where it has no row;
    // replicate rows of a cell are pooled, so their mean is the participant's cell mean).
    QStringList participants;
    std::vector<std::vector<RunningStats>> participantCells;
    // With an item column: the same per item (each item's cell means over the participants' rows),
    // and the line where each item first appears, for messages.
    QStringList items;
    std::vector<std::vector<RunningStats>> itemCells;
    std::vector<qint64> itemLines;
    std::vector<std::vector<qint64>> participantFirstLines; // [participant][level]: line of its first row there, 0 for none
    qint64 bytes = 0;       // bytes read
    qint64 lines = 0;       // physical lines
    qint64 records = 0;     // data rows (header and blank lines excluded)
    qint64 blankLines = 0;  // empty lines, ignored
    qint64 usedRows = 0;
    qint64 skippedRows = 0; // all rows left out
    std::vector<RowProblem> skipped; // the first kReportedRowProblems of them

    // Empty when nothing was skipped; otherwise "3 rows left out: line 4: ...; line 9: ...; and 1 more".
    QString skippedReport() const;
    int levelIndex(const QString &name) const;
};

// Reads a long-format CSV/TSV file (path "-" reads standard input) in fixed-size
// blocks into per-level statistics, in one pass and bounded memory. Per level, values
// are summed as deviations from a shift in chunks of 64 and the chunks merged pairwise
// (Chan, Golub & LeVeque), about the level's first value: stable for data far from zero. Handles RFC 4180 quoting (delimiters, quotes
// and line breaks inside quoted fields), a UTF-8 byte-order mark, LF or CRLF.
// A missing or non-numeric response (or weight) leaves the row out and is
// reported; a file-level problem (missing column, ragged row, unterminated quote,
// not UTF-8 ...) fails with a message naming the file and line.
Result<DataSummary> readLevelData(const QString &path, const DataReadOptions &options);
// The same for text already in memory; sourceName is used in messages.
Result<DataSummary> readLevelDataFromBytes(const QByteArray &bytes, const QString &sourceName,
                                           const DataReadOptions &options);

// A summary table: one row per level with its name, n, mean and SD. The header, when
// there is one, names the columns (level/group/cell, n/count, mean, sd/stdev or
// variance/var, any order;
// a design's cells are named as Design::cellNames() names them, "grass·early");
// without one the columns are taken in that order. SD may be empty only when n is 1.
struct SummaryReadOptions
{
    char delimiter = 0;
    HeaderMode header = HeaderMode::Detect;
};
Result<DataSummary> readSummaryTable(const QString &path, const SummaryReadOptions &options = {});
Result<DataSummary> readSummaryTableFromBytes(const QByteArray &bytes, const QString &sourceName,
                                              const SummaryReadOptions &options = {});

// One level of a summary table as values, from a file's row or a database's: the spread is
// the SD (a file's sd column) or the variance (a variance column, what the summary query
// returns); it may be missing only when n is 1.
struct SummaryRow
{
    QString level;
    double n = 0.0;
    double mean = 0.0;
    std::optional<double> spread;
    bool spreadIsVariance = false;
    QString place; // where the row came from, for messages: "x.csv line 4", "sqlite:///d.db row 2"
    QString participant; // the summary query's two-level form: whose cell the row is (core/data/SummaryQuery.h)
};
// Adds one row to a summary after the checks every summary table gets (a level name, given
// once; n positive; mean finite; spread >= 0, missing only when n is 1). Returns a message that
// starts with the row's place, or an empty string.
QString addSummaryRow(DataSummary &summary, const SummaryRow &row);
// A whole summary table from rows (a database's answer): each row through addSummaryRow; no
// rows is an error. The summary is marked as a summary table from sourceName.
Result<DataSummary> summaryFromRows(const std::vector<SummaryRow> &rows, const QString &sourceName);

// A first look at a file, for choosing the columns: the detected delimiter, whether
// the first row looks like a header, the column names and the first rows as text.
struct DataPreview
{
    QString source;
    char delimiter = ',';
    bool hasHeader = false;
    QStringList columns;
    std::vector<QStringList> rows; // up to maxRows data rows
    qint64 fileSize = -1;          // -1 for standard input
};
Result<DataPreview> previewData(const QString &path, int maxRows = 20, char delimiter = 0,
                                HeaderMode header = HeaderMode::Detect);
Result<DataPreview> previewDataFromBytes(const QByteArray &bytes, const QString &sourceName, int maxRows = 20,
                                         char delimiter = 0, HeaderMode header = HeaderMode::Detect);

// Every record of a delimited text as it is written, for a caller that wants the cells
// themselves (the tests read exported CSV back through it): quotes removed, fields not
// trimmed, blank lines skipped, no header decision (the first record comes first). The
// same parsing and checks as the readers above (RFC 4180 quoting, byte-order mark, LF or
// CRLF, UTF-8); a broken record fails with a message naming the source and line.
struct DataRecord
{
    qint64 line = 0; // physical line (1-based) where the record starts
    QStringList fields;
};
struct DataRecords
{
    QString source;
    char delimiter = ',';
    std::vector<DataRecord> records;
};
// delimiter 0: detect it as the readers above do.
Result<DataRecords> readRecordsFromBytes(const QByteArray &bytes, const QString &sourceName, char delimiter = 0);

// "comma", "tab", "semicolon", "vertical bar", or the character itself in quotes.
QString delimiterName(char delimiter);
// Accepts those names, "\t", or a single ASCII punctuation character.
std::optional<char> delimiterFromName(const QString &name);

// The largest magnitudes the readers accept: a response, a level's mean or SD up to 1e100
// and a case weight or a level's n up to 1e50, so that every sum of squares the fits form
// stays finite (1e50 x (2e100)^2 is 4e250) and a value beyond them is refused with its place
// instead of turning a variance into inf or NaN. No measurement comes near them.
inline constexpr double kLargestDataValue = 1e100;
inline constexpr double kLargestDataWeight = 1e50;

// Parses a whole field as a finite number (surrounding spaces and a leading '+' allowed).
// Returns nullopt when it is not one; missing() tells whether it reads as missing
// (empty, NA, N/A, NaN, NULL, ".").
std::optional<double> parseNumberField(std::string_view text);
bool isMissingToken(std::string_view text);

} // namespace cb
