#include "core/export/Export.h"

#include "core/base/NameTable.h"

#include <QSet>

#include <cmath>
#include <functional>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// ---------------------------------------------------------------------------
// Names. Every name passes through prepareNames() once: a rewrite (lossless
// for code and CSV, lossy for LaTeX and Markdown), then names that became
// equal although they differed before get a suffix " (2)", " (3)", ...
// The per-language escaping that follows is injective.

constexpr char16_t kReplacement = u'\uFFFD';

// Text every format can carry: no NUL (R strings cannot hold it) and no lone
// surrogate (not encodable in UTF-8).
QString cleanName(const QString &name)
{
    QString out;
    out.reserve(name.size());
    for (qsizetype i = 0; i < name.size(); ++i) {
        const QChar c = name[i];
        if (c.isHighSurrogate() && i + 1 < name.size() && name[i + 1].isLowSurrogate()) {
            out.append(c);
            out.append(name[++i]);
        } else if (c.isSurrogate() || c.unicode() == 0) {
            out.append(QChar(kReplacement));
        } else {
            out.append(c);
        }
    }
    return out;
}

bool isBidiControl(char32_t c)
{
    return c == 0x061C || c == 0x200E || c == 0x200F || (c >= 0x202A && c <= 0x202E) || (c >= 0x2066 && c <= 0x2069);
}

// For tables people read (LaTeX, Markdown): one line, control and line-break
// characters as spaces, bidirectional overrides dropped, runs of white space
// collapsed and the ends trimmed.
QString displayName(const QString &name)
{
    QString out;
    for (char32_t c : cleanName(name).toUcs4()) {
        if (isBidiControl(c))
            continue;
        const QChar::Category cat = QChar::category(c);
        if (cat == QChar::Other_Control || cat == QChar::Separator_Line || cat == QChar::Separator_Paragraph)
            out.append(u' ');
        else
            out.append(QString::fromUcs4(&c, 1));
    }
    return out.simplified();
}

QStringList prepareNames(const QStringList &names, const std::function<QString(const QString &)> &rewrite)
{
    QStringList out;
    out.reserve(names.size());
    for (const QString &n : names)
        out.append(rewrite(n));
    QSet<QString> taken(out.begin(), out.end());
    for (qsizetype i = 0; i < out.size(); ++i) {
        for (qsizetype j = 0; j < i; ++j) {
            if (out[j] == out[i] && names[j] != names[i]) {
                for (int n = 2;; ++n) {
                    const QString candidate = out[i] + u" (%1)"_s.arg(n);
                    if (!taken.contains(candidate)) {
                        out[i] = candidate;
                        taken.insert(candidate);
                        break;
                    }
                }
                break;
            }
        }
    }
    return out;
}

QString shortQuoted(const QString &name)
{
    QString t = displayName(name);
    if (t.size() > 40)
        t = t.left(37) + u"..."_s;
    return u"'"_s + t + u"'"_s;
}

// ---------------------------------------------------------------------------
// Numbers.

enum class NumberForm { Integer, Fraction, Decimal };

struct NumberText
{
    NumberForm form = NumberForm::Decimal;
    bool negative = false;
    QString numerator;   // digits, Integer and Fraction
    QString denominator; // digits, Fraction
    QString decimal;     // Decimal: shortest round-trip text of the double, with its sign
};

// anySize: any exact weight is written as a fraction (CSV, read back exactly).
// Otherwise a fraction is used only when numerator and denominator are exact
// doubles (magnitudes up to 2^53): in code the language's one IEEE division
// then gives the double nearest to the fraction, and in tables for people the
// fraction stays readable. Larger ones fall back to the decimal of the nearest
// double.
NumberText numberText(const Weight &w, bool exact, bool anySize)
{
    NumberText t;
    if (exact && w.isExact()) {
        const Rational &q = w.rational();
        const mpz_class num = abs(q.get_num());
        const mpz_class &den = q.get_den();
        const bool fits = mpz_sizeinbase(num.get_mpz_t(), 2) <= 53 && mpz_sizeinbase(den.get_mpz_t(), 2) <= 53;
        if (anySize || fits) {
            t.negative = q < 0;
            t.numerator = QString::fromStdString(num.get_str(10));
            t.denominator = QString::fromStdString(den.get_str(10));
            t.form = den == 1 ? NumberForm::Integer : NumberForm::Fraction;
            return t;
        }
    }
    const double v = w.value();
    t.negative = v < 0;
    t.decimal = doubleToString(v);
    return t;
}

