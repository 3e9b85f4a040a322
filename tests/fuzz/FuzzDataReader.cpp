// Fuzz target: the data-file readers (long-format CSV/TSV, summary tables,
// preview) and a fit of a treatment coding to whatever they read.
#include "tests/fuzz/FuzzChecks.h"

#include "core/data/DataFit.h"
#include "core/data/DataReader.h"
#include "core/model/Scheme.h"

#include <QJsonDocument>

#include <cmath>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

constexpr char kDelimiters[] = {0, ',', '\t', ';', '|', ' ', ':', 0};
constexpr qsizetype kBlocks[] = {1, 2, 3, 7, 16, 61, 4096, kDefaultBlockBytes};
constexpr HeaderMode kHeaders[] = {HeaderMode::Detect, HeaderMode::Present, HeaderMode::Absent, HeaderMode::Detect};

void checkSummary(const DataSummary &d, const char *where)
{
    fuzz::require(d.usedRows + d.skippedRows == d.records || d.fromSummaryTable ? QString()
                      : u"%1 used + %2 skipped rows for %3 records"_s.arg(d.usedRows).arg(d.skippedRows).arg(d.records), where);
    for (const LevelStats &l : d.levels) {
        const RunningStats &s = l.stats;
        fuzz::require(std::isfinite(s.n) && s.n >= 0 ? QString() : u"level '%1': bad count"_s.arg(l.name), where);
        if (s.n > 0)
            fuzz::require(std::isfinite(s.mean) && std::isfinite(s.m2) && s.m2 >= 0 ? QString()
                              : u"level '%1': mean %2, m2 %3"_s.arg(l.name).arg(s.mean).arg(s.m2), where);
    }
    // A fit of a treatment coding over the levels read.
    if (d.levels.size() < 2 || d.levels.size() > 12)
        return;
    Factor f;
    for (const LevelStats &l : d.levels)
        f.levels << l.name;
    auto scheme = makeScheme(f, SchemeKind::Treatment);
    if (!scheme)
        return;
    auto fit = fitScheme(*scheme, d);
    if (!fit)
        return;
    const QString json = QString::fromUtf8(QJsonDocument(fitResultToJson(*fit, d)).toJson());
    fuzz::require(fuzz::checkNoNonFiniteNumber(json, true), where);
}

} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t *data, std::size_t size)
{
    if (size < 2)
        return 0;
    const std::uint8_t mode = data[0], columns = data[1];
    const QByteArray bytes(reinterpret_cast<const char *>(data + 2), qsizetype(size - 2));

    DataReadOptions o;
    o.delimiter = kDelimiters[mode & 7];
    o.header = kHeaders[(mode >> 3) & 3];
    o.blockBytes = kBlocks[(mode >> 5) & 7];
    // Columns by number or by the names used in the seed files.
    static const QString names[] = {u"1"_s, u"2"_s, u"3"_s, u"group"_s, u"y"_s, u"w"_s, u"level"_s, u"weight"_s};
    o.factorColumn = names[columns & 7];
    o.responseColumn = names[(columns >> 3) & 7];
    if (columns & 0x40)
        o.weightColumn = names[(columns >> 3 & 7) ^ 1];
    // A design's second factor column: cells are the joined values.
    if (columns & 0x80)
        o.moreFactorColumns << names[((columns & 7) + 2) & 7];
    if (auto d = readLevelDataFromBytes(bytes, u"fuzz.csv"_s, o))
        checkSummary(*d, "readLevelData");

    SummaryReadOptions so{o.delimiter, o.header};
    if (auto d = readSummaryTableFromBytes(bytes, u"fuzz.csv"_s, so))
        checkSummary(*d, "readSummaryTable");

    if (auto p = previewDataFromBytes(bytes, u"fuzz.csv"_s, 5, o.delimiter, o.header))
        fuzz::require(p->rows.size() <= 5 ? QString() : u"preview has more rows than asked"_s, "previewData");
    return 0;
}
