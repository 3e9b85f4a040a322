#include "core/data/DataReader.h"
#include "core/model/Design.h"

#include "core/base/NumberText.h"
#include "core/base/Weight.h"
#include "core/files/InputFile.h"

#include <QFile>
#include <QLocale>
#include <QFileInfo>
#include <QStringDecoder>

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <limits>
#include <memory>
#include <string>

using namespace Qt::StringLiterals;

namespace cb {

// ---------------------------------------------------------------------------
// RunningStats

void RunningStats::merge(const RunningStats &other)
{
    rows += other.rows;
    if (other.n == 0.0)
        return;
    if (n == 0.0) {
        n = other.n;
        mean = other.mean;
        m2 = other.m2;
        return;
    }
    const double total = n + other.n;
    const double delta = other.mean - mean;
    mean += delta * (other.n / total);
    m2 += other.m2 + delta * delta * (n * other.n / total);
    n = total;
}

double RunningStats::variance() const
{
    if (n <= 1.0)
        return std::numeric_limits<double>::quiet_NaN();
    return m2 / (n - 1.0);
}

double RunningStats::sd() const
{
    return std::sqrt(variance());
}

RunningStats RunningStats::fromSummary(double count, double groupMean, double groupSd)
{
    RunningStats s;
    s.n = count;
    s.mean = groupMean;
    s.m2 = count > 1.0 ? groupSd * groupSd * (count - 1.0) : 0.0;
    s.rows = qint64(std::llround(count));
    return s;
}

QString DataSummary::skippedReport() const
{
    if (skippedRows == 0)
        return {};
    QStringList parts;
    for (const RowProblem &p : skipped)
        parts << u"line %1: %2"_s.arg(p.line).arg(p.message);
    QString text = u"%1 %2 left out: "_s.arg(skippedRows).arg(skippedRows == 1 ? u"row"_s : u"rows"_s)
        + parts.join(u"; "_s);
    const qint64 more = skippedRows - qint64(skipped.size());
    if (more > 0)
        text += u"; and %1 more"_s.arg(more);
    return text;
}

// A summary row's value in a message, every digit it was given: 'n 1e+51'.
static QString valueText(double v)
{
    return quoted(numberText(v, QLocale::FloatingPointShortest));
}

QString addSummaryRow(DataSummary &summary, const SummaryRow &row)
{
    const QString what = row.spreadIsVariance ? u"variance"_s : u"sd"_s;
    if (row.level.trimmed().isEmpty())
        return u"%1: the level name is empty"_s.arg(row.place);
    if (summary.levelIndex(row.level) >= 0)
        return u"%1: level %2 appears twice; give one row per level"_s.arg(row.place, quoted(row.level));
    if (!std::isfinite(row.n) || row.n <= 0)
        return u"%1: n %2 is not positive; expected a positive number"_s.arg(row.place, valueText(row.n));
    if (row.n > kLargestDataWeight)
        return u"%1: n %2 is too large; expected at most 1e50"_s.arg(row.place, valueText(row.n));
    if (!std::isfinite(row.mean))
        return u"%1: mean %2 is not finite; expected a number"_s.arg(row.place, valueText(row.mean));
    if (std::abs(row.mean) > kLargestDataValue)
        return u"%1: mean %2 is too large; expected a number between -1e100 and 1e100 (rescale the response)"_s.arg(
            row.place, valueText(row.mean));
    if (!row.spread && row.n > 1.0)
        return u"%1: %2 is missing; expected a number >= 0 (it may be left empty only when n is 1)"_s.arg(row.place, what);
    const double spread = row.spread.value_or(0.0);
    if (!std::isfinite(spread))
        return u"%1: %2 %3 is not finite; expected a number >= 0"_s.arg(row.place, what, valueText(spread));
    if (spread < 0)
        return u"%1: %2 %3 is negative; expected a number >= 0 (it may be left empty only when n is 1)"_s.arg(
            row.place, what, valueText(spread));
    if ((row.spreadIsVariance ? std::sqrt(spread) : spread) > kLargestDataValue)
        return u"%1: %2 %3 is too large; expected %4 (rescale the response)"_s.arg(
            row.place, what, valueText(spread),
            row.spreadIsVariance ? u"at most 1e200"_s : u"at most 1e100"_s);
    RunningStats stats = RunningStats::fromSummary(row.n, row.mean, row.spreadIsVariance ? 0.0 : spread);
    if (row.spreadIsVariance && row.n > 1.0)
        stats.m2 = spread * (row.n - 1.0);
    summary.levels.push_back({row.level, stats});
    ++summary.usedRows;
    return {};
}

Result<DataSummary> summaryFromRows(const std::vector<SummaryRow> &rows, const QString &sourceName)
{
    DataSummary summary;
    summary.source = sourceName;
    summary.fromSummaryTable = true;
    summary.hasHeader = true;
    summary.columns = {u"level"_s, u"n"_s, u"mean"_s, u"variance"_s};
    summary.factorIndex = 0;
    for (const SummaryRow &row : rows) {
        ++summary.records;
        if (QString e = addSummaryRow(summary, row); !e.isEmpty())
            return Result<DataSummary>::failure(e);
    }
    if (summary.levels.empty())
        return Result<DataSummary>::failure(u"%1 has no rows; expected one row per level"_s.arg(sourceName));
    return summary;
}

int DataSummary::levelIndex(const QString &name) const
{
    for (size_t i = 0; i < levels.size(); ++i)
        if (levels[i].name == name)
            return int(i);
    return -1;
}

// ---------------------------------------------------------------------------
// Small helpers

QString delimiterName(char delimiter)
{
    switch (delimiter) {
    case ',': return u"comma"_s;
    case '\t': return u"tab"_s;
    case ';': return u"semicolon"_s;
    case '|': return u"vertical bar"_s;
    default: return u"'%1'"_s.arg(QChar::fromLatin1(delimiter));
    }
}

std::optional<char> delimiterFromName(const QString &name)
{
    const QString n = name.trimmed().toLower();
    if (n == u"comma"_s || n == u","_s)
        return ',';
    if (n == u"tab"_s || n == u"\\t"_s || n == u"\t"_s)
        return '\t';
    if (n == u"semicolon"_s || n == u";"_s)
        return ';';
    if (n == u"bar"_s || n == u"pipe"_s || n == u"vertical bar"_s || n == u"|"_s)
        return '|';
    if (name.size() == 1 && name[0].unicode() < 128 && name[0].isPunct() && name[0] != u'"')
        return char(name[0].unicode());
    return std::nullopt;
}

static std::string_view trimmed(std::string_view s)
{
    while (!s.empty() && (s.front() == ' ' || s.front() == '\t'))
        s.remove_prefix(1);
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t'))
        s.remove_suffix(1);
    return s;
}

static bool equalsNoCase(std::string_view a, std::string_view b)
{
    if (a.size() != b.size())
        return false;
    for (size_t i = 0; i < a.size(); ++i) {
        const auto lower = [](char c) { return c >= 'A' && c <= 'Z' ? char(c - 'A' + 'a') : c; };
        if (lower(a[i]) != lower(b[i]))
            return false;
    }
    return true;
}

bool isMissingToken(std::string_view text)
{
    const std::string_view t = trimmed(text);
    static constexpr std::array<std::string_view, 5> tokens = {"NA", "N/A", "NaN", "NULL", "."};
    if (t.empty())
        return true;
    return std::any_of(tokens.begin(), tokens.end(), [t](std::string_view k) { return equalsNoCase(t, k); });
}

std::optional<double> parseNumberField(std::string_view text)
{
    std::string_view t = trimmed(text);
    if (!t.empty() && t.front() == '+')
        t.remove_prefix(1);
    if (t.empty() || t.front() == '+')
        return std::nullopt;
    double v = 0.0;
    const auto r = std::from_chars(t.data(), t.data() + t.size(), v);
    if (r.ec != std::errc() || r.ptr != t.data() + t.size() || !std::isfinite(v))
        return std::nullopt;
    return v;
}

static QString quoteText(std::string_view s)
{
    // Enough bytes for more than the characters quoted() shows, without decoding a huge field.
    constexpr size_t kDecoded = 256;
    return quoted(QString::fromUtf8(s.data(), qsizetype(std::min(s.size(), kDecoded))));
}

// Why a field is not a usable number, e.g. "is missing" or "'abc' is not a number".
static QString numberProblem(std::string_view text, char delimiter)
{
    const std::string_view t = trimmed(text);
    if (isMissingToken(t))
        return u"is missing"_s;
    double v = 0.0;
    std::string_view u = t.front() == '+' ? t.substr(1) : t;
    const auto r = std::from_chars(u.data(), u.data() + u.size(), v);
    if (r.ptr == u.data() + u.size() && r.ec == std::errc::result_out_of_range)
        return quoteText(t) + u" is out of range"_s;
    if (r.ec == std::errc() && r.ptr == u.data() + u.size() && !std::isfinite(v))
        return quoteText(t) + u" is not a finite number"_s;
    if (delimiter != ',' && u.find(',') != std::string_view::npos && u.find_first_not_of("0123456789,-") == std::string_view::npos)
        return quoteText(t) + u" is not a number (decimal commas are not read; write a point)"_s;
    return quoteText(t) + u" is not a number"_s;
}

static std::optional<QString> decodeUtf8(std::string_view s)
{
    QStringDecoder decoder(QStringDecoder::Utf8, QStringDecoder::Flag::Stateless);
    QString out = decoder(QByteArrayView(s.data(), qsizetype(s.size())));
    if (decoder.hasError())
        return std::nullopt;
    return out;
}

// ---------------------------------------------------------------------------
// Byte sources and the block stream

namespace {

class ByteSource
{
public:
    virtual ~ByteSource() = default;
    // Bytes copied into dst (0 at the end); -1 on a read error.
    virtual qint64 read(char *dst, qint64 max) = 0;
    virtual qint64 size() const { return -1; }
};

class FileSource final : public ByteSource
{
public:
    explicit FileSource(std::FILE *f, bool owned) : m_file(f), m_owned(owned) {}
    ~FileSource() override
    {
        if (m_owned && m_file)
            std::fclose(m_file);
    }
    FileSource(const FileSource &) = delete;
    FileSource &operator=(const FileSource &) = delete;
    qint64 read(char *dst, qint64 max) override
    {
        const size_t got = std::fread(dst, 1, size_t(max), m_file);
        if (got == 0 && std::ferror(m_file))
            return -1;
        return qint64(got);
    }
    qint64 size() const override { return m_size; }
    void setSize(qint64 s) { m_size = s; }

private:
    std::FILE *m_file = nullptr;
    bool m_owned = false;
    qint64 m_size = -1;
};

class MemorySource final : public ByteSource
{
public:
    explicit MemorySource(const QByteArray &bytes) : m_bytes(bytes) {}
    qint64 read(char *dst, qint64 max) override
    {
        const qint64 n = std::min<qint64>(max, m_bytes.size() - m_pos);
        std::memcpy(dst, m_bytes.constData() + m_pos, size_t(n));
        m_pos += n;
        return n;
    }
    qint64 size() const override { return m_bytes.size(); }

private:
    const QByteArray &m_bytes;
    qint64 m_pos = 0;
};

// Opens path ("-" is standard input) as a source; the message names the file.
Result<std::unique_ptr<ByteSource>> openSource(const QString &path)
{
    if (path == u"-"_s) {
        std::unique_ptr<ByteSource> s = std::make_unique<FileSource>(stdin, false);
        return s;
    }
    if (const QString problem = inputPathProblem(path, u"a data file"_s); !problem.isEmpty())
        return Result<std::unique_ptr<ByteSource>>::failure(problem);
    const QFileInfo info(path);
    std::FILE *f = std::fopen(QFile::encodeName(path).constData(), "rb");
    if (!f)
        return Result<std::unique_ptr<ByteSource>>::failure(
            u"%1 cannot be opened: %2"_s.arg(path, QString::fromLocal8Bit(std::strerror(errno))));
    std::setvbuf(f, nullptr, _IONBF, 0); // blocks go straight into our buffer
    auto source = std::make_unique<FileSource>(f, true);
    source->setSize(info.size());
    std::unique_ptr<ByteSource> s = std::move(source);
    return s;
}

// Bytes readable after the end of the data, so that short keys can be loaded as whole words.
constexpr size_t kSlackBytes = 32;

// Reads a source in blocks and hands out regions of whole lines: [pos(), end())
// always ends with '\n' (one is added after the last line when the data lack it).
// What the caller leaves unconsumed is kept and continued by the next block.
class BlockStream
{
public:
    enum class Status { Ok, End, ReadError, TooLong, Cancelled };