QString plainNumber(const NumberText &t)
{
    const QString sign = t.negative ? u"-"_s : QString();
    switch (t.form) {
    case NumberForm::Integer:
        return sign + t.numerator;
    case NumberForm::Fraction:
        return sign + t.numerator + u'/' + t.denominator;
    case NumberForm::Decimal:
        break;
    }
    return t.decimal;
}

// ---------------------------------------------------------------------------
// String literals and comments for code. All output is ASCII: every other
// character is written as an escape, so no name can carry a bidirectional
// override or a line break into the source.

QString hex(char32_t c, int width)
{
    return u"%1"_s.arg(uint(c), width, 16, QChar(u'0'));
}

enum class Lang { Cpp, R, Python, Julia };

QString codeString(const QString &name, Lang lang)
{
    QString out = u"\""_s;
    for (char32_t c : name.toUcs4()) {
        switch (c) {
        case u'"': out += u"\\\""_s; continue;
        case u'\\': out += u"\\\\"_s; continue;
        case u'\n': out += u"\\n"_s; continue;
        case u'\r': out += u"\\r"_s; continue;
        case u'\t': out += u"\\t"_s; continue;
        default: break;
        }
        if (lang == Lang::Julia && c == u'$') {
            out += u"\\$"_s; // starts interpolation in Julia strings
        } else if (lang == Lang::Cpp && c == u'?') {
            out += u"\\?"_s; // no trigraph can form
        } else if (c >= 0x20 && c < 0x7F) {
            out += QChar(char16_t(c));
        } else if (c < 0x80) {
            // Fixed-width forms: a following hex digit cannot extend them.
            out += lang == Lang::Cpp ? u"\\"_s + u"%1"_s.arg(uint(c), 3, 8, QChar(u'0')) : u"\\x"_s + hex(c, 2);
        } else if (lang == Lang::R) {
            out += c <= 0xFFFF ? u"\\u{"_s + hex(c, 4) + u'}' : u"\\U{"_s + hex(c, 8) + u'}';
        } else {
            out += c <= 0xFFFF ? u"\\u"_s + hex(c, 4) : u"\\U"_s + hex(c, 8);
        }
    }
    return out + u'"';
}

// MATLAB and Octave: single-quoted char vectors cannot hold a line break and
// have no escapes, so anything outside printable ASCII is appended as UTF-8
// bytes decoded by native2unicode (the same text in MATLAB and Octave).
QString matlabString(const QString &name)
{
    QStringList parts;
    QString run;
    QStringList bytes;
    auto flushRun = [&] {
        if (!run.isEmpty())
            parts.append(u"'"_s + run + u"'"_s);
        run.clear();
    };
    auto flushBytes = [&] {
        if (!bytes.isEmpty())
            parts.append(u"native2unicode(uint8(["_s + bytes.join(u", "_s) + u"]), 'UTF-8')"_s);
        bytes.clear();
    };
    for (char32_t c : name.toUcs4()) {
        if (c >= 0x20 && c < 0x7F) {
            flushBytes();
            run += c == u'\'' ? u"''"_s : QString(QChar(char16_t(c)));
        } else {
            flushRun();
            for (char b : QString::fromUcs4(&c, 1).toUtf8())
                bytes.append(QString::number(uint(static_cast<unsigned char>(b))));
        }
    }
    flushRun();
    flushBytes();
    if (parts.isEmpty())
        return u"''"_s;
    if (parts.size() == 1 && parts.front().startsWith(u'\''))
        return parts.front();
    return u"["_s + parts.join(u", "_s) + u"]"_s;
}

// ---------------------------------------------------------------------------
// Identifiers.

