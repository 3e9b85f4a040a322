#include "tests/fuzz/FuzzChecks.h"

#include "tests/support/ExportedCsv.h"

#include <QStringList>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

using namespace Qt::StringLiterals;

namespace cb::fuzz {

namespace {

bool isAsciiLetter(QChar c)
{
    return (c >= u'a' && c <= u'z') || (c >= u'A' && c <= u'Z');
}

bool isNonFiniteWord(const QString &word)
{
    const QString w = word.toLower();
    return w == u"nan"_s || w == u"inf"_s || w == u"infinity"_s;
}

bool containsNonFiniteWord(const QString &text)
{
    return !checkNoNonFiniteNumber(text).isEmpty();
}

QString lineProblem(int line, const QString &what)
{
    return u"line %1: %2"_s.arg(line).arg(what);
}

// The characters a backslash may introduce inside a string literal of each language.
struct CodeLanguage
{
    QString comment;       // starts a comment to the end of the line, outside strings
    QString escapes;       // characters allowed after a backslash in a string
    bool dollarEscaped = false; // an unescaped '$' in a string interpolates (Julia)
};

CodeLanguage codeLanguage(ExportFormat format)
{
    switch (format) {
    case ExportFormat::Cpp: return {u"//"_s, u"\"\\nrt?01234567uU"_s, false};
    case ExportFormat::R: return {u"#"_s, u"\"\\nrtxuU"_s, false};
    case ExportFormat::Julia: return {u"#"_s, u"\"\\nrt$xuU"_s, true};
    default: return {u"#"_s, u"\"\\nrtxuU"_s, false}; // Python
    }
}

// Brackets in order, outside strings and comments.
class Brackets
{
public:
    bool push(QChar c)
    {
        if (c == u'(' || c == u'[' || c == u'{') {
            m_open.push_back(c);
            return true;
        }
        const QChar want = c == u')' ? u'(' : c == u']' ? u'[' : u'{';
        if (m_open.empty() || m_open.back() != want)
            return false;
        m_open.pop_back();
        return true;
    }
    bool balanced() const { return m_open.empty(); }

private:
    std::vector<QChar> m_open;
};

bool isBracket(QChar c)
{
    return c == u'(' || c == u')' || c == u'[' || c == u']' || c == u'{' || c == u'}';
}

// ASCII printable text and line feeds only.
QString checkAscii(const QString &text)
{
    int line = 1;
    for (QChar c : text) {
        if (c == u'\n')
            ++line;
        else if (c.unicode() < 0x20 || c.unicode() > 0x7E)
            return lineProblem(line, u"character U+%1 in code (expected printable ASCII)"_s.arg(c.unicode(), 4, 16, QChar(u'0')));
    }
    return {};
}

// C++, R, Python and Julia: double-quoted strings with backslash escapes.
QString checkCode(const QString &text, ExportFormat format, const QString &identifier)
{
    if (QString e = checkAscii(text); !e.isEmpty())
        return e;
    const CodeLanguage lang = codeLanguage(format);
    Brackets brackets;
    const QStringList lines = text.split(u'\n');
    for (qsizetype n = 0; n < lines.size(); ++n) {
        const QString &l = lines[n];
        const int line = int(n) + 1;
        bool inString = false;
        for (qsizetype i = 0; i < l.size(); ++i) {
            const QChar c = l[i];
            if (inString) {
                if (c == u'\\') {
                    if (i + 1 >= l.size() || !lang.escapes.contains(l[i + 1]))
                        return lineProblem(line, u"unknown escape in a string literal"_s);
                    ++i;
                } else if (c == u'"') {
                    inString = false;
                } else if (lang.dollarEscaped && c == u'$') {
                    return lineProblem(line, u"unescaped '$' in a Julia string"_s);
                }
                continue;
            }
            if (c == u'"') {
                inString = true;
            } else if (QStringView(l).mid(i).startsWith(lang.comment)) {
                if (format == ExportFormat::Julia && i + 1 < l.size() && l[i + 1] == u'=')
                    return lineProblem(line, u"'#=' opens a block comment in Julia"_s);
                break;
            } else if (isBracket(c)) {
                if (!brackets.push(c))
                    return lineProblem(line, u"unbalanced '%1'"_s.arg(c));
            } else if (isAsciiLetter(c)) {
                qsizetype j = i;
                while (j < l.size() && (isAsciiLetter(l[j]) || l[j].isDigit() || l[j] == u'_'))
                    ++j;
                const QString word = l.mid(i, j - i);
                if (word != identifier && isNonFiniteWord(word))
                    return lineProblem(line, u"non-finite number '%1'"_s.arg(word));
                i = j - 1;
            }
        }
        if (inString)
            return lineProblem(line, u"string literal not closed on its line"_s);
    }
    return brackets.balanced() ? QString() : u"unclosed bracket at the end"_s;
}

// MATLAB / Octave: single-quoted char vectors ('' for a quote), % comments.
QString checkMatlab(const QString &text)
{
    if (QString e = checkAscii(text); !e.isEmpty())
        return e;
    Brackets brackets;
    const QStringList lines = text.split(u'\n');
    for (qsizetype n = 0; n < lines.size(); ++n) {
        const QString &l = lines[n];
        const int line = int(n) + 1;
        if (l.trimmed() == u"%{"_s || l.trimmed() == u"%}"_s)
            return lineProblem(line, u"a block comment marker"_s);
        bool inString = false;
        for (qsizetype i = 0; i < l.size(); ++i) {
            const QChar c = l[i];
            if (inString) {
                if (c == u'\'') {
                    if (i + 1 < l.size() && l[i + 1] == u'\'')
                        ++i;
                    else
                        inString = false;
                }
                continue;
            }
            if (c == u'\'')
                inString = true;
            else if (c == u'%')
                break;
            else if (QStringView(l).mid(i).startsWith(u"..."))
                return lineProblem(line, u"'...' continues the line outside a string"_s);
            else if (isBracket(c) && !brackets.push(c))
                return lineProblem(line, u"unbalanced '%1'"_s.arg(c));
        }
        if (inString)
            return lineProblem(line, u"char vector not closed on its line"_s);
    }
    return brackets.balanced() ? QString() : u"unclosed bracket at the end"_s;
}

// LaTeX: braces and math balanced on every line, one '&' per column, '%' only on the first line.
QString checkLatex(const QString &text, int columns)
{
    const QStringList lines = text.split(u'\n');
    for (qsizetype n = 0; n < lines.size(); ++n) {
        const QString &l = lines[n];
        const int line = int(n) + 1;
        int depth = 0, dollars = 0, ampersands = 0;
        for (qsizetype i = 0; i < l.size(); ++i) {
            const QChar c = l[i];
            if (c == u'\\') {
                if (i + 1 < l.size() && !isAsciiLetter(l[i + 1])) {
                    ++i; // \{ \} \$ \& \# \_ \% \\ ...
                } else {
                    while (i + 1 < l.size() && isAsciiLetter(l[i + 1]))
                        ++i;
                }
            } else if (c == u'{') {
                ++depth;
            } else if (c == u'}') {
                if (--depth < 0)
                    return lineProblem(line, u"'}' without '{'"_s);
            } else if (c == u'$') {
                ++dollars;
            } else if (c == u'&') {
                ++ampersands;
            } else if ((c == u'#' || c == u'^' || c == u'_') && dollars % 2 == 0) {
                return lineProblem(line, u"'%1' outside math mode"_s.arg(c));
            } else if (c == u'%') {
                if (n != 0)
                    return lineProblem(line, u"an unescaped '%' comments out the rest of the line"_s);
                break;
            }
        }
        if (depth != 0)
            return lineProblem(line, u"unbalanced braces"_s);
        if (dollars % 2 != 0)
            return lineProblem(line, u"unbalanced '$'"_s);
        if (ampersands != 0 && ampersands != columns)
            return lineProblem(line, u"%1 '&' for %2 columns"_s.arg(ampersands).arg(columns));
    }
    return {};
}

// Markdown: every table line has one cell per column plus the row name, every
// active character inside a cell escaped.
QString checkMarkdown(const QString &text, int rows, int columns)
{
    static const QString active = u"\\`*_~[]<>&$|!#"_s;
    const QStringList lines = text.split(u'\n');
    int tableLines = 0;
    for (qsizetype n = 0; n < lines.size(); ++n) {
        QString l = lines[n];
        const int line = int(n) + 1;
        if (n == 0) {
            if (!l.startsWith(u"**"_s) || !l.endsWith(u"**"_s) || l.size() < 4)
                return lineProblem(line, u"the title is not one bold line"_s);
            l = l.mid(2, l.size() - 4);
        } else if (l.isEmpty()) {
            continue;
        } else if (!l.startsWith(u'|')) {
            return lineProblem(line, u"a line that is neither the title nor a table row"_s);
        } else {
            ++tableLines;
        }
        int bars = 0;
        for (qsizetype i = 0; i < l.size(); ++i) {
            if (l[i] == u'\\') {
                ++i;
            } else if (l[i] == u'|' && n != 0) {
                ++bars;
            } else if (active.contains(l[i])) {
                return lineProblem(line, u"unescaped '%1'"_s.arg(l[i]));
            }
        }
        if (n != 0 && bars != columns + 2)
            return lineProblem(line, u"%1 cell separators for %2 columns"_s.arg(bars).arg(columns));
    }
    if (tableLines != rows + 2)
        return u"%1 table lines for %2 rows"_s.arg(tableLines).arg(rows);
    return {};
}

bool cleanForCsv(const QStringList &names)
{
    for (const QString &n : names)
        for (qsizetype i = 0; i < n.size(); ++i)
            if (n[i].unicode() == 0 || (n[i].isSurrogate() && !(n[i].isHighSurrogate() && i + 1 < n.size() && n[i + 1].isLowSurrogate() && ++i)))
                return false;
    return true;
}

// The CSV reads back to the same names and numbers.
QString checkCsv(const ExportTable &table, const ExportOptions &options, const QString &text)
{
    auto back = test::readExportedCsv(text);
    // Cells are read as weights (1e-300 to 1e300 in magnitude); a hypothesis matrix may hold
    // smaller or larger values: then the reader must refuse clearly, naming the cell.
    // Exact cells are compared exactly, as the reader does: a double can round a value just
    // below 1e-300 up into the range.
    static const Rational largest = Rational(mpz_class("1" + std::string(300, '0')));
    static const Rational smallest = 1 / largest;
    const auto outside = [](const Weight &w) {
        if (w.isZero())
            return false;
        if (w.isExact())
            return abs(w.rational()) < smallest || abs(w.rational()) > largest;
        return std::abs(w.value()) < kWeightMinMagnitude || std::abs(w.value()) > kWeightMaxMagnitude;
    };
    bool outsideWeightRange = false;
    for (const auto &row : table.cells)
        for (const Weight &w : row)
            outsideWeightRange = outsideWeightRange || outside(w);
    if (!back && outsideWeightRange && back.error().startsWith(u"CSV line "_s)
        && (back.error().contains(u"is too small"_s) || back.error().contains(u"is too large"_s)))
        return {};
    if (!back)
        return u"the CSV does not read back: "_s + back.error();
    if (back->rowCount() != table.rowCount() || back->columnCount() != table.columnCount())
        return u"the CSV reads back as %1 x %2, expected %3 x %4"_s.arg(back->rowCount()).arg(back->columnCount())
            .arg(table.rowCount()).arg(table.columnCount());
    // Names come back unchanged unless they had to be rewritten (NUL, lone surrogates).
    if (cleanForCsv(table.rowNames) && cleanForCsv(table.columnNames) && cleanForCsv({table.rowHeader})) {
        if (back->rowNames != table.rowNames || back->columnNames != table.columnNames || back->rowHeader != table.rowHeader)
            return u"the CSV's names do not read back as written"_s;
    }
    for (int i = 0; i < table.rowCount(); ++i)
        for (int j = 0; j < table.columnCount(); ++j) {
            const Weight &w = table.cells[size_t(i)][size_t(j)];
            const Weight &r = back->cells[size_t(i)][size_t(j)];
            const bool same = options.exact && w.isExact() ? r.isExact() && r.rational() == w.rational() : r.value() == w.value();
            if (!same)
                return u"CSV cell (%1, %2) reads back as %3, written from %4"_s.arg(i + 1).arg(j + 1)
                    .arg(r.storageString(), w.storageString());
        }
    return {};
}

bool tableNamesNeutral(const ExportTable &t)
{
    return !containsNonFiniteWord(t.title) && !containsNonFiniteWord(t.rowHeader) && !containsNonFiniteWord(t.columnHeader)
           && !containsNonFiniteWord(t.rowNames.join(u' ')) && !containsNonFiniteWord(t.columnNames.join(u' '));
}

} // namespace

QString checkNoNonFiniteNumber(const QString &text, bool json)
{
    bool inString = false;
    for (qsizetype i = 0; i < text.size(); ++i) {
        const QChar c = text[i];
        if (json && inString) {
            if (c == u'\\')
                ++i;
            else if (c == u'"')
                inString = false;
            continue;
        }
        if (json && c == u'"') {
            inString = true;
            continue;
        }
        if (!isAsciiLetter(c))
            continue;
        qsizetype j = i;
        while (j < text.size() && (isAsciiLetter(text[j]) || text[j].isDigit()))
            ++j;
        const QString word = text.mid(i, j - i);
        if (isNonFiniteWord(word) && (i == 0 || !text[i - 1].isLetterOrNumber()) && (j == text.size() || !text[j].isLetterOrNumber()))
            return u"'%1' written as a number at offset %2: ...%3..."_s.arg(word).arg(i).arg(text.mid(std::max<qsizetype>(0, i - 60), 120));
        i = j - 1;
    }
    return {};
}

QString checkExport(const ExportTable &table, ExportFormat format, const ExportOptions &options, const QString &text)
{
    QString problem;
    switch (format) {
    case ExportFormat::Csv: problem = checkCsv(table, options, text); break;
    case ExportFormat::Cpp:
    case ExportFormat::R:
    case ExportFormat::Python:
    case ExportFormat::Julia:
        problem = checkCode(text, format, exportIdentifier(options.variableName.isEmpty() ? table.variableName : options.variableName));
        break;
    case ExportFormat::Matlab: problem = checkMatlab(text); break;
    case ExportFormat::Latex: problem = checkLatex(text, table.columnCount()); break;
    case ExportFormat::Markdown: problem = checkMarkdown(text, table.rowCount(), table.columnCount()); break;
    }
    if (problem.isEmpty() && tableNamesNeutral(table) && format != ExportFormat::Cpp && format != ExportFormat::R
        && format != ExportFormat::Python && format != ExportFormat::Julia)
        problem = checkNoNonFiniteNumber(text);
    if (problem.isEmpty())
        return {};
    return u"%1 export%2: %3"_s.arg(exportFormatId(format), options.exact ? u" (exact)"_s : QString(), problem);
}

QString checkAllExports(const ExportTable &table)
{
    for (ExportFormat f : exportFormats())
        for (bool exact : {false, true}) {
            ExportOptions o;
            o.exact = exact;
            auto text = exportTable(table, f, o);
            if (!text)
                return u"%1 export failed for a valid table: %2"_s.arg(exportFormatId(f), text.error());
            if (QString e = checkExport(table, f, o, *text); !e.isEmpty())
                return e;
        }
    return {};
}

QString checkAnalysisFinite(const Analysis &a)
{
    if (a.fullRank && !a.hypothesisValues.allFinite())
        return u"a full-rank analysis has non-finite hypothesis weights"_s;
    for (const auto &row : a.hypotheses)
        for (const Weight &w : row)
            if (!std::isfinite(w.value()))
                return u"a hypothesis weight is not finite"_s;
    if (a.conditionNumber && !std::isfinite(*a.conditionNumber))
        return u"the condition number is given but not finite"_s;
    for (const auto &v : a.vif)
        if (v && !std::isfinite(*v))
            return u"a VIF is given but not finite"_s;
    return {};
}

bool namesAreNeutral(const Scheme &s)
{
    QStringList all = s.factor.levels;
    all << s.factor.name << s.notes;
    for (const Column &c : s.columns)
        all << c.name;
    return !containsNonFiniteWord(all.join(u' '));
}

void require(const QString &problem, const char *where)
{
    if (problem.isEmpty())
        return;
    std::fprintf(stderr, "%s: %s\n", where, problem.toUtf8().constData());
    std::abort();
}

QString textOf(const std::uint8_t *data, std::size_t size)
{
    return QString::fromUtf8(reinterpret_cast<const char *>(data), qsizetype(size));
}

} // namespace cb::fuzz