    BlockStream(ByteSource &source, qsizetype blockBytes, std::function<bool(qint64)> progress)
        : m_source(source), m_block(std::max<qsizetype>(1, blockBytes)), m_progress(std::move(progress))
    {
        m_cap = size_t(2 * m_block);
        // A small input gets a small buffer (it doubles as needed, should the source hold more
        // than it said): a summary table of a few lines need not clear two blocks of memory.
        if (const qint64 known = source.size(); known >= 0)
            m_cap = std::min(m_cap, size_t(known) + 64);
        m_buf.resize(m_cap + 1 + kSlackBytes);
    }

    // Moves on to the next region, keeping the bytes from consumedUpTo on.
    Status next(const char *consumedUpTo)
    {
        const size_t from = size_t(consumedUpTo - m_buf.data());
        if (m_atEof && from >= m_end)
            return Status::End;
        std::memmove(m_buf.data(), m_buf.data() + from, m_have - from);
        m_have -= from;
        m_end = 0;
        return extend(m_have);
    }

    // Reads on until the region grows past its current end (or the data end).
    Status extend() { return extend(m_have); }

    const char *pos() const { return m_buf.data(); }
    const char *end() const { return m_buf.data() + m_end; }
    bool atEof() const { return m_atEof; }
    qint64 bytesRead() const { return m_total; }
    size_t held() const { return m_have; }

private:
    // Reads blocks until a '\n' appears at or after searchFrom, or the data end.
    Status extend(size_t searchFrom)
    {
        if (m_atEof)
            return m_end < m_have ? (m_end = m_have, Status::Ok) : Status::End;
        for (;;) {
            if (m_have == m_cap) {
                if (qsizetype(m_cap) > kMaxRecordBytes + 2 * m_block)
                    return Status::TooLong;
                m_cap *= 2;
                m_buf.resize(m_cap + 1 + kSlackBytes);
            }
            const qint64 want = std::min<qint64>(m_block, qint64(m_cap - m_have));
            const qint64 got = m_source.read(m_buf.data() + m_have, want);
            if (got < 0)
                return Status::ReadError;
            m_have += size_t(got);
            m_total += got;
            if (m_progress && got > 0 && !m_progress(m_total))
                return Status::Cancelled;
            if (got == 0) {
                m_atEof = true;
                if (m_have > 0 && m_buf[m_have - 1] != '\n')
                    m_buf[m_have++] = '\n'; // the reserved byte
                if (m_have == m_end || m_have == 0)
                    return Status::End;
                m_end = m_have;
                return Status::Ok;
            }
            const char *base = m_buf.data();
            const void *nl = memrchr(base + searchFrom, '\n', m_have - searchFrom);
            if (nl) {
                m_end = size_t(static_cast<const char *>(nl) - base) + 1;
                return Status::Ok;
            }
        }
    }

    ByteSource &m_source;
    qsizetype m_block;
    std::function<bool(qint64)> m_progress;
    std::vector<char> m_buf; // m_cap bytes of data, one for the final '\n', then kSlackBytes
    size_t m_cap = 0;
    size_t m_have = 0; // bytes held
    size_t m_end = 0;  // end of the current region
    qint64 m_total = 0;
    bool m_atEof = false;
};

// One record parsed the careful way (quotes, embedded delimiters and line breaks).
enum class RecordStatus { Complete, Incomplete, TextAfterQuote };

struct SlowRecord
{
    std::vector<std::string> fields;
    int count = 0;
    int newlines = 0;      // line breaks consumed, including the one ending the record
    int badField = -1;     // 1-based field with text after its closing quote
    int quoteLine = 0;     // lines into the record where the last quoted field opened
    const char *next = nullptr;