const QSet<QString> &reservedWords()
{
    static const QSet<QString> words = [] {
        QSet<QString> s;
        const char *const list[] = {
            // C++
            "alignas", "alignof", "and", "and_eq", "asm", "auto", "bitand", "bitor", "bool", "break", "case",
            "catch", "char", "char8_t", "char16_t", "char32_t", "class", "compl", "concept", "const", "consteval",
            "constexpr", "constinit", "const_cast", "continue", "co_await", "co_return", "co_yield", "decltype",
            "default", "delete", "do", "double", "dynamic_cast", "else", "enum", "explicit", "export", "extern",
            "false", "float", "for", "friend", "goto", "if", "inline", "int", "long", "mutable", "namespace",
            "new", "noexcept", "not", "not_eq", "nullptr", "operator", "or", "or_eq", "private", "protected",
            "public", "register", "reinterpret_cast", "requires", "return", "short", "signed", "sizeof", "static",
            "static_assert", "static_cast", "struct", "switch", "template", "this", "thread_local", "throw",
            "true", "try", "typedef", "typeid", "typename", "union", "unsigned", "using", "virtual", "void",
            "volatile", "wchar_t", "while", "xor", "xor_eq", "main", "std", "Eigen", "value",
            // Python
            "False", "None", "True", "as", "assert", "async", "await", "def", "del", "elif", "except", "finally",
            "from", "global", "import", "in", "is", "lambda", "nonlocal", "pass", "raise", "with", "yield", "np",
            "numpy",
            // R
            "repeat", "function", "next", "TRUE", "FALSE", "NULL", "Inf", "NaN", "NA", "NA_integer_", "NA_real_",
            "NA_character_", "NA_complex_", "c", "list", "matrix", "dimnames", "names", "T", "F",
            // Julia
            "baremodule", "begin", "elseif", "end", "let", "local", "macro", "module", "quote", "abstract",
            "primitive", "type", "where", "isa", "outer", "hcat", "Float64",
            // MATLAB / Octave
            "case", "classdef", "otherwise", "parfor", "persistent", "spmd", "native2unicode", "uint8",
            "endfunction", "endif", "endfor", "endwhile", "unwind_protect", "ans",
        };
        for (const char *w : list)
            s.insert(QString::fromLatin1(w));
        return s;
    }();
    return words;
}

constexpr int kMaxIdentifierLength = 40;

// ---------------------------------------------------------------------------
// Writers. Each gets the table with prepared names and writes one format.

struct Prepared
{
    const ExportTable &table;
    const ExportOptions &options;
    QString id;         // identifier for code
    QString rowHeader;  // prepared like the names
    QString columnHeader;
    QStringList rows;
    QStringList columns;
};

Prepared prepare(const ExportTable &table, const ExportOptions &options, ExportFormat format)
{
    const bool display = format == ExportFormat::Latex || format == ExportFormat::Markdown;
    const std::function<QString(const QString &)> rewrite = display ? displayName : cleanName;
    const QString requested = options.variableName.isEmpty() ? table.variableName : options.variableName;
    return Prepared{table,
                    options,
                    exportIdentifier(requested),
                    rewrite(table.rowHeader),
                    rewrite(table.columnHeader),
                    prepareNames(table.rowNames, rewrite),
                    prepareNames(table.columnNames, rewrite)};
}

// One header comment for code formats; everything from the table goes
// through the language's string escaping.
QString codeHeader(const Prepared &p, const QString &commentStart, const std::function<QString(const QString &)> &quote)
{
    return commentStart + u"Contrast Bench export: "_s + quote(cleanName(p.table.title)) + u'\n' + commentStart
           + u"%1 rows x %2 columns; rows: "_s.arg(p.rows.size()).arg(p.columns.size()) + quote(p.rowHeader)
           + u", columns: "_s + quote(p.columnHeader) + u'\n';
}

// The cells of row i, each written by number(), joined by separator.
QString rowText(const Prepared &p, int i, const QString &separator, const std::function<QString(const NumberText &)> &number)
{
    QStringList values;
    for (const Weight &w : p.table.cells[size_t(i)])
        values.append(number(numberText(w, p.options.exact, false)));
    return values.join(separator);
}

// "name = [\n    "a",\n    "b",\n]\n" (Python and Julia).
QString nameList(const QString &name, const QStringList &names, const std::function<QString(const QString &)> &quote)
{
    QString s = name + u" = [\n"_s;
    for (const QString &n : names)
        s += u"    "_s + quote(n) + u",\n"_s;
    return s + u"]\n"_s;
}

// --- CSV (RFC 4180) ---------------------------------------------------------

bool isPlainNumber(QStringView s)
{
    qsizetype i = 0;
    if (i < s.size() && (s[i] == u'-' || s[i] == u'+'))
        ++i;
    bool digit = false;
    for (; i < s.size(); ++i) {
        if (s[i] >= u'0' && s[i] <= u'9')
            digit = true;
        else if (s[i] != u'.')
            return false;
    }
    return digit;
}

// A name a spreadsheet would run as a formula (OWASP, "CSV Injection").
bool startsFormula(QStringView s)
{
    if (s.isEmpty())
        return false;
    const QChar c = s[0];
    return (c == u'=' || c == u'+' || c == u'-' || c == u'@' || c == u'\t' || c == u'\r') && !isPlainNumber(s);
}

QString guardCsv(const QString &s)
{
    if (startsFormula(s) || unguardCsv(s) != s)
        return u"'"_s + s;
    return s;
}

QString csvField(const QString &s)
{
    const bool quote = s.contains(u',') || s.contains(u'"') || s.contains(u'\n') || s.contains(u'\r')
                       || (!s.isEmpty() && (s.front().isSpace() || s.back().isSpace()));
    if (!quote)
        return s;
    QString q = s;
    q.replace(u"\""_s, u"\"\""_s);
    return u"\""_s + q + u"\""_s;
}

QString writeCsv(const Prepared &p)
{
    QString out;
    QStringList fields{csvField(guardCsv(p.rowHeader))};
    for (const QString &c : p.columns)
        fields.append(csvField(guardCsv(c)));
    out += fields.join(u',') + u"\r\n"_s;
    for (int i = 0; i < p.rows.size(); ++i) {
        fields = {csvField(guardCsv(p.rows[i]))};
        for (const Weight &w : p.table.cells[size_t(i)])
            fields.append(plainNumber(numberText(w, p.options.exact, true)));
        out += fields.join(u',') + u"\r\n"_s;
    }
    return out;
}

// --- C++ --------------------------------------------------------------------

QString cppNumber(const NumberText &t)
{
    const QString sign = t.negative ? u"-"_s : QString();
    switch (t.form) {
    case NumberForm::Integer:
        return sign + t.numerator + u".0"_s;
    case NumberForm::Fraction:
        return sign + t.numerator + u".0 / "_s + t.denominator;
    case NumberForm::Decimal:
        break;
    }
    if (t.decimal.contains(u'.') || t.decimal.contains(u'e'))
        return t.decimal;
    return t.decimal + u".0"_s;
}

QString cppQuote(const QString &s)
{
    return codeString(s, Lang::Cpp);
}

QString cppStringView(const QString &s)
{
    // The length keeps the whole text even if it held a NUL byte.
    return u"std::string_view{"_s + cppQuote(s) + u", %1}"_s.arg(s.toUtf8().size());
}

QString cppNameArray(const QString &name, const QStringList &names)
{
    QString out = u"inline constexpr std::array<std::string_view, %1> %2{\n"_s.arg(names.size()).arg(name);
    for (const QString &n : names)
        out += u"    "_s + cppStringView(n) + u",\n"_s;
    return out + u"};\n"_s;
}

QString writeCpp(const Prepared &p)
{
    const int rows = int(p.rows.size());
    const int cols = int(p.columns.size());
    QString out = codeHeader(p, u"// "_s, cppQuote);
    out += u"#include <Eigen/Dense>\n#include <array>\n#include <string_view>\n\n"_s;
    out += u"// Row and column names (UTF-8).\n"_s;
    out += cppNameArray(p.id + u"_rows"_s, p.rows);
    out += cppNameArray(p.id + u"_columns"_s, p.columns);

    out += u"\n// The matrix as nested arrays: %1_array[row][column].\n"_s.arg(p.id);
    out += u"inline constexpr std::array<std::array<double, %1>, %2> %3_array{{\n"_s.arg(cols).arg(rows).arg(p.id);
    QStringList rowTexts;
    for (int i = 0; i < rows; ++i) {
        rowTexts.append(rowText(p, i, u", "_s, cppNumber));
        out += u"    {{"_s + rowTexts.back() + u"}}, // "_s + cppQuote(p.rows[i]) + u'\n';
    }
    out += u"}};\n\n"_s;

    out += u"// The same matrix as an Eigen matrix, filled row by row.\n"_s;
    out += u"inline const Eigen::MatrixXd %1 = [] {\n"_s.arg(p.id);
    out += u"    Eigen::MatrixXd value(%1, %2);\n"_s.arg(rows).arg(cols);
    for (int i = 0; i < rows; ++i) {
        out += (i == 0 ? u"    value << "_s : u"             "_s) + rowTexts[i] + (i + 1 == rows ? u";"_s : u","_s)
               + u" // "_s + cppQuote(p.rows[i]) + u'\n';
    }
    out += u"    return value;\n}();\n"_s;
    return out;
}