    std::string_view field(int i) const { return fields[size_t(i)]; }
};

RecordStatus parseRecord(const char *p, const char *end, char delim, SlowRecord &r)
{
    r.count = 0;
    r.newlines = 0;
    r.badField = -1;
    for (;;) {
        if (r.fields.size() <= size_t(r.count))
            r.fields.emplace_back();
        std::string &f = r.fields[size_t(r.count)];
        f.clear();
        const char *q = p;
        while (q < end && *q == ' ' && delim != ' ')
            ++q;
        if (q < end && *q == '"') {
            r.quoteLine = r.newlines;
            ++q;
            for (;;) {
                if (q >= end)
                    return RecordStatus::Incomplete;
                const char c = *q++;
                if (c == '"') {
                    if (q < end && *q == '"') {
                        f.push_back('"');
                        ++q;
                        continue;
                    }
                    break;
                }
                if (c == '\n')
                    ++r.newlines;
                f.push_back(c);
            }
            while (q < end && *q == ' ' && delim != ' ')
                ++q;
            if (q >= end)
                return RecordStatus::Incomplete;
            ++r.count;
            if (*q == delim) {
                p = q + 1;
                continue;
            }
            if (*q == '\r' && q + 1 < end && q[1] == '\n')
                ++q;
            if (*q == '\n') {
                ++r.newlines;
                r.next = q + 1;
                return RecordStatus::Complete;
            }
            r.badField = r.count;
            return RecordStatus::TextAfterQuote;
        }
        q = p;
        while (q < end && *q != delim && *q != '\n')
            ++q;
        if (q >= end)
            return RecordStatus::Incomplete;
        const char *e = q;
        if (*q == '\n' && e > p && e[-1] == '\r')
            --e;
        f.assign(p, e);
        ++r.count;
        if (*q == delim) {
            p = q + 1;
            continue;
        }
        ++r.newlines;
        r.next = q + 1;
        return RecordStatus::Complete;
    }
}

bool isBlankLine(const char *p, const char *end)
{
    return (p < end && *p == '\n') || (p + 1 < end && p[0] == '\r' && p[1] == '\n');
}

const char *skipBlankLine(const char *p)
{
    return *p == '\n' ? p + 1 : p + 2;
}

constexpr std::array<char, 4> kCandidates = {'\t', ',', ';', '|'};
constexpr int kDetectRecords = 20;
constexpr qsizetype kDetectBytes = 64 * 1024;

// The delimiter that splits the first records into the same number (>= 2) of
// fields, most fields first; 0 when none does.
char detectDelimiter(const char *p, const char *end)
{
    char best = 0;
    int bestFields = 1;
    char fallback = 0;
    int fallbackFields = 1;
    SlowRecord r;
    for (char d : kCandidates) {
        const char *q = p;
        int first = -1;
        bool consistent = true;
        for (int i = 0; i < kDetectRecords && q < end; ++i) {
            if (isBlankLine(q, end)) {
                q = skipBlankLine(q);
                continue;
            }
            if (parseRecord(q, end, d, r) != RecordStatus::Complete)
                break;
            if (first < 0)
                first = r.count;
            else if (r.count != first)
                consistent = false;
            q = r.next;
        }
        if (consistent && first > bestFields) {
            best = d;
            bestFields = first;
        }
        if (first > fallbackFields) {
            fallback = d;
            fallbackFields = first;
        }
    }
    return best ? best : fallback;
}

QString joinColumns(const QStringList &columns)
{
    constexpr qsizetype kListed = 20;
    QStringList shown;
    for (qsizetype i = 0; i < std::min(columns.size(), kListed); ++i)
        shown << (columns[i].isEmpty() ? u"(unnamed)"_s : shortenedInput(columns[i]));
    if (columns.size() > kListed)
        shown << u"and %1 more"_s.arg(columns.size() - kListed);
    return shown.join(u", "_s);
}

bool looksNumeric(std::string_view s)
{
    return parseNumberField(s).has_value();
}

// Without column names to go by: the first row is a header when it has text in
// some column where the second row has a number (or, with one row, when no cell is a number).
bool guessHeader(const SlowRecord &first, const SlowRecord *second)
{
    bool anyNumber = false;
    for (int i = 0; i < first.count; ++i) {
        const bool num = looksNumeric(first.field(i));
        anyNumber = anyNumber || num;
        if (second && i < second->count && !num && !isMissingToken(first.field(i)) && looksNumeric(second->field(i)))
            return true;
    }
    return !second && !anyNumber;
}

// Shared start of every reader: opens, reads the first region, checks the
// encoding, detects the delimiter and parses the first two records.
class FileStart
{
public:
    FileStart(ByteSource &source, QString label, qsizetype blockBytes, std::function<bool(qint64)> progress)
        : m_stream(source, blockBytes, std::move(progress)), m_label(std::move(label))
    {
    }

    // Empty string on success.
    QString begin(char delimiter)
    {
        BlockStream::Status s = m_stream.next(m_stream.pos());
        if (s == BlockStream::Status::TooLong && std::memchr(m_stream.pos(), '\r', m_stream.held()))
            return u"%1 line 1: lines end with a lone carriage return; expected LF or CRLF line ends"_s.arg(m_label);
        if (s != BlockStream::Status::Ok)
            return s == BlockStream::Status::End ? u"%1 is empty; expected a header and data rows"_s.arg(m_label)
                                                  : streamError(s);
        m_p = m_stream.pos();
        const char *end = m_stream.end();
        const auto *u = reinterpret_cast<const unsigned char *>(m_p);
        const size_t len = size_t(end - m_p);
        if (len >= 2 && ((u[0] == 0xFF && u[1] == 0xFE) || (u[0] == 0xFE && u[1] == 0xFF)))
            return u"%1 is UTF-16 encoded; save it as UTF-8"_s.arg(m_label);
        if (len >= 3 && u[0] == 0xEF && u[1] == 0xBB && u[2] == 0xBF)
            m_p += 3;
        if (std::memchr(m_p, 0, size_t(end - m_p)))
            return u"%1 contains NUL bytes; expected a UTF-8 text file"_s.arg(m_label);
        // Lines ending in a lone CR (and no LF before the first one).
        const void *cr = std::memchr(m_p, '\r', size_t(end - m_p));
        if (cr) {
            const char *c = static_cast<const char *>(cr);
            const void *lf = std::memchr(m_p, '\n', size_t(end - m_p));
            if (c + 1 < end && c[1] != '\n' && (!lf || static_cast<const char *>(lf) > c) && !std::memchr(m_p, '"', size_t(c - m_p)))
                return u"%1 line 1: lines end with a lone carriage return; expected LF or CRLF line ends"_s.arg(m_label);
        }
        // Enough lines to detect the delimiter and the header.
        while (!m_stream.atEof() && m_stream.end() - m_p < kDetectBytes && countRecords() < kDetectRecords) {
            const qsizetype offset = m_p - m_stream.pos();
            s = m_stream.extend();
            if (s != BlockStream::Status::Ok && s != BlockStream::Status::End)
                return streamError(s);
            m_p = m_stream.pos() + offset;
        }
        while (m_p < m_stream.end() && isBlankLine(m_p, m_stream.end())) {
            m_p = skipBlankLine(m_p);
            ++m_line;
        }
        if (m_p >= m_stream.end())
            return u"%1 is empty; expected a header and data rows"_s.arg(m_label);
        m_delimiter = delimiter ? delimiter : detectDelimiter(m_p, m_stream.end());
        if (!m_delimiter && parseRecord(m_p, m_stream.end(), ',', m_first) == RecordStatus::Incomplete)
            return recordError(RecordStatus::Incomplete, m_first, m_line);
        if (!m_delimiter)
            return u"%1 line %2: no delimiter found (looked for tab, comma, semicolon and vertical bar); "
                   "expected at least two columns"_s.arg(m_label).arg(m_line);
        // The first two records, for the header decision.
        const RecordStatus first = parseRecord(m_p, m_stream.end(), m_delimiter, m_first);
        if (first != RecordStatus::Complete)
            return recordError(first, m_first, m_line);
        const char *q = m_first.next;
        qint64 line2 = m_line + m_first.newlines;
        while (q < m_stream.end() && isBlankLine(q, m_stream.end())) {
            q = skipBlankLine(q);
            ++line2;
        }
        m_hasSecond = q < m_stream.end() && parseRecord(q, m_stream.end(), m_delimiter, m_second) == RecordStatus::Complete;
        for (int i = 0; i < m_first.count; ++i) {
            const auto name = decodeUtf8(trimmed(m_first.field(i)));
            if (!name)
                return notUtf8(m_line, i + 1);
            m_firstText << *name;
        }
        return {};
    }

    QString notUtf8(qint64 line, int field) const
    {
        return u"%1 line %2: field %3 is not valid UTF-8; save the file as UTF-8"_s.arg(m_label).arg(line).arg(field);
    }

    QString streamError(BlockStream::Status s) const
    {
        switch (s) {
        case BlockStream::Status::ReadError:
            return u"%1: read error after %2 bytes"_s.arg(m_label).arg(m_stream.bytesRead());
        case BlockStream::Status::Cancelled:
            return u"reading %1 was cancelled"_s.arg(m_label);
        case BlockStream::Status::TooLong:
            return u"%1 line %2: a record longer than %3 MiB; is a quote left open?"_s.arg(m_label).arg(m_line).arg(
                kMaxRecordBytes / (1024 * 1024));
        default:
            return {};
        }
    }

    QString recordError(RecordStatus s, const SlowRecord &r, qint64 line) const
    {
        if (s == RecordStatus::TextAfterQuote)
            return u"%1 line %2: field %3 has text after its closing quote; expected a delimiter or the end of the line"_s
                .arg(m_label)
                .arg(line + r.newlines)
                .arg(r.badField);
        return u"%1 line %2: a quoted field is never closed; expected a closing quote"_s.arg(m_label).arg(line + r.quoteLine);
    }

    int countRecords() const
    {
        int n = 0;
        const char *q = m_p;
        const char *end = m_stream.end();
        while (q < end && n < kDetectRecords) {
            q = static_cast<const char *>(std::memchr(q, '\n', size_t(end - q)));
            if (!q)
                break;
            ++q;
            ++n;
        }
        return n;
    }

    // Column position for a spec (name in the header, or a 1-based number); -1 when none.
    int findByName(const QString &spec) const { return int(m_firstText.indexOf(spec.trimmed())); }
    int findByNumber(const QString &spec) const
    {
        bool ok = false;
        const int n = spec.trimmed().toInt(&ok);
        return ok && n >= 1 && n <= m_first.count ? n - 1 : -1;
    }
    QString suggestion(const QString &spec) const
    {
        for (const QString &c : m_firstText)
            if (c.compare(spec.trimmed(), Qt::CaseInsensitive) == 0)
                return u" (did you mean %1?)"_s.arg(quoted(c));
        return {};
    }

    // After the header decision: skip the header record when there is one.
    void skipHeader()
    {
        m_p = m_first.next;
        m_line += m_first.newlines;
    }

    QStringList columnNames(bool hasHeader) const
    {
        if (hasHeader)
            return m_firstText;
        QStringList out;
        for (int i = 1; i <= m_first.count; ++i)
            out << QString::number(i);
        return out;
    }

    BlockStream m_stream;
    QString m_label;
    const char *m_p = nullptr;
    qint64 m_line = 1;
    char m_delimiter = 0;
    SlowRecord m_first;
    SlowRecord m_second;
    bool m_hasSecond = false;
    QStringList m_firstText;
};

// Hands each record from the start's position on to take() (which reads the parsed record
// and start.m_line, its first line), across blocks; blank lines are skipped and counted.
// Returns the first problem: a broken record, a failed read, or what take() returns.
template <typename Take>
QString forEachRecord(FileStart &start, char delimiter, SlowRecord &record, qint64 &blankLines, Take take)
{
    BlockStream &stream = start.m_stream;
    const char *p = start.m_p;
    for (;;) {
        const char *end = stream.end();
        while (p < end) {
            if (isBlankLine(p, end)) {
                p = skipBlankLine(p);
                ++start.m_line;
                ++blankLines;
                continue;
            }
            const RecordStatus st = parseRecord(p, end, delimiter, record);
            if (st == RecordStatus::Incomplete && !stream.atEof())
                break;
            if (st != RecordStatus::Complete)
                return start.recordError(st, record, start.m_line);
            const QString error = take();
            if (!error.isEmpty())
                return error;
            p = record.next;
            start.m_line += record.newlines;
        }
        const BlockStream::Status s = stream.next(p);
        if (s == BlockStream::Status::End)
            return {};
        if (s != BlockStream::Status::Ok)
            return start.streamError(s);
        p = stream.pos();
    }
}

// ---------------------------------------------------------------------------
// The long-format reader

// A factor value as found in a record. Keys of up to 16 bytes are also held as two
// little-endian words, so that finding a level costs two loads and compares.
struct LevelKey
{
    std::string_view text;
    uint64_t w0 = 0;
    uint64_t w1 = 0;
    uint64_t hash = 0;
};

inline uint64_t load8(const char *p)
{
    uint64_t v;
    std::memcpy(&v, p, 8);
    return v;
}

inline uint64_t lowBytes(uint64_t v, size_t n)
{
    return n >= 8 ? v : v & ((uint64_t(1) << (8 * n)) - 1);
}

// readable16: 16 bytes from text.data() may be read (true inside the block buffer).
inline LevelKey makeKey(std::string_view text, bool readable16)
{
    LevelKey k{text};
    const size_t n = text.size();
    if (n <= 16) {
        char copy[16] = {};
        const char *p = text.data();
        if (!readable16) {
            std::memcpy(copy, p, n);
            p = copy;
        }
        k.w0 = lowBytes(load8(p), n);
        k.w1 = n > 8 ? lowBytes(load8(p + 8), n - 8) : 0;
        const uint64_t h = (k.w0 ^ (k.w1 * 0x9E3779B97F4A7C15ull) ^ n) * 0xFF51AFD7ED558CCDull;
        k.hash = h ^ (h >> 29);
        return k;
    }
    k.hash = 1469598103934665603ull; // FNV-1a
    for (char c : text) {
        k.hash ^= static_cast<unsigned char>(c);
        k.hash *= 1099511628211ull;
    }
    return k;
}

// One level's statistics while reading. Within chunks of up to kChunkRows values the
// reader keeps sums of deviations from a shift, the chunk's first value (no division per
// row); each full chunk is merged into the running statistics with the pairwise formula
// of Chan, Golub & LeVeque (1983). As the shift is one of the chunk's values, the chunk's
// sum of squares loses at most about (1 + kChunkRows) units of rounding. The running
// statistics are kept about the level's first value (the origin), so that updating a
// mean of, say, 1e9 + 50 does not round away the digits that the variance needs.
struct LevelAccumulator
{
    static constexpr int kChunkRows = 64;

    void add(double y, double weight = 1.0)
    {
        if (m_count == 0)
            startChunk(y);
        const double d = y - m_shift;
        m_w += weight;
        m_s1 += weight * d;
        m_s2 += weight * d * d;
        if (++m_count == kChunkRows)
            flush();
    }
    void flush()
    {
        if (m_count > 0) {
            RunningStats chunk;
            chunk.rows = m_count;
            chunk.n = m_w;
            if (m_w > 0.0) {
                const double offset = m_s1 / m_w;
                chunk.mean = (m_shift - m_origin) + offset;
                chunk.m2 = std::max(0.0, m_s2 - m_s1 * offset);
            }
            m_total.merge(chunk);
        }
        m_count = 0;
        m_w = m_s1 = m_s2 = 0.0;
    }
    // The statistics so far (call after flush()).
    RunningStats result() const
    {
        RunningStats r = m_total;
        r.mean += m_origin;
        return r;
    }

private:
    void startChunk(double y)
    {
        if (m_total.rows == 0)
            m_origin = y;
        m_shift = y;
    }

    RunningStats m_total; // about m_origin
    double m_origin = 0.0;
    double m_shift = 0.0;
    double m_w = 0.0;
    double m_s1 = 0.0;
    double m_s2 = 0.0;
    int m_count = 0;
};

// Open-addressing table from factor value to level index, in order of first appearance.
class LevelTable
{
public:
    LevelTable() { m_slots.assign(64, Slot{}); }

    // Index of the level with this key, or -1 when it is new (then call insert).
    int find(const LevelKey &key) const
    {
        const size_t mask = m_slots.size() - 1;
        for (size_t i = size_t(key.hash) & mask;; i = (i + 1) & mask) {
            const Slot &s = m_slots[i];
            if (s.index < 0)
                return -1;
            if (s.hash == key.hash && s.w0 == key.w0 && s.w1 == key.w1 && s.length == key.text.size()
                && (s.length <= 16 || m_keys[size_t(s.index)] == key.text))
                return s.index;
        }
    }
    int insert(const LevelKey &key)
    {
        const int index = int(m_keys.size());
        m_keys.emplace_back(key.text);
        stats.emplace_back();
        if (m_keys.size() * 2 > m_slots.size()) {
            std::vector<Slot> old(m_slots.size() * 2, Slot{});
            old.swap(m_slots);
            for (const Slot &s : old)
                if (s.index >= 0)
                    place(s);
        }
        place(Slot{key.hash, key.w0, key.w1, key.text.size(), index});
        return index;
    }
    size_t size() const { return m_keys.size(); }
    const std::string &key(size_t i) const { return m_keys[i]; }