// --- Python (NumPy) -----------------------------------------------------------

QString pyQuote(const QString &s)
{
    return codeString(s, Lang::Python);
}

QString writePython(const Prepared &p)
{
    QString out = codeHeader(p, u"# "_s, pyQuote);
    out += u"import numpy as np\n\n"_s;
    out += nameList(p.id + u"_rows"_s, p.rows, pyQuote);
    out += nameList(p.id + u"_columns"_s, p.columns, pyQuote);
    out += p.id + u" = np.array([\n"_s;
    for (int i = 0; i < p.rows.size(); ++i) {
        out += u"    ["_s + rowText(p, i, u", "_s, plainNumber) + u"],  # "_s + pyQuote(p.rows[i]) + u'\n';
    }
    return out + u"], dtype=float)\n"_s;
}

// --- R ------------------------------------------------------------------------

QString rQuote(const QString &s)
{
    return codeString(s, Lang::R);
}

QString writeR(const Prepared &p)
{
    QString out = codeHeader(p, u"# "_s, rQuote);
    out += p.id + u" <- matrix(c(\n"_s;
    const int rows = int(p.rows.size());
    for (int i = 0; i < rows; ++i) {
        out += u"  "_s + rowText(p, i, u", "_s, plainNumber) + (i + 1 == rows ? u""_s : u","_s) + u"  # "_s + rQuote(p.rows[i]) + u'\n';
    }
    out += u"), nrow = %1, ncol = %2, byrow = TRUE)\n"_s.arg(rows).arg(p.columns.size());
    auto vector = [](const QStringList &names) {
        QStringList quoted;
        for (const QString &n : names)
            quoted.append(rQuote(n));
        return u"  c("_s + quoted.join(u", "_s) + u")"_s;
    };
    out += u"dimnames("_s + p.id + u") <- list(\n"_s + vector(p.rows) + u",\n"_s + vector(p.columns) + u"\n)\n"_s;
    out += u"names(dimnames("_s + p.id + u")) <- c("_s + rQuote(p.rowHeader) + u", "_s + rQuote(p.columnHeader) + u")\n"_s;
    return out;
}

// --- Julia --------------------------------------------------------------------

QString juliaQuote(const QString &s)
{
    return codeString(s, Lang::Julia);
}

QString writeJulia(const Prepared &p)
{
    QString out = codeHeader(p, u"# "_s, juliaQuote);
    out += nameList(p.id + u"_rows"_s, p.rows, juliaQuote);
    out += nameList(p.id + u"_columns"_s, p.columns, juliaQuote);
    // Rows on separate lines, entries separated by spaces; negative entries in
    // parentheses so that no minus sign can be read as a binary operator.
    // hcat keeps a one-column table a matrix rather than a vector.
    const bool oneColumn = p.columns.size() == 1;
    out += p.id + (oneColumn ? u" = hcat(Float64[\n"_s : u" = Float64[\n"_s);
    const auto number = [](const NumberText &t) { return t.negative ? u"("_s + plainNumber(t) + u")"_s : plainNumber(t); };
    for (int i = 0; i < p.rows.size(); ++i) {
        out += u"    "_s + rowText(p, i, u"  "_s, number) + u"  # "_s + juliaQuote(p.rows[i]) + u'\n';
    }
    return out + (oneColumn ? u"])\n"_s : u"]\n"_s);
}

// --- MATLAB / Octave ----------------------------------------------------------