    std::vector<LevelAccumulator> stats;

private:
    struct Slot
    {
        uint64_t hash = 0;
        uint64_t w0 = 0;
        uint64_t w1 = 0;
        size_t length = 0;
        int index = -1;
    };
    void place(const Slot &slot)
    {
        size_t i = size_t(slot.hash) & (m_slots.size() - 1);
        while (m_slots[i].index >= 0)
            i = (i + 1) & (m_slots.size() - 1);
        m_slots[i] = slot;
    }
    std::vector<Slot> m_slots;
    std::vector<std::string> m_keys;
};

// Clinger's fast path (Clinger 1990, "How to read floating point numbers accurately"):
// a plain decimal of at most 15 significant digits and no exponent is an exact integer
// over an exact power of ten, and one IEEE division rounds it correctly, giving the same
// double as std::from_chars. Returns the end of the number, or nullptr when it is not
// such a number (then std::from_chars decides).
inline const char *parsePlainDecimal(const char *p, double &out)
{
    static constexpr double kPow10[] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7,
                                        1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15};
    const bool negative = *p == '-';
    p += negative;
    uint64_t m = 0;
    const char *start = p;
    while (unsigned(*p - '0') < 10u)
        m = m * 10 + unsigned(*p++ - '0');
    const ptrdiff_t whole = p - start;
    ptrdiff_t frac = 0;
    if (*p == '.') {
        const char *f = ++p;
        while (unsigned(*p - '0') < 10u)
            m = m * 10 + unsigned(*p++ - '0');
        frac = p - f;
    }
    if (whole + frac == 0 || whole + frac > 15 || *p == 'e' || *p == 'E')
        return nullptr;
    const double v = double(m) / kPow10[frac];
    out = negative ? -v : v;
    return p;
}

// What the two table readers share: the start of the file, the summary being
// filled, and the order of the steps.
class TableReader
{
protected:
    TableReader(ByteSource &source, const QString &label, qsizetype blockBytes, std::function<bool(qint64)> progress)
        : m_start(source, label, blockBytes, std::move(progress))
    {
        m_out.source = label;
    }

    template <typename Self>
    static Result<DataSummary> runSteps(Self &self, char delimiter)
    {
        QString error = self.m_start.begin(delimiter);
        if (error.isEmpty())
            error = self.resolveColumns();
        if (error.isEmpty())
            error = self.readAll();
        if (error.isEmpty() && self.m_out.usedRows == 0 && !self.m_out.skipped.empty())
            error = u"%1: no row could be used; the first left out is line %2: %3"_s.arg(self.m_out.source)
                        .arg(self.m_out.skipped.front().line)
                        .arg(self.m_out.skipped.front().message);
        if (!error.isEmpty())
            return Result<DataSummary>::failure(error);
        self.m_out.bytes = self.m_start.m_stream.bytesRead();
        self.m_out.lines = self.m_start.m_line - 1;
        return std::move(self.m_out);
    }

    FileStart m_start;
    DataSummary m_out;
};

class LongReader : TableReader
{
public:
    LongReader(ByteSource &source, const QString &label, const DataReadOptions &options)
        : TableReader(source, label, options.blockBytes, options.progress), m_options(options)
    {
    }

    Result<DataSummary> run() { return runSteps(*this, m_options.delimiter); }

private:
    friend class TableReader;

    QString fail(qint64 line, const QString &what) const
    {
        return u"%1 line %2: %3"_s.arg(m_start.m_label).arg(line).arg(what);
    }

    QString resolveColumns()
    {
        const QString &label = m_start.m_label;
        if (m_options.factorColumn.trimmed().isEmpty())
            return u"no factor column given; name the column that holds the levels"_s;
        if (m_options.responseColumn.trimmed().isEmpty())
            return u"no response column given; name the column that holds the measurements"_s;
        struct Spec
        {
            QString text;
            QString role;
            int *index;
        };
        if (m_options.moreFactorColumns.size() > 2)
            return u"%1 factor columns; a design has at most 3 factors"_s.arg(m_options.moreFactorColumns.size() + 1);
        m_out.moreFactorIndices.assign(size_t(m_options.moreFactorColumns.size()), -1);
        std::vector<Spec> specs = {{m_options.factorColumn, u"factor"_s, &m_out.factorIndex},
                                   {m_options.responseColumn, u"response"_s, &m_out.responseIndex}};
        for (qsizetype i = 0; i < m_options.moreFactorColumns.size(); ++i) {
            if (m_options.moreFactorColumns[i].trimmed().isEmpty())
                return u"factor column %1 is not named; name the column that holds that factor's levels"_s.arg(i + 2);
            specs.push_back({m_options.moreFactorColumns[i], u"factor"_s, &m_out.moreFactorIndices[size_t(i)]});
        }
        if (!m_options.weightColumn.trimmed().isEmpty())
            specs.push_back({m_options.weightColumn, u"weight"_s, &m_out.weightIndex});
        if (!m_options.participantColumn.trimmed().isEmpty())
            specs.push_back({m_options.participantColumn, u"participant"_s, &m_out.participantIndex});
        if (!m_options.itemColumn.trimmed().isEmpty() && m_options.participantColumn.trimmed().isEmpty())
            return u"an item column needs a participant column: the by-item analysis sits beside the by-participant one"_s;
        if (!m_options.itemColumn.trimmed().isEmpty())
            specs.push_back({m_options.itemColumn, u"item"_s, &m_out.itemIndex});

        bool hasHeader = m_options.header == HeaderMode::Present;
        if (m_options.header == HeaderMode::Detect) {
            bool anyByName = false;
            bool allByNumber = true;
            // A number is a column number here; a header cell named "2" needs HeaderMode::Present.
            for (const Spec &s : specs) {
                const bool byNumber = m_start.findByNumber(s.text) >= 0;
                anyByName = anyByName || (!byNumber && m_start.findByName(s.text) >= 0);
                allByNumber = allByNumber && byNumber;
            }
            if (anyByName || !allByNumber) {
                hasHeader = true;
            } else {
                // Columns given by number: a header has text where the data have numbers.
                const int r = m_start.findByNumber(m_options.responseColumn);
                const std::string_view cell = m_start.m_first.field(r);
                hasHeader = !looksNumeric(cell) && !isMissingToken(cell);
            }
        }
        m_out.hasHeader = hasHeader;
        m_out.columns = m_start.columnNames(hasHeader);
        for (const Spec &s : specs) {
            int index = m_options.header == HeaderMode::Present ? m_start.findByName(s.text) : -1;
            if (index < 0)
                index = m_start.findByNumber(s.text);
            if (index < 0 && hasHeader)
                index = m_start.findByName(s.text);
            if (index < 0) {
                if (m_options.header == HeaderMode::Detect && !anyNameFound(specs)
                    && !guessHeader(m_start.m_first, m_start.m_hasSecond ? &m_start.m_second : nullptr))
                    return u"%1: no column %2 for the %3: the first row does not look like a header; "
                           "give a column number from 1 to %4 or add a header row"_s.arg(label, quoted(s.text), s.role)
                        .arg(m_start.m_first.count);
                if (!hasHeader)
                    return u"%1: no column %2 for the %3: the file has no header row; give a column number from 1 to %4"_s
                        .arg(label, quoted(s.text), s.role)
                        .arg(m_start.m_first.count);
                return u"%1: no column %2 for the %3; the columns are: %4%5"_s.arg(
                    label, quoted(s.text), s.role, joinColumns(m_out.columns), m_start.suggestion(s.text));
            }
            *s.index = index;
        }
        std::vector<int> factors{m_out.factorIndex};
        factors.insert(factors.end(), m_out.moreFactorIndices.begin(), m_out.moreFactorIndices.end());
        for (size_t i = 0; i < factors.size(); ++i) {
            if (factors[i] == m_out.responseIndex)
                return u"%1: the factor and the response are the same column (%2); choose two different columns"_s.arg(
                    label, quoted(m_out.columns[factors[i]]));
            for (size_t j = 0; j < i; ++j)
                if (factors[j] == factors[i])
                    return u"%1: column %2 is named for two factors; give each factor its own column"_s.arg(
                        label, quoted(m_out.columns[factors[i]]));
        }
        if (m_out.weightIndex >= 0
            && (std::find(factors.begin(), factors.end(), m_out.weightIndex) != factors.end() || m_out.weightIndex == m_out.responseIndex))
            return u"%1: the weight column (%2) is also the factor or the response; choose another column"_s.arg(
                label, quoted(m_out.columns[m_out.weightIndex]));
        if (const int pi = m_out.participantIndex;
            pi >= 0 && (std::find(factors.begin(), factors.end(), pi) != factors.end() || pi == m_out.responseIndex || pi == m_out.weightIndex))
            return u"%1: the participant column (%2) is also the factor, the response or the weight; choose the column that "
                   u"names the participants"_s.arg(label, quoted(m_out.columns[pi]));
        if (const int ii = m_out.itemIndex; ii >= 0
            && (std::find(factors.begin(), factors.end(), ii) != factors.end() || ii == m_out.responseIndex || ii == m_out.weightIndex
                || ii == m_out.participantIndex))
            return u"%1: the item column (%2) is also the factor, the response, the weight or the participant; choose the "
                   u"column that names the items"_s.arg(label, quoted(m_out.columns[ii]));
        m_participants.column = m_out.participantIndex;
        m_items.column = m_out.itemIndex;
        m_out.delimiter = m_start.m_delimiter;
        m_out.weighted = m_out.weightIndex >= 0;
        m_fieldCount = m_start.m_first.count;
        if (hasHeader)
            m_start.skipHeader();
        return {};
    }

    template <typename Specs>
    bool anyNameFound(const Specs &specs) const
    {
        return std::any_of(specs.begin(), specs.end(), [this](const auto &s) { return m_start.findByName(s.text) >= 0; });
    }

    QString readAll()
    {
        BlockStream &stream = m_start.m_stream;
        const char delim = m_out.delimiter;
        std::memset(m_class, 0, sizeof m_class);
        m_class[static_cast<unsigned char>(delim)] = 1;
        m_class[static_cast<unsigned char>('\n')] = 1;
        m_class[static_cast<unsigned char>('\r')] = 1;
        m_class[static_cast<unsigned char>('"')] = 1;
        const char *p = m_start.m_p;
        for (;;) {
            const char *end = stream.end();
            QString error;
            const bool incomplete = !processRegion(p, end, error);
            if (!error.isEmpty())
                return error;
            if (incomplete && stream.atEof())
                return m_start.recordError(RecordStatus::Incomplete, m_slow, m_start.m_line);
            const BlockStream::Status s = stream.next(p);
            if (s == BlockStream::Status::End)
                break;
            if (s != BlockStream::Status::Ok)
                return m_start.streamError(s);
            p = stream.pos();
        }
        if (m_out.records == 0)
            return m_out.hasHeader ? u"%1 has a header but no data rows"_s.arg(m_start.m_label)
                                   : u"%1 has no data rows"_s.arg(m_start.m_label);
        finish();
        return {};
    }

    // Parses the whole records in [p, end); returns false when the last one runs
    // past end (a quoted line break), leaving p at its start.
    bool processRegion(const char *&p, const char *end, QString &error)
    {
        const char delim = m_out.delimiter;
        const int fi = m_out.factorIndex;
        const int ri = m_out.responseIndex;
        const int wi = m_out.weightIndex;
        const int pi = m_out.participantIndex;
        const int ii = m_out.itemIndex;
        // Further factor columns of a design (at most two: resolveColumns refuses more); -1, never
        // a field number, when not given.
        int mi[2] = {-1, -1};
        std::copy(m_out.moreFactorIndices.begin(), m_out.moreFactorIndices.end(), mi);
        qint64 &line = m_start.m_line;
        while (p < end) {
            if (*p == '\n' || (*p == '\r' && p[1] == '\n')) {
                p = skipBlankLine(p);
                ++line;
                ++m_out.blankLines;
                continue;
            }
            const char *rec = p;
            std::string_view level, response, weight, participant, item;
            std::string_view more[2];
            double y = 0.0;
            bool yParsed = false;
            bool slow = false;
            int f = 0;
            for (;;) {
                const char *s = p;
                if (f == ri) {
                    const unsigned char c0 = static_cast<unsigned char>(*p);
                    if (unsigned(c0 - '0') < 10u || c0 == '-' || c0 == '.') {
                        const char *q = parsePlainDecimal(p, y);
                        if (!q) {
                            const auto r = std::from_chars(p, end, y);
                            q = r.ec == std::errc() ? r.ptr : nullptr;
                        }
                        if (q && (*q == delim || *q == '\n' || *q == '\r')) {
                            p = q;
                            yParsed = true;
                        }
                    }
                }
                while (!m_class[static_cast<unsigned char>(*p)])
                    ++p;
                const char c = *p;
                if (c == '"') {
                    slow = true;
                    break;
                }
                if (f == fi)
                    level = std::string_view(s, size_t(p - s));
                else if (f == ri)
                    response = std::string_view(s, size_t(p - s));
                else if (f == wi)
                    weight = std::string_view(s, size_t(p - s));
                else if (f == pi)
                    participant = std::string_view(s, size_t(p - s));
                else if (f == ii)
                    item = std::string_view(s, size_t(p - s));
                else if (f == mi[0])
                    more[0] = std::string_view(s, size_t(p - s));
                else if (f == mi[1])
                    more[1] = std::string_view(s, size_t(p - s));
                ++f;
                if (c == delim) {
                    ++p;
                    continue;
                }
                if (c == '\n') {
                    ++p;
                    break;
                }
                if (p[1] == '\n') {
                    p += 2;
                    break;
                }
                slow = true; // a lone carriage return inside a field
                break;
            }
            int newlines = 1;
            if (slow) {
                const RecordStatus st = parseRecord(rec, end, delim, m_slow);
                if (st == RecordStatus::Incomplete) {
                    p = rec;
                    return false;
                }
                if (st != RecordStatus::Complete) {
                    error = m_start.recordError(st, m_slow, line);
                    return true;
                }
                p = m_slow.next;
                f = m_slow.count;
                newlines = m_slow.newlines;
                yParsed = false;
                if (f == m_fieldCount) {
                    level = m_slow.field(fi);
                    response = m_slow.field(ri);
                    if (wi >= 0)
                        weight = m_slow.field(wi);
                    if (pi >= 0)
                        participant = m_slow.field(pi);
                    if (ii >= 0)
                        item = m_slow.field(ii);
                    for (int i = 0; i < 2; ++i)
                        if (mi[i] >= 0)
                            more[i] = m_slow.field(mi[i]);
                }
            }
            if (f != m_fieldCount) {
                if (f == 1 && std::all_of(rec, p, [](char c) { return c == ' ' || c == '\t' || c == '\r' || c == '\n'; })) {
                    line += newlines; // a line of spaces counts as blank
                    ++m_out.blankLines;
                    continue;
                }
                error = fail(line, u"%1 %2; expected %3 as in %4"_s.arg(f)
                                       .arg(f == 1 ? u"field"_s : u"fields"_s)
                                       .arg(m_fieldCount)
                                       .arg(m_out.hasHeader ? u"the header"_s : u"the first row"_s));
                return true;
            }
            ++m_out.records;
            if (yParsed && !std::isfinite(y))
                yParsed = false;
            if (mi[0] >= 0) [[unlikely]] {
                if (!joinCell(line, level, more)) { // an empty factor value: the row was left out and reported
                    line += newlines;
                    continue;
                }
                level = m_cell;
                slow = true; // the joined name lives outside the block buffer
            }
            const qint64 used = m_out.usedRows;
            addRow(line, level, !slow, yParsed, y, response, weight, error);
            if (!error.isEmpty())
                return true;
            if (pi >= 0 && m_out.usedRows > used) [[unlikely]] {
                addToUnit(m_participants, line, participant, error);
                if (ii >= 0 && error.isEmpty())
                    addToUnit(m_items, line, item, error);
                if (!error.isEmpty())
                    return true;
            }
            line += newlines;
        }
        return true;
    }

    // A design's cell name, "grass·early" (kCellJoiner), from the row's factor values (trimmed) into m_cell.
    // False when one is empty: the row is left out and reported, naming the column.
    bool joinCell(qint64 line, std::string_view first, const std::string_view (&more)[2])
    {
        m_cell.clear();
        const size_t count = 1 + m_out.moreFactorIndices.size();
        for (size_t i = 0; i < count; ++i) {
            const std::string_view part = trimmed(i == 0 ? first : more[i - 1]);
            if (part.empty()) {
                skip(line, u"factor (column %1) is empty"_s.arg(
                               quoted(m_out.columns[i == 0 ? m_out.factorIndex : m_out.moreFactorIndices[i - 1]])));
                return false;
            }
            if (i > 0)
                m_cell += kCellJoiner;
            m_cell.append(part);
        }
        return true;
    }