QString writeMatlab(const Prepared &p)
{
    QString out = codeHeader(p, u"% "_s, matlabString);
    out += p.id + u"_rows = {\n"_s;
    for (const QString &n : p.rows)
        out += u"    "_s + matlabString(n) + u'\n';
    out += u"};\n"_s;
    QStringList cols;
    for (const QString &n : p.columns)
        cols.append(matlabString(n));
    out += p.id + u"_columns = {"_s + cols.join(u", "_s) + u"};\n"_s;
    out += p.id + u" = [\n"_s;
    for (int i = 0; i < p.rows.size(); ++i) {
        out += u"    "_s + rowText(p, i, u", "_s, plainNumber) + u"  % "_s + matlabString(p.rows[i]) + u'\n';
    }
    return out + u"];\n"_s;
}

// --- LaTeX --------------------------------------------------------------------

// Text mode escaping (after displayName). Brackets and a leading star are
// harmless because every cell is wrapped in braces.
QString latexText(const QString &s)
{
    QString out;
    for (QChar c : s) {
        switch (c.unicode()) {
        case u'\\': out += u"\\textbackslash{}"_s; break;
        case u'{': out += u"\\{"_s; break;
        case u'}': out += u"\\}"_s; break;
        case u'$': out += u"\\$"_s; break;
        case u'&': out += u"\\&"_s; break;
        case u'#': out += u"\\#"_s; break;
        case u'^': out += u"\\textasciicircum{}"_s; break;
        case u'_': out += u"\\_"_s; break;
        case u'%': out += u"\\%"_s; break;
        case u'~': out += u"\\textasciitilde{}"_s; break;
        case u'<': out += u"\\textless{}"_s; break;
        case u'>': out += u"\\textgreater{}"_s; break;
        case u'|': out += u"\\textbar{}"_s; break;
        default: out += c; break;
        }
    }
    return out;
}

QString latexNumber(const NumberText &t)
{
    const QString sign = t.negative ? u"-"_s : QString();
    switch (t.form) {
    case NumberForm::Integer:
        return u"$"_s + sign + t.numerator + u"$"_s;
    case NumberForm::Fraction:
        return u"$"_s + sign + u"\\frac{"_s + t.numerator + u"}{"_s + t.denominator + u"}$"_s;
    case NumberForm::Decimal:
        break;
    }
    const qsizetype e = t.decimal.indexOf(u'e');
    if (e < 0)
        return u"$"_s + t.decimal + u"$"_s;
    // "1.5e-05" -> 1.5 \times 10^{-5}
    QString exponent = t.decimal.mid(e + 1);
    const bool negativeExponent = exponent.startsWith(u'-');
    exponent.remove(u'-').remove(u'+');
    while (exponent.size() > 1 && exponent.startsWith(u'0'))
        exponent.remove(0, 1);
    return u"$"_s + t.decimal.left(e) + u" \\times 10^{"_s + (negativeExponent ? u"-"_s : QString()) + exponent + u"}$"_s;
}

QString writeLatex(const Prepared &p)
{
    // A LaTeX comment ends at the line end, and displayName leaves no line breaks.
    QString out = u"% Contrast Bench export. Plain LaTeX, no packages needed.\n"_s;
    out += u"\\begin{table}[htbp]\n  \\centering\n"_s;
    out += u"  \\caption{"_s + latexText(displayName(p.table.title)) + u"}\n"_s;
    out += u"  \\begin{tabular}{l|"_s + QString(p.columns.size(), u'r') + u"}\n    \\hline\n"_s;
    QStringList header{u"{"_s + latexText(p.rowHeader) + u"}"_s};
    for (const QString &c : p.columns)
        header.append(u"{"_s + latexText(c) + u"}"_s);
    out += u"    "_s + header.join(u" & "_s) + u" \\\\\n    \\hline\n"_s;
    for (int i = 0; i < p.rows.size(); ++i) {
        out += u"    {"_s + latexText(p.rows[i]) + u"} & "_s + rowText(p, i, u" & "_s, latexNumber) + u" \\\\\n"_s;
    }
    return out + u"    \\hline\n  \\end{tabular}\n\\end{table}\n"_s;
}

// --- Markdown (GitHub-flavoured table) ----------------------------------------

// After displayName: a backslash before every character that could start
// markup, a link, HTML, an entity, math or end the cell.
QString markdownText(const QString &s)
{
    static const QString active = u"\\`*_~[]<>&$|!#"_s;
    QString out;
    for (QChar c : s) {
        if (active.contains(c))
            out += u'\\';
        out += c;
    }
    return out;
}