    // inBuffer: the views point into the block buffer (not into a parsed copy).
    void addRow(qint64 line, std::string_view level, bool inBuffer, bool yParsed, double y, std::string_view response,
                std::string_view weight, QString &error)
    {
        if (level.empty() || level.front() == ' ' || level.back() == ' ' || level.front() == '\t' || level.back() == '\t')
            [[unlikely]] {
            level = trimmed(level);
            if (level.empty())
                return skip(line, u"factor (column %1) is empty"_s.arg(quoted(m_out.columns[m_out.factorIndex])));
        }
        if (!yParsed) [[unlikely]] {
            const auto v = parseNumberField(response);
            if (!v)
                return skip(line, u"response (column %1) %2"_s.arg(quoted(m_out.columns[m_out.responseIndex]),
                                                                     numberProblem(response, m_out.delimiter)));
            y = *v;
        }
        if (std::abs(y) > kLargestDataValue) [[unlikely]]
            return skip(line, u"response (column %1) %2 is too large; expected a number between -1e100 and 1e100 (rescale the response)"_s.arg(
                                  quoted(m_out.columns[m_out.responseIndex]), quoteText(trimmed(response))));
        double w = 1.0;
        if (m_out.weightIndex >= 0) {
            const auto v = parseNumberField(weight);
            if (!v)
                return skip(line, u"weight (column %1) %2"_s.arg(quoted(m_out.columns[m_out.weightIndex]),
                                                                   numberProblem(weight, m_out.delimiter)));
            if (*v < 0)
                return skip(line, u"weight (column %1) %2 is negative; expected a number >= 0"_s.arg(
                                      quoted(m_out.columns[m_out.weightIndex]), quoteText(trimmed(weight))));
            if (*v > kLargestDataWeight)
                return skip(line, u"weight (column %1) %2 is too large; expected at most 1e50"_s.arg(
                                      quoted(m_out.columns[m_out.weightIndex]), quoteText(trimmed(weight))));
            w = *v;
        }
        const LevelKey key = makeKey(level, inBuffer);
        int index = m_levels.find(key);
        if (index < 0) [[unlikely]] {
            index = newLevel(line, key, error);
            if (index < 0)
                return;
        }
        m_levels.stats[size_t(index)].add(y, w);
        ++m_out.usedRows;
        m_lastLevel = index;
        m_lastY = y;
        m_lastWeight = w;
    }

    // Rows grouped by a naming column (the participants, the items): each one's statistics per level.
    struct Units
    {
        explicit Units(const char16_t *word) : role(word) {}
        const char16_t *role; // "participant", "item": the word in messages
        int column = -1;
        LevelTable names;
        std::vector<qint64> firstLines;                 // [unit]: the line it first appears on
        std::vector<std::vector<RunningStats>> cells; // [unit][level]
        std::vector<std::vector<qint64>> cellLines;   // [unit][level]: the line of its first row there, 0 for none
    };

    // The row just added (m_lastLevel, m_lastY, m_lastWeight), into its unit's cell (its participant's, its item's).
    void addToUnit(Units &units, qint64 line, std::string_view name, QString &error)
    {
        name = trimmed(name);
        const QString role = QString::fromUtf16(units.role);
        if (name.empty()) {
            error = fail(line, u"the %1 (column %2) is empty; every row needs the %1 it belongs to"_s.arg(
                                   role, quoted(m_out.columns[units.column])));
            return;
        }
        const LevelKey key = makeKey(name, false);
        int index = units.names.find(key);
        if (index < 0) {
            if (!decodeUtf8(key.text)) {
                error = fail(line, u"the %1 is not valid UTF-8; save the file as UTF-8"_s.arg(role));
                return;
            }
            index = units.names.insert(key);
            units.cells.emplace_back();
            units.cellLines.emplace_back();
            units.firstLines.push_back(line);
        }
        std::vector<RunningStats> &cells = units.cells[size_t(index)];
        std::vector<qint64> &lines = units.cellLines[size_t(index)];
        if (cells.size() <= size_t(m_lastLevel)) {
            cells.resize(size_t(m_lastLevel) + 1);
            lines.resize(size_t(m_lastLevel) + 1, 0);
        }
        if (lines[size_t(m_lastLevel)] == 0)
            lines[size_t(m_lastLevel)] = line;
        cells[size_t(m_lastLevel)].add(m_lastY, m_lastWeight);
    }

    // The units' names in order of first appearance, their cells over every level.
    QStringList finishUnits(Units &units)
    {
        QStringList names;
        for (size_t i = 0; i < units.names.size(); ++i) {
            const std::string &k = units.names.key(i);
            names << QString::fromUtf8(k.data(), qsizetype(k.size()));
            units.cells[i].resize(m_levels.size());
            units.cellLines[i].resize(m_levels.size(), 0);
        }
        return names;
    }

    int newLevel(qint64 line, const LevelKey &key, QString &error)
    {
        if (!decodeUtf8(key.text)) {
            error = fail(line, u"the factor value is not valid UTF-8; save the file as UTF-8"_s);
            return -1;
        }
        if (int(m_levels.size()) >= kMaxDataLevels) {
            error = fail(line, u"column %1 has more than %2 different values; is it really the factor?"_s
                                   .arg(quoted(m_out.columns[m_out.factorIndex]))
                                   .arg(kMaxDataLevels));
            return -1;
        }
        return m_levels.insert(key);
    }

    void skip(qint64 line, const QString &message)
    {
        ++m_out.skippedRows;
        if (m_out.skipped.size() < size_t(kReportedRowProblems))
            m_out.skipped.push_back({line, message});
    }

    void finish()
    {
        for (size_t i = 0; i < m_levels.size(); ++i) {
            const std::string &k = m_levels.key(i);
            m_levels.stats[i].flush();
            m_out.levels.push_back({QString::fromUtf8(k.data(), qsizetype(k.size())), m_levels.stats[i].result()});
        }
        m_out.participants = finishUnits(m_participants);
        m_out.participantCells = std::move(m_participants.cells);
        m_out.participantFirstLines = std::move(m_participants.cellLines);
        m_out.items = finishUnits(m_items);
        m_out.itemCells = std::move(m_items.cells);
        m_out.itemLines = std::move(m_items.firstLines);
    }

    const DataReadOptions &m_options;
    LevelTable m_levels;
    SlowRecord m_slow;
    std::string m_cell; // a design row's joined cell name
    Units m_participants{u"participant"}; // with a participant column
    Units m_items{u"item"};               // with an item column as well
    int m_lastLevel = -1;
    double m_lastY = 0.0;
    double m_lastWeight = 1.0;
    int m_fieldCount = 0;
    unsigned char m_class[256] = {};
};

// ---------------------------------------------------------------------------
// The summary-table reader

class SummaryReader : TableReader
{
public:
    SummaryReader(ByteSource &source, const QString &label, const SummaryReadOptions &options)
        : TableReader(source, label, kDefaultBlockBytes, {}), m_options(options)
    {
        m_out.fromSummaryTable = true;
    }

    Result<DataSummary> run() { return runSteps(*this, m_options.delimiter); }

private:
    friend class TableReader;