QString writeMarkdown(const Prepared &p)
{
    QString out = u"**"_s + markdownText(displayName(p.table.title)) + u"**\n\n"_s;
    QStringList header{markdownText(p.rowHeader)};
    QStringList rule{u":---"_s};
    for (const QString &c : p.columns) {
        header.append(markdownText(c));
        rule.append(u"---:"_s);
    }
    out += u"| "_s + header.join(u" | "_s) + u" |\n"_s;
    out += u"| "_s + rule.join(u" | "_s) + u" |\n"_s;
    for (int i = 0; i < p.rows.size(); ++i) {
        out += u"| "_s + markdownText(p.rows[i]) + u" | "_s + rowText(p, i, u" | "_s, plainNumber) + u" |\n"_s;
    }
    return out;
}

struct FormatInfo
{
    ExportFormat value;
    const char16_t *id;
    const char16_t *title;
    const char16_t *suffix;
};

constexpr FormatInfo kFormats[] = {
    {ExportFormat::Csv, u"csv", u"CSV (RFC 4180)", u"csv"},
    {ExportFormat::Cpp, u"cpp", u"C++ (Eigen and std::array)", u"hpp"},
    {ExportFormat::R, u"r", u"R matrix", u"R"},
    {ExportFormat::Python, u"python", u"Python (NumPy)", u"py"},
    {ExportFormat::Julia, u"julia", u"Julia", u"jl"},
    {ExportFormat::Matlab, u"matlab", u"MATLAB / Octave", u"m"},
    {ExportFormat::Latex, u"latex", u"LaTeX table", u"tex"},
    {ExportFormat::Markdown, u"markdown", u"Markdown table", u"md"},
};

const FormatInfo &info(ExportFormat format)
{
    return rowOf(kFormats, format);
}

} // namespace

QString ExportTable::validate() const
{
    if (rowNames.isEmpty())
        return u"the table has no rows; at least one is needed"_s;
    if (columnNames.isEmpty())
        return u"the table has no columns; at least one is needed"_s;
    if (cells.size() != size_t(rowNames.size()))
        return u"the table has %1 rows of cells but %2 row names; expected one row of cells per name"_s
            .arg(cells.size()).arg(rowNames.size());
    for (size_t i = 0; i < cells.size(); ++i) {
        if (cells[i].size() != size_t(columnNames.size()))
            return u"row %1 (%2) has %3 cells; expected %4, one per column"_s.arg(i + 1).arg(shortQuoted(rowNames[qsizetype(i)]))
                .arg(cells[i].size()).arg(columnNames.size());
        for (size_t j = 0; j < cells[i].size(); ++j) {
            if (!std::isfinite(cells[i][j].value()))
                return u"row %1 (%2), column %3 (%4) is not a finite number; expected a finite weight"_s.arg(i + 1)
                    .arg(shortQuoted(rowNames[qsizetype(i)])).arg(j + 1).arg(shortQuoted(columnNames[qsizetype(j)]));
        }
    }
    return {};
}

QList<ExportFormat> exportFormats()
{
    QList<ExportFormat> list;
    for (const FormatInfo &f : kFormats)
        list.append(f.value);
    return list;
}

QString exportFormatId(ExportFormat format)
{
    return QString::fromUtf16(info(format).id);
}

QString exportFormatTitle(ExportFormat format)
{
    return QString::fromUtf16(info(format).title);
}

QString exportFormatSuffix(ExportFormat format)
{
    return QString::fromUtf16(info(format).suffix);
}

std::optional<ExportFormat> exportFormatFromId(const QString &id)
{
    return valueFromId(kFormats, id);
}

QString exportIdentifier(const QString &requested)
{
    QString id;
    for (QChar c : requested) {
        const bool ascii = c.unicode() < 128;
        if (ascii && c.isLetterOrNumber())
            id += c;
        else if (!id.isEmpty() && !id.endsWith(u'_'))
            id += u'_'; // one underscore for any run of other characters
    }
    while (id.endsWith(u'_'))
        id.chop(1);
    if (id.isEmpty())
        return u"table"_s;
    if (!id.front().isLetter())
        id.prepend(u'x');
    id.truncate(kMaxIdentifierLength);
    while (id.endsWith(u'_'))
        id.chop(1);
    if (reservedWords().contains(id))
        id += u"_matrix"_s;
    return id;
}