    QString resolveColumns()
    {
        static const std::array<QStringList, 4> names = {
            QStringList{u"level"_s, u"group"_s, u"name"_s, u"factor"_s, u"condition"_s, u"cell"_s},
            QStringList{u"n"_s, u"count"_s, u"size"_s},
            QStringList{u"mean"_s, u"average"_s, u"avg"_s},
            QStringList{u"sd"_s, u"stdev"_s, u"std"_s, u"sdev"_s, u"std.dev"_s, u"standard deviation"_s, u"s"_s},
        };
        // The spread may be given as a variance instead (what the summary query returns).
        static const QStringList varianceNames = {u"variance"_s, u"var"_s};
        const SlowRecord &first = m_start.m_first;
        if (first.count < 4)
            return u"%1 line %2: %3 columns; a summary table needs four: level, n, mean, sd"_s
                .arg(m_start.m_label)
                .arg(m_start.m_line)
                .arg(first.count);
        bool hasHeader = m_options.header == HeaderMode::Present;
        if (m_options.header == HeaderMode::Detect)
            hasHeader = !looksNumeric(first.field(1)) && !looksNumeric(first.field(2));
        if (!hasHeader) {
            m_index = {0, 1, 2, 3};
            m_out.columns = m_start.columnNames(false);
        } else {
            m_out.columns = m_start.columnNames(true);
            for (size_t role = 0; role < names.size(); ++role) {
                m_index[role] = -1;
                for (int i = 0; i < m_out.columns.size() && m_index[role] < 0; ++i)
                    if (names[role].contains(m_out.columns[i].trimmed().toLower()))
                        m_index[role] = i;
                for (int i = 0; role == 3 && i < m_out.columns.size() && m_index[role] < 0; ++i)
                    if (varianceNames.contains(m_out.columns[i].trimmed().toLower())) {
                        m_index[role] = i;
                        m_variance = true;
                    }
                if (m_index[role] < 0)
                    return u"%1 line %2: no '%3' column in the header (%4); a summary table needs columns named "
                           "level, n, mean and sd (or variance)"_s.arg(m_start.m_label)
                        .arg(m_start.m_line)
                        .arg(names[role].first(), joinColumns(m_out.columns));
            }
            m_start.skipHeader();
        }
        m_out.hasHeader = hasHeader;
        m_out.delimiter = m_start.m_delimiter;
        m_out.factorIndex = m_index[0];
        return {};
    }

    QString readAll()
    {
        const QString error = forEachRecord(m_start, m_out.delimiter, m_record, m_out.blankLines, [this] { return addRow(); });
        if (!error.isEmpty())
            return error;
        if (m_out.levels.empty())
            return u"%1 has no rows; expected one row per level"_s.arg(m_start.m_label);
        return {};
    }

    QString addRow()
    {
        const qint64 line = m_start.m_line;
        const QString &label = m_start.m_label;
        if (m_record.count != m_out.columns.size())
            return u"%1 line %2: %3 fields; expected %4 as in %5"_s.arg(label)
                .arg(line)
                .arg(m_record.count)
                .arg(m_out.columns.size())
                .arg(m_out.hasHeader ? u"the header"_s : u"the first row"_s);
        ++m_out.records;
        const auto name = decodeUtf8(trimmed(m_record.field(m_index[0])));
        if (!name)
            return u"%1 line %2: the level name is not valid UTF-8; save the file as UTF-8"_s.arg(label).arg(line);
        const QString place = u"%1 line %2"_s.arg(label).arg(line);
        const auto number = [&](size_t role) { return parseNumberField(m_record.field(m_index[role])); };
        const std::optional<double> n = number(1);
        if (!n || *n <= 0)
            return u"%1 line %2: n %3; expected a positive number"_s.arg(label).arg(line).arg(
                n ? quoteText(trimmed(m_record.field(m_index[1]))) + u" is not positive"_s
                  : numberProblem(m_record.field(m_index[1]), m_out.delimiter));
        const std::optional<double> mean = number(2);
        if (!mean)
            return u"%1 line %2: mean %3; expected a number"_s.arg(label).arg(line).arg(
                numberProblem(m_record.field(m_index[2]), m_out.delimiter));
        const std::string_view sdText = m_record.field(m_index[3]);
        const std::optional<double> sd = parseNumberField(sdText);
        if (!sd && !isMissingToken(sdText))
            return u"%1: %2 %3; expected a number >= 0 (it may be left empty only when n is 1)"_s.arg(
                place, m_variance ? u"variance"_s : u"sd"_s, numberProblem(sdText, m_out.delimiter));
        return addSummaryRow(m_out, SummaryRow{*name, *n, *mean, sd, m_variance, place, {}});
    }

    const SummaryReadOptions &m_options;
    bool m_variance = false; // the spread column is a variance
    SlowRecord m_record;
    std::array<int, 4> m_index = {0, 1, 2, 3};
};

// ---------------------------------------------------------------------------
// Preview

Result<DataPreview> preview(ByteSource &source, const QString &label, int maxRows, char delimiter, HeaderMode header)
{
    FileStart start(source, label, kDefaultBlockBytes, {});
    const QString error = start.begin(delimiter);
    if (!error.isEmpty())
        return Result<DataPreview>::failure(error);
    DataPreview out;
    out.source = label;
    out.fileSize = source.size();
    out.delimiter = start.m_delimiter;
    out.hasHeader = header == HeaderMode::Present
        || (header == HeaderMode::Detect && guessHeader(start.m_first, start.m_hasSecond ? &start.m_second : nullptr));
    out.columns = start.columnNames(out.hasHeader);
    const char *p = out.hasHeader ? start.m_first.next : start.m_p;
    const char *end = start.m_stream.end();
    SlowRecord r;
    while (p < end && int(out.rows.size()) < maxRows) {
        if (isBlankLine(p, end)) {
            p = skipBlankLine(p);
            continue;
        }
        if (parseRecord(p, end, out.delimiter, r) != RecordStatus::Complete)
            break;
        QStringList row;
        for (int i = 0; i < r.count; ++i)
            row << QString::fromUtf8(r.field(i).data(), qsizetype(r.field(i).size()));
        out.rows.push_back(row);
        p = r.next;
    }
    return out;
}

// ---------------------------------------------------------------------------
// Every record as text

Result<DataRecords> records(ByteSource &source, const QString &label, char delimiter)
{
    FileStart start(source, label, kDefaultBlockBytes, {});
    QString error = start.begin(delimiter);
    DataRecords out;
    out.source = label;
    out.delimiter = start.m_delimiter;
    SlowRecord r;
    qint64 blankLines = 0;
    if (error.isEmpty())
        error = forEachRecord(start, start.m_delimiter, r, blankLines, [&] {
            DataRecord record{start.m_line, {}};
            record.fields.reserve(r.count);
            for (int i = 0; i < r.count; ++i) {
                const auto text = decodeUtf8(r.field(i));
                if (!text)
                    return start.notUtf8(start.m_line, i + 1);
                record.fields << *text;
            }
            out.records.push_back(std::move(record));
            return QString();
        });
    if (!error.isEmpty())
        return Result<DataRecords>::failure(error);
    return out;
}

} // namespace

// ---------------------------------------------------------------------------
// Public entry points

template <typename Reader, typename Options, typename Out>
static Result<Out> readPath(const QString &path, const Options &options)
{
    auto source = openSource(path);
    if (!source)
        return Result<Out>::failure(source.error());
    return Reader(*source.value(), inputLabel(path), options).run();
}

template <typename Reader, typename Options, typename Out>
static Result<Out> readBytes(const QByteArray &bytes, const QString &sourceName, const Options &options)
{
    MemorySource source(bytes);
    return Reader(source, sourceName, options).run();
}

Result<DataSummary> readLevelData(const QString &path, const DataReadOptions &options)
{
    return readPath<LongReader, DataReadOptions, DataSummary>(path, options);
}

Result<DataSummary> readLevelDataFromBytes(const QByteArray &bytes, const QString &sourceName,
                                           const DataReadOptions &options)
{
    return readBytes<LongReader, DataReadOptions, DataSummary>(bytes, sourceName, options);
}

Result<DataSummary> readSummaryTable(const QString &path, const SummaryReadOptions &options)
{
    return readPath<SummaryReader, SummaryReadOptions, DataSummary>(path, options);
}

Result<DataSummary> readSummaryTableFromBytes(const QByteArray &bytes, const QString &sourceName,
                                              const SummaryReadOptions &options)
{
    return readBytes<SummaryReader, SummaryReadOptions, DataSummary>(bytes, sourceName, options);
}

Result<DataPreview> previewData(const QString &path, int maxRows, char delimiter, HeaderMode header)
{
    auto source = openSource(path);
    if (!source)
        return Result<DataPreview>::failure(source.error());
    return preview(*source.value(), inputLabel(path), maxRows, delimiter, header);
}

Result<DataPreview> previewDataFromBytes(const QByteArray &bytes, const QString &sourceName, int maxRows,
                                         char delimiter, HeaderMode header)
{
    MemorySource source(bytes);
    return preview(source, sourceName, maxRows, delimiter, header);
}

Result<DataRecords> readRecordsFromBytes(const QByteArray &bytes, const QString &sourceName, char delimiter)
{
    MemorySource source(bytes);
    return records(source, sourceName, delimiter);
}

} // namespace cb