Result<QString> exportTable(const ExportTable &table, ExportFormat format, const ExportOptions &options)
{
    const QString problem = table.validate();
    if (!problem.isEmpty())
        return Result<QString>::failure(u"cannot export: "_s + problem);
    const Prepared p = prepare(table, options, format);
    switch (format) {
    case ExportFormat::Csv: return writeCsv(p);
    case ExportFormat::Cpp: return writeCpp(p);
    case ExportFormat::R: return writeR(p);
    case ExportFormat::Python: return writePython(p);
    case ExportFormat::Julia: return writeJulia(p);
    case ExportFormat::Matlab: return writeMatlab(p);
    case ExportFormat::Latex: return writeLatex(p);
    case ExportFormat::Markdown: return writeMarkdown(p);
    }
    return Result<QString>::failure(u"cannot export: unknown format"_s);
}

// The writer adds a leading apostrophe exactly where this drops one: before a
// formula-like name or a name that starts with an apostrophe.
QString unguardCsv(const QString &s)
{
    if (s.startsWith(u'\'') && (startsFormula(QStringView(s).mid(1)) || QStringView(s).mid(1).startsWith(u'\'')))
        return s.mid(1);
    return s;
}

Result<ExportTable> codingTable(const Scheme &scheme)
{
    const Factor &f = scheme.factor;
    if (f.levels.isEmpty())
        return Result<ExportTable>::failure(u"cannot export the coding: the factor has no levels"_s);
    if (scheme.columns.empty())
        return Result<ExportTable>::failure(u"cannot export the coding: the scheme has no coding columns"_s);
    ExportTable t;
    t.title = f.name.isEmpty() ? u"Coding matrix"_s : u"Coding matrix of "_s + f.name;
    t.variableName = u"coding"_s;
    t.rowHeader = u"level"_s;
    t.columnHeader = u"column"_s;
    t.rowNames = f.levels;
    for (size_t j = 0; j < scheme.columns.size(); ++j) {
        const Column &c = scheme.columns[j];
        if (c.weights.size() != size_t(f.levels.size()))
            return Result<ExportTable>::failure(u"cannot export the coding: column %1 (%2) has %3 weights; expected %4, one per level"_s
                                                    .arg(j + 1).arg(shortQuoted(c.name)).arg(c.weights.size()).arg(f.levels.size()));
        t.columnNames.append(c.name);
    }
    t.cells.assign(size_t(f.levels.size()), std::vector<Weight>(scheme.columns.size()));
    for (size_t j = 0; j < scheme.columns.size(); ++j) {
        for (size_t i = 0; i < t.cells.size(); ++i)
            t.cells[i][j] = scheme.columns[j].weights[i];
    }
    return t;
}

Result<ExportTable> hypothesisTable(const Analysis &analysis)
{
    if (!analysis.fullRank || analysis.hypotheses.empty()) {
        QString msg = u"cannot export the hypotheses: the coding is rank deficient (rank %1, %2 coefficients), so its coefficients test no unique hypotheses"_s
                          .arg(analysis.rank).arg(analysis.coefficientCount);
        if (!analysis.dependencies.isEmpty())
            msg += u"; dependencies: "_s + analysis.dependencies.join(u"; "_s);
        return Result<ExportTable>::failure(msg);
    }
    if (analysis.hypotheses.size() != size_t(analysis.coefficientNames.size()))
        return Result<ExportTable>::failure(u"cannot export the hypotheses: %1 hypothesis rows but %2 coefficient names"_s
                                                .arg(analysis.hypotheses.size()).arg(analysis.coefficientNames.size()));
    ExportTable t;
    t.title = u"Hypothesis matrix (weights on the level means)"_s;
    t.variableName = u"hypotheses"_s;
    t.rowHeader = u"coefficient"_s;
    t.columnHeader = u"level"_s;
    t.rowNames = analysis.coefficientNames;
    t.columnNames = analysis.levels;
    t.cells = analysis.hypotheses;
    const QString problem = t.validate();
    if (!problem.isEmpty())
        return Result<ExportTable>::failure(u"cannot export the hypotheses: "_s + problem);
    return t;
}

} // namespace cb
