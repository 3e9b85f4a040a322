// Tests of exporting coding and hypothesis matrices.
//
// Outside checks: the generated C++ is compiled with g++ against Eigen and run
// (its printed %a values must equal core's doubles bit for bit); the generated
// Python is run under CB_PYTHON with NumPy (tests/python/run_export.py prints
// float.hex()). R, Julia and MATLAB/Octave are not installed here, so their
// output is lexed by the rules of each language and checked for structure.
// Golden files: tests/data/golden/ (see README.md there for regenerating).
#include "core/model/Design.h"
#include "core/files/StudyFile.h"
#include "core/export/Export.h"
#include "core/files/SchemeFile.h"
#include "core/model/Study.h"

#include <QDir>
#include <QFile>
#include <QProcess>

#include "tests/support/ExportedCsv.h"
#include "tests/support/ProcessRunner.h"
#include <QRegularExpression>
#include <QSet>
#include <QTemporaryDir>
#include <QTest>

#include <cmath>
#include <cstdlib>
#include <cstring>
#include <map>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Weight wt(const QString &text)
{
    auto r = parseWeight(text);
    if (!r)
        qFatal("bad weight in test: %s", qPrintable(r.error()));
    return r.value();
}

// The demo: an irrigation trial of our own invention, four watering schedules
// coded with three orthogonal comparisons of our choosing.
Scheme irrigationScheme()
{
    Scheme s;
    s.factor.name = u"irrigation"_s;
    s.factor.levels = {u"none"_s, u"weekly"_s, u"twice-weekly"_s, u"daily"_s};
    s.kind = SchemeKind::Custom;
    s.columns = {
        {u"watered_vs_none"_s, {wt(u"-3/4"_s), wt(u"1/4"_s), wt(u"1/4"_s), wt(u"1/4"_s)}},
        {u"frequent_vs_weekly"_s, {wt(u"0"_s), wt(u"-2/3"_s), wt(u"1/3"_s), wt(u"1/3"_s)}},
        {u"daily_vs_twice"_s, {wt(u"0"_s), wt(u"0"_s), wt(u"-1/2"_s), wt(u"1/2"_s)}},
    };
    return s;
}

// Its hypotheses, worked by hand: for mutually orthogonal zero-sum columns c_j
// with an intercept, coefficient j tests c_j / (c_j . c_j) on the level means
// and the intercept the unweighted grand mean.
Analysis irrigationAnalysis()
{
    Analysis a;
    a.levelCount = 4;
    a.columnCount = 3;
    a.coefficientCount = 4;
    a.levels = irrigationScheme().factor.levels;
    a.columnNames = {u"watered_vs_none"_s, u"frequent_vs_weekly"_s, u"daily_vs_twice"_s};
    a.coefficientNames = QStringList{u"intercept"_s} + a.columnNames;
    a.rank = 4;
    a.fullRank = true;
    a.exact = true;
    auto row = [](std::initializer_list<const char16_t *> xs) {
        std::vector<Weight> r;
        for (const char16_t *x : xs)
            r.push_back(wt(QString::fromUtf16(x)));
        return r;
    };
    a.hypotheses = {row({u"1/4", u"1/4", u"1/4", u"1/4"}), row({u"-1", u"1/3", u"1/3", u"1/3"}),
                    row({u"0", u"-1", u"1/2", u"1/2"}), row({u"0", u"0", u"-1", u"1"})};
    return a;
}

ExportTable irrigationCoding()
{
    auto t = codingTable(irrigationScheme());
    if (!t)
        qFatal("%s", qPrintable(t.error()));
    return t.value();
}

// Names meant to break out of strings and comments, to run code, or to
// collide once rewritten.
QStringList hostileNames()
{
    return {
        u"\"; system(\"touch pwned-marker\"); \""_s,
        u"'); __import__('os').system('touch pwned-marker'); ('"_s,
        u"\"\"\" ''' \\\" `back` "_s,
        u"*/ int evil = 1; /*"_s,
        u"ends with a backslash \\"_s,
        u"\\\\ two \\n not a newline \\x41 \\u0041"_s,
        u"line one\nline two; touch pwned-marker"_s,
        u"cr\r\nlf"_s,
        u"tab\there"_s,
        u"$(touch pwned-marker) ${x} $x \\$"_s,
        u"]] [[ ]=] [=["_s,
        u"100% %d %s %{"_s,
        u"# not a comment #= block =#"_s,
        u"<script>alert(1)</script> | pipe |"_s,
        u"& # ^ _ ~ { } \\frac{1}{0} \\input{/etc/passwd}"_s,
        u"é ü 漢字 😀"_s,
        QString(),
        u"\u202Eright-to-left override\u2066"_s,
        u"nul"_s + QChar(0) + u"inside"_s,
        u"?\?/ trigraph"_s,
        u"=cmd|' /C calc'!A0"_s,
        u"@SUM(1+1)"_s,
        u"+1+1"_s,
        u"-1"_s,
        u"'quoted"_s,
        u"''=x"_s,
        u"line\u2028separator\u0085next"_s,
        u"... continued"_s,
        u"a b"_s,
        u"a\nb"_s,
        u"  a   b  "_s,
        u"lone "_s + QChar(0xD800) + u" surrogate"_s,
    };
}

// What every format carries for a name: NUL and lone surrogates become U+FFFD.
QString cleaned(const QString &s)
{
    QString out;
    for (qsizetype i = 0; i < s.size(); ++i) {
        if (s[i].isHighSurrogate() && i + 1 < s.size() && s[i + 1].isLowSurrogate()) {
            out += s[i];
            out += s[++i];
        } else if (s[i].isSurrogate() || s[i].unicode() == 0) {
            out += QChar(0xFFFD);
        } else {
            out += s[i];
        }
    }
    return out;
}

QStringList cleaned(const QStringList &names)
{
    QStringList out;
    for (const QString &n : names)
        out.append(cleaned(n));
    return out;
}

// Weights whose nearest doubles are easy to get wrong: 1/10 (truncation gives
// the wrong last bit), numerators and denominators beyond 2^53, tiny and huge
// magnitudes, and floating weights with 17 significant digits.
std::vector<Weight> hardWeights()
{
    return {
        wt(u"1/10"_s),
        wt(u"-1/3"_s),
        wt(u"-2/3"_s),
        wt(u"1152921504606846976/3"_s),      // 2^60 / 3
        wt(u"1/18014398509481985"_s),        // 1 / (2^54 + 1)
        wt(u"1e-300"_s),
        wt(u"123456789/1000"_s),
        wt(u"7"_s),
        wt(u"0"_s),
        Weight::approx(0.1 + 0.2),
        Weight::approx(std::sqrt(0.5)),
        Weight::approx(-1e300),
        Weight::approx(2.0),
        Weight::approx(-4.9e-300),
    };
}

ExportTable hostileTable()
{
    ExportTable t;
    t.title = u"*/ title \"with\" $quotes\n% and\\ lines"_s;
    t.variableName = u"hostile"_s;
    t.rowHeader = u"row \"header\" \\"_s;
    t.columnHeader = u"col\n'header'$"_s;
    t.rowNames = hostileNames();
    t.columnNames = {u"\""_s, u"'"_s, u"\\"_s, u"$x"_s, u"a b"_s, u"a\nb"_s, u"a\tb"_s};
    const std::vector<Weight> hard = hardWeights();
    size_t k = 0;
    for (qsizetype i = 0; i < t.rowNames.size(); ++i) {
        std::vector<Weight> r;
        for (qsizetype j = 0; j < t.columnNames.size(); ++j)
            r.push_back(hard[k++ % hard.size()]);
        t.cells.push_back(r);
    }
    return t;
}

ExportTable oneColumnTable()
{
    ExportTable t;
    t.title = u"Two levels"_s;
    t.variableName = u"pair"_s;
    t.rowHeader = u"level"_s;
    t.columnHeader = u"column"_s;
    t.rowNames = {u"control"_s, u"dosed"_s};
    t.columnNames = {u"dosed_vs_control"_s};
    t.cells = {{wt(u"-1/2"_s)}, {wt(u"1/2"_s)}};
    return t;
}

QString exported(const ExportTable &table, ExportFormat format, bool exact, const QString &variable = {})
{
    ExportOptions o;
    o.exact = exact;
    o.variableName = variable;
    auto r = exportTable(table, format, o);
    if (!r) {
        QTest::qFail(qPrintable(u"export failed: "_s + r.error()), __FILE__, __LINE__);
        return {};
    }
    return r.value();
}

bool sameDouble(double a, double b)
{
    if (a == 0.0 && b == 0.0)
        return true;
    return std::memcmp(&a, &b, sizeof a) == 0;
}

using Run = cb::test::ProcessRun;

Run run(const QString &program, const QStringList &args, const QString &workDir, int timeoutMs = 240000)
{
    return cb::test::runProcess(program, args, {}, timeoutMs, workDir);
}

bool writeFile(const QString &path, const QString &text)
{
    QFile f(path);
    if (!f.open(QIODevice::WriteOnly))
        return false;
    return f.write(text.toUtf8()) >= 0;
}

// What a program printed in the protocol of tests/python/run_export.py.
struct Dump
{
    int rows = -1;
    int columns = -1;
    QStringList rowNames;
    QStringList columnNames;
    std::map<std::pair<int, int>, double> cells;
    QStringList problems;
};

std::map<QString, Dump> parseDump(const QByteArray &output)
{
    std::map<QString, Dump> dumps;
    Dump *current = nullptr;
    for (const QByteArray &line : output.split('\n')) {
        const QList<QByteArray> f = line.split(' ');
        if (f.isEmpty() || f[0].isEmpty())
            continue;
        const QByteArray what = f[0];
        if (what == "table" && f.size() == 2) {
            current = &dumps[QString::fromUtf8(f[1])];
        } else if (!current) {
            continue;
        } else if (what == "shape" && f.size() == 3) {
            current->rows = f[1].toInt();
            current->columns = f[2].toInt();
        } else if (what == "row" || what == "column") {
            const QString name = QString::fromUtf8(QByteArray::fromHex(f.size() > 1 ? f[1] : QByteArray()));
            (what == "row" ? current->rowNames : current->columnNames).append(name);
        } else if (what == "cell" && f.size() == 4) {
            current->cells[{f[1].toInt(), f[2].toInt()}] = std::strtod(f[3].constData(), nullptr);
        } else {
            current->problems.append(QString::fromUtf8(line));
        }
    }
    return dumps;
}

void compareDump(const Dump &d, const ExportTable &t, const QString &what)
{
    QVERIFY2(d.problems.isEmpty(), qPrintable(what + u": "_s + d.problems.join(u"; "_s)));
    QCOMPARE(d.rows, t.rowCount());
    QCOMPARE(d.columns, t.columnCount());
    QCOMPARE(d.rowNames, cleaned(t.rowNames));
    QCOMPARE(d.columnNames, cleaned(t.columnNames));
    for (int i = 0; i < t.rowCount(); ++i) {
        for (int j = 0; j < t.columnCount(); ++j) {
            auto it = d.cells.find({i, j});
            QVERIFY2(it != d.cells.end(), qPrintable(u"%1: cell %2,%3 missing"_s.arg(what).arg(i).arg(j)));
            const double expected = t.cells[size_t(i)][size_t(j)].value();
            QVERIFY2(sameDouble(it->second, expected),
                     qPrintable(u"%1: cell %2,%3 is %4, core has %5"_s.arg(what).arg(i).arg(j)
                                    .arg(it->second, 0, 'g', 17).arg(expected, 0, 'g', 17)));
        }
    }
}

struct Case
{
    QString variable;
    ExportTable table;
    bool exact;
};

std::vector<Case> executionCases()
{
    auto hyp = hypothesisTable(irrigationAnalysis());
    if (!hyp)
        qFatal("%s", qPrintable(hyp.error()));
    return {
        {u"demo_exact"_s, irrigationCoding(), true},
        {u"demo_decimal"_s, irrigationCoding(), false},
        {u"hyp"_s, hyp.value(), true},
        {u"hostile"_s, hostileTable(), true},
        {u"hostile_decimal"_s, hostileTable(), false},
        {u"pair"_s, oneColumnTable(), true},
    };
}

// --- A lexer for the generated scripts ------------------------------------------

enum class Lang { Cpp, Python, R, Julia, Matlab };

struct Token
{
    enum Kind { Identifier, Number, Punct, String, Comment } kind;
    QString text; // decoded text for strings, the raw text otherwise
    int line;
};

struct Lexed
{
    std::vector<Token> tokens;
    QStringList problems;
};

int hexValue(QChar c)
{
    const int v = QStringLiteral("0123456789abcdef").indexOf(c.toLower());
    return v;
}

// Decodes the escapes the languages define: \\ \" \' \n \r \t \? \$ \xHH,
// octal \ooo (C++), \uXXXX and \UXXXXXXXX (C++, Python, Julia), \u{..} \U{..} (R).
QString decodeEscapes(const QString &body, Lang lang, QStringList &problems)
{
    QString out;
    for (qsizetype i = 0; i < body.size(); ++i) {
        const QChar c = body[i];
        if (lang == Lang::Julia && c == u'$') {
            problems.append(u"unescaped '$' (interpolation) in a Julia string"_s);
            continue;
        }
        if (c != u'\\') {
            out += c;
            continue;
        }
        if (++i >= body.size()) {
            problems.append(u"string ends in a lone backslash"_s);
            break;
        }
        const QChar e = body[i];
        auto readHex = [&](int maxDigits, bool braces) {
            uint v = 0;
            int n = 0;
            if (braces) {
                if (i + 1 < body.size() && body[i + 1] == u'{')
                    ++i;
                else
                    problems.append(u"R escape without braces"_s);
            }
            while (n < maxDigits && i + 1 < body.size() && hexValue(body[i + 1]) >= 0) {
                v = v * 16 + uint(hexValue(body[++i]));
                ++n;
            }
            if (braces) {
                if (i + 1 < body.size() && body[i + 1] == u'}')
                    ++i;
                else
                    problems.append(u"R escape not closed"_s);
            }
            if (n == 0)
                problems.append(u"escape without digits"_s);
            const char32_t cp = v;
            out += QString::fromUcs4(&cp, 1);
        };
        switch (e.unicode()) {
        case u'\\': out += u'\\'; break;
        case u'"': out += u'"'; break;
        case u'\'': out += u'\''; break;
        case u'n': out += u'\n'; break;
        case u'r': out += u'\r'; break;
        case u't': out += u'\t'; break;
        case u'?': out += u'?'; break;
        case u'$': out += u'$'; break;
        case u'x': readHex(2, false); break;
        case u'u': readHex(lang == Lang::R ? 8 : 4, lang == Lang::R); break;
        case u'U': readHex(8, lang == Lang::R); break;
        default:
            if (lang == Lang::Cpp && e >= u'0' && e <= u'7') {
                uint v = uint(e.unicode() - u'0');
                for (int n = 1; n < 3 && i + 1 < body.size() && body[i + 1] >= u'0' && body[i + 1] <= u'7'; ++n)
                    v = v * 8 + uint(body[++i].unicode() - u'0');
                out += QChar(char16_t(v));
            } else {
                problems.append(u"unknown escape \\%1"_s.arg(e));
            }
        }
    }
    return out;
}

Lexed lex(const QString &src, Lang lang)
{
    Lexed l;
    int line = 1;
    const qsizetype n = src.size();
    auto prevAllowsTranspose = [&] {
        if (l.tokens.empty() || l.tokens.back().line != line)
            return false;
        const Token &t = l.tokens.back();
        return t.kind == Token::Identifier || t.kind == Token::Number
               || (t.kind == Token::Punct && (t.text == u")"_s || t.text == u"]"_s || t.text == u"}"_s));
    };
    for (qsizetype i = 0; i < n;) {
        const QChar c = src[i];
        if (c == u'\n') {
            ++line;
            ++i;
        } else if (c == u' ' || c == u'\r') {
            ++i;
        } else if ((lang == Lang::Cpp && c == u'/' && i + 1 < n && src[i + 1] == u'/')
                   || (lang == Lang::Matlab && c == u'%')
                   || ((lang == Lang::Python || lang == Lang::R || lang == Lang::Julia) && c == u'#')) {
            const qsizetype end = src.indexOf(u'\n', i);
            const qsizetype stop = end < 0 ? n : end;
            QString body = src.mid(i, stop - i);
            if (body.endsWith(u'\\'))
                l.problems.append(u"line %1: a comment ends in a backslash (joins the next line)"_s.arg(line));
            l.tokens.push_back({Token::Comment, body, line});
            i = stop;
        } else if ((lang != Lang::Matlab && c == u'"') || (lang == Lang::Matlab && c == u'\'' && !prevAllowsTranspose())) {
            const QChar quote = c;
            QString body;
            qsizetype j = i + 1;
            bool closed = false;
            while (j < n) {
                if (src[j] == u'\n')
                    break;
                if (lang != Lang::Matlab && src[j] == u'\\' && j + 1 < n) {
                    body += src[j];
                    body += src[j + 1];
                    j += 2;
                    continue;
                }
                if (src[j] == quote) {
                    if (lang == Lang::Matlab && j + 1 < n && src[j + 1] == quote) {
                        body += quote;
                        j += 2;
                        continue;
                    }
                    closed = true;
                    break;
                }
                body += src[j++];
            }
            if (!closed) {
                l.problems.append(u"line %1: a string is not closed on its line"_s.arg(line));
                i = j;
                continue;
            }
            const QString text = lang == Lang::Matlab ? body : decodeEscapes(body, lang, l.problems);
            for (QChar ch : body) {
                if (ch.unicode() < 0x20 || ch.unicode() >= 0x7F)
                    l.problems.append(u"line %1: a string holds a raw non-ASCII or control character"_s.arg(line));
            }
            l.tokens.push_back({Token::String, text, line});
            i = j + 1;
        } else if (c.isLetter() || c == u'_') {
            qsizetype j = i;
            while (j < n && (src[j].isLetterOrNumber() || src[j] == u'_'))
                ++j;
            l.tokens.push_back({Token::Identifier, src.mid(i, j - i), line});
            i = j;
        } else if (c.isDigit() || (c == u'.' && i + 1 < n && src[i + 1].isDigit())) {
            qsizetype j = i;
            while (j < n && (src[j].isDigit() || src[j] == u'.'))
                ++j;
            if (j < n && (src[j] == u'e' || src[j] == u'E')) {
                ++j;
                if (j < n && (src[j] == u'+' || src[j] == u'-'))
                    ++j;
                while (j < n && src[j].isDigit())
                    ++j;
            }
            l.tokens.push_back({Token::Number, src.mid(i, j - i), line});
            i = j;
        } else {
            if (c.unicode() >= 0x7F || c.unicode() < 0x20)
                l.problems.append(u"line %1: a raw non-ASCII or control character in code"_s.arg(line));
            l.tokens.push_back({Token::Punct, QString(c), line});
            ++i;
        }
    }
    return l;
}

// MATLAB names may be concatenations with native2unicode(uint8([...]), 'UTF-8'):
// folds those into single string tokens, as MATLAB and Octave evaluate them.
void foldMatlabStrings(std::vector<Token> &t, QStringList &problems)
{
    auto isPunct = [&](size_t k, const char16_t *p) {
        return k < t.size() && t[k].kind == Token::Punct && t[k].text == QString::fromUtf16(p);
    };
    for (size_t k = 0; k < t.size(); ++k) {
        if (t[k].kind != Token::Identifier || t[k].text != u"native2unicode"_s)
            continue;
        // native2unicode ( uint8 ( [ n , n ] ) , 'UTF-8' )
        size_t e = k + 1;
        if (!isPunct(e, u"(") || e + 1 >= t.size() || t[e + 1].text != u"uint8"_s || !isPunct(e + 2, u"(")
            || !isPunct(e + 3, u"[")) {
            problems.append(u"malformed native2unicode call"_s);
            continue;
        }
        e += 4;
        QByteArray bytes;
        while (e < t.size() && t[e].kind == Token::Number) {
            bytes.append(char(t[e].text.toInt()));
            ++e;
            if (isPunct(e, u","))
                ++e;
        }
        if (!isPunct(e, u"]") || !isPunct(e + 1, u")") || !isPunct(e + 2, u",") || e + 3 >= t.size()
            || t[e + 3].kind != Token::String || t[e + 3].text != u"UTF-8"_s || !isPunct(e + 4, u")")) {
            problems.append(u"malformed native2unicode call"_s);
            continue;
        }
        t[k] = {Token::String, QString::fromUtf8(bytes), t[k].line};
        t.erase(t.begin() + std::ptrdiff_t(k + 1), t.begin() + std::ptrdiff_t(e + 5));
    }
    // [ 'a' , 'b' , ... ] -> 'ab'
    for (size_t k = 0; k < t.size(); ++k) {
        if (!isPunct(k, u"[") || k + 1 >= t.size() || t[k + 1].kind != Token::String)
            continue;
        QString joined = t[k + 1].text;
        size_t e = k + 2;
        while (isPunct(e, u",") && e + 1 < t.size() && t[e + 1].kind == Token::String) {
            joined += t[e + 1].text;
            e += 2;
        }
        if (!isPunct(e, u"]"))
            continue;
        t[k] = {Token::String, joined, t[k].line};
        t.erase(t.begin() + std::ptrdiff_t(k + 1), t.begin() + std::ptrdiff_t(e + 1));
    }
}

Lexed lexFolded(const QString &src, Lang lang)
{
    Lexed l = lex(src, lang);
    if (lang == Lang::Matlab)
        foldMatlabStrings(l.tokens, l.problems);
    return l;
}

// The one string a comment holds ("# \"name\""), or nullopt.
std::optional<QString> commentString(const Token &comment, Lang lang, QStringList &problems)
{
    const qsizetype marker = lang == Lang::Cpp ? 2 : 1;
    Lexed inner = lexFolded(comment.text.mid(marker), lang);
    problems += inner.problems;
    if (inner.tokens.size() == 1 && inner.tokens[0].kind == Token::String)
        return inner.tokens[0].text;
    return std::nullopt;
}

bool containsRun(const QStringList &haystack, const QStringList &needle)
{
    for (qsizetype s = 0; s + needle.size() <= haystack.size(); ++s) {
        if (haystack.mid(s, needle.size()) == needle)
            return true;
    }
    return false;
}

QSet<QString> allowedIdentifiers(Lang lang, const QString &id)
{
    QSet<QString> s{id, id + u"_rows"_s, id + u"_columns"_s};
    QStringList words;
    switch (lang) {
    case Lang::Cpp:
        words = {u"include"_s, u"Eigen"_s, u"Dense"_s, u"array"_s, u"string_view"_s, u"inline"_s, u"constexpr"_s,
                 u"std"_s, u"double"_s, u"const"_s, u"MatrixXd"_s, u"value"_s, u"return"_s, id + u"_array"_s};
        break;
    case Lang::Python: words = {u"import"_s, u"numpy"_s, u"as"_s, u"np"_s, u"array"_s, u"dtype"_s, u"float"_s}; break;
    case Lang::R:
        words = {u"matrix"_s, u"c"_s, u"nrow"_s, u"ncol"_s, u"byrow"_s, u"TRUE"_s, u"dimnames"_s, u"list"_s, u"names"_s};
        break;
    case Lang::Julia: words = {u"Float64"_s, u"hcat"_s}; break;
    case Lang::Matlab: words = {}; break; // native2unicode and uint8 are folded away
    }
    for (const QString &w : words)
        s.insert(w);
    return s;
}

// Values on the matrix's data lines: lines with numbers and no identifiers or strings.
std::vector<std::vector<double>> dataLines(const std::vector<Token> &tokens, QStringList &problems)
{
    std::map<int, std::vector<const Token *>> byLine;
    for (const Token &t : tokens) {
        if (t.kind != Token::Comment)
            byLine[t.line].push_back(&t);
    }
    std::vector<std::vector<double>> rows;
    for (const auto &[line, toks] : byLine) {
        bool number = false, other = false;
        for (const Token *t : toks) {
            number = number || t->kind == Token::Number;
            other = other || t->kind == Token::Identifier || t->kind == Token::String;
        }
        if (!number || other)
            continue;
        std::vector<double> values;
        for (size_t k = 0; k < toks.size(); ++k) {
            const bool negative = toks[k]->kind == Token::Punct && toks[k]->text == u"-"_s;
            if (negative)
                ++k;
            if (k >= toks.size() || toks[k]->kind != Token::Number) {
                if (negative)
                    problems.append(u"line %1: '-' not followed by a number"_s.arg(line));
                continue;
            }
            double v = std::strtod(toks[k]->text.toLatin1().constData(), nullptr);
            if (k + 2 < toks.size() && toks[k + 1]->text == u"/"_s && toks[k + 2]->kind == Token::Number) {
                v = v / std::strtod(toks[k + 2]->text.toLatin1().constData(), nullptr);
                k += 2;
            }
            values.push_back(negative ? -v : v);
        }
        rows.push_back(values);
    }
    return rows;
}

// Brackets balanced, only expected identifiers in code, names intact as strings
// (rows then columns) and as the comment of each data row; for R, Julia and
// MATLAB also one data line per row with every value read back bit for bit.
void checkScript(const QString &src, Lang lang, const ExportTable &t, const QString &id, bool checkData)
{
    Lexed l = lexFolded(src, lang);
    QStringList problems = l.problems;
    QStringList strings, comments;
    int depth = 0;
    QString stack;
    const QSet<QString> allowed = allowedIdentifiers(lang, id);
    for (const Token &tok : l.tokens) {
        switch (tok.kind) {
        case Token::String: strings.append(tok.text); break;
        case Token::Comment:
            if (auto s = commentString(tok, lang, problems))
                comments.append(*s);
            break;
        case Token::Identifier:
            if (!allowed.contains(tok.text))
                problems.append(u"line %1: unexpected identifier '%2' in code"_s.arg(tok.line).arg(tok.text));
            break;
        case Token::Punct:
            if (tok.text == u"("_s || tok.text == u"["_s || tok.text == u"{"_s) {
                stack += tok.text;
                ++depth;
            } else if (tok.text == u")"_s || tok.text == u"]"_s || tok.text == u"}"_s) {
                const QString open = tok.text == u")"_s ? u"("_s : tok.text == u"]"_s ? u"["_s : u"{"_s;
                if (stack.isEmpty() || !stack.endsWith(open))
                    problems.append(u"line %1: unbalanced '%2'"_s.arg(tok.line).arg(tok.text));
                else
                    stack.chop(1);
            }
            break;
        case Token::Number: break;
        }
    }
    if (!stack.isEmpty())
        problems.append(u"unclosed brackets: "_s + stack);
    Q_UNUSED(depth);
    const QStringList rows = cleaned(t.rowNames);
    const QStringList cols = cleaned(t.columnNames);
    if (!containsRun(strings, rows + cols) && !containsRun(strings, rows))
        problems.append(u"the row names are not all there as strings, in order"_s);
    if (!containsRun(strings, cols))
        problems.append(u"the column names are not all there as strings, in order"_s);
    if (!containsRun(comments, rows))
        problems.append(u"the row comments do not carry the row names"_s);
    if (checkData) {
        const auto data = dataLines(l.tokens, problems);
        if (data.size() != size_t(t.rowCount()))
            problems.append(u"%1 data lines; expected %2, one per row"_s.arg(data.size()).arg(t.rowCount()));
        for (size_t i = 0; i < data.size() && i < t.cells.size(); ++i) {
            if (data[i].size() != t.cells[i].size()) {
                problems.append(u"row %1 has %2 values; expected %3"_s.arg(i + 1).arg(data[i].size()).arg(t.cells[i].size()));
                continue;
            }
            for (size_t j = 0; j < data[i].size(); ++j) {
                if (!sameDouble(data[i][j], t.cells[i][j].value()))
                    problems.append(u"row %1, column %2 reads back as %3, not %4"_s.arg(i + 1).arg(j + 1)
                                        .arg(data[i][j], 0, 'g', 17).arg(t.cells[i][j].value(), 0, 'g', 17));
            }
        }
    }
    QVERIFY2(problems.isEmpty(), qPrintable(problems.mid(0, 12).join(u"\n"_s)));
}

Lang langOf(ExportFormat f)
{
    switch (f) {
    case ExportFormat::Cpp: return Lang::Cpp;
    case ExportFormat::Python: return Lang::Python;
    case ExportFormat::R: return Lang::R;
    case ExportFormat::Julia: return Lang::Julia;
    default: return Lang::Matlab;
    }
}

// CB_EXPORT_DUMP=dir keeps the texts of the structural tests for reading by eye.
void keepForReading(const QString &name, ExportFormat f, const QString &text)
{
    if (const QString dump = qEnvironmentVariable("CB_EXPORT_DUMP"); !dump.isEmpty())
        QVERIFY(writeFile(dump + u'/' + name + u'.' + exportFormatSuffix(f), text));
}

QString goldenDir()
{
    return QStringLiteral(CB_TEST_DATA) + u"/golden"_s;
}

} // namespace

class TestExport : public QObject
{
    Q_OBJECT
private slots:
    void formatsHaveIdsTitlesAndSuffixes();
    void identifiersAreSafe_data();
    void identifiersAreSafe();
    void numbersPerFormat_data();
    void numbersPerFormat();
    void validateNamesTheCell();
    void codingTableFromScheme();
    void codingTableRejectsShortColumn();
    void hypothesisTableFromAnalysis();
    void hypothesisTableRejectsRankDeficient();
    void analyzeAgreesWithHandWorkedHypotheses();
    void goldenFiles_data();
    void goldenFiles();
    void csvRoundTrip_data();
    void csvRoundTrip();
    void csvReaderRejects_data();
    void csvReaderRejects();
    void csvGuardsFormulas();
    void cppCompilesAndReproducesValues();
    void pythonReproducesValues();
    void scriptsAreWellFormed_data();
    void scriptsAreWellFormed();
    void latexIsWellFormed();
    void markdownIsWellFormed();
    void displayNamesStayUnique();
    void cliExportsSchemeFile_data();
    void cliExportsSchemeFile();
    void cliExportsDesignOverItsCells();
    void cliRejects_data();
    void cliRejects();
};

void TestExport::formatsHaveIdsTitlesAndSuffixes()
{
    const QList<ExportFormat> formats = exportFormats();
    QCOMPARE(formats.size(), 8);
    QSet<QString> ids, suffixes;
    for (ExportFormat f : formats) {
        ids.insert(exportFormatId(f));
        suffixes.insert(exportFormatSuffix(f));
        QVERIFY(!exportFormatTitle(f).isEmpty());
        QCOMPARE(exportFormatFromId(exportFormatId(f)), std::optional<ExportFormat>(f));
    }
    QCOMPARE(ids.size(), 8);
    QCOMPARE(suffixes.size(), 8);
    QCOMPARE(exportFormatId(ExportFormat::Cpp), u"cpp"_s);
    QCOMPARE(exportFormatSuffix(ExportFormat::Cpp), u"hpp"_s);
    QCOMPARE(exportFormatSuffix(ExportFormat::Matlab), u"m"_s);
    QVERIFY(!exportFormatFromId(u"excel"_s).has_value());
}

void TestExport::identifiersAreSafe_data()
{
    QTest::addColumn<QString>("requested");
    QTest::addColumn<QString>("identifier");
    QTest::newRow("kept") << u"coding"_s << u"coding"_s;
    QTest::newRow("spaces and punctuation") << u"my coding (v2)!"_s << u"my_coding_v2"_s;
    QTest::newRow("leading digit") << u"2x"_s << u"x2x"_s;
    QTest::newRow("leading underscore") << u"_hidden"_s << u"hidden"_s;
    QTest::newRow("empty") << QString() << u"table"_s;
    QTest::newRow("only symbols") << u"\"; rm -rf /"_s << u"rm_rf"_s;
    QTest::newRow("non-ASCII") << u"café"_s << u"caf"_s;
    QTest::newRow("C++ keyword") << u"class"_s << u"class_matrix"_s;
    QTest::newRow("Julia keyword") << u"end"_s << u"end_matrix"_s;
    QTest::newRow("R constant") << u"TRUE"_s << u"TRUE_matrix"_s;
    QTest::newRow("numpy alias") << u"np"_s << u"np_matrix"_s;
    QTest::newRow("too long") << QString(60, u'a') << QString(40, u'a');
}

void TestExport::identifiersAreSafe()
{
    QFETCH(QString, requested);
    QFETCH(QString, identifier);
    QCOMPARE(exportIdentifier(requested), identifier);
}

void TestExport::numbersPerFormat_data()
{
    QTest::addColumn<int>("format");
    QTest::addColumn<bool>("exact");
    QTest::addColumn<QString>("weight");
    QTest::addColumn<QString>("expected"); // a line fragment the output must contain
    const auto f = [](ExportFormat x) { return int(x); };
    QTest::newRow("csv exact") << f(ExportFormat::Csv) << true << u"-2/3"_s << u"x,-2/3\r\n"_s;
    QTest::newRow("csv decimal") << f(ExportFormat::Csv) << false << u"-2/3"_s << u"x,-0.6666666666666666\r\n"_s;
    QTest::newRow("csv decimal of 1/10") << f(ExportFormat::Csv) << false << u"1/10"_s << u"x,0.1\r\n"_s;
    QTest::newRow("csv big fraction stays exact") << f(ExportFormat::Csv) << true << u"1152921504606846976/3"_s
                                                  << u"x,1152921504606846976/3\r\n"_s;
    QTest::newRow("cpp fraction") << f(ExportFormat::Cpp) << true << u"-2/3"_s << u"{{-2.0 / 3}}"_s;
    QTest::newRow("cpp integer") << f(ExportFormat::Cpp) << true << u"7"_s << u"{{7.0}}"_s;
    QTest::newRow("cpp decimal integer") << f(ExportFormat::Cpp) << false << u"7"_s << u"{{7.0}}"_s;
    QTest::newRow("cpp beyond 2^53 falls back to decimal") << f(ExportFormat::Cpp) << true
                                                           << u"1152921504606846976/3"_s << u"{{384307168202282304.0}}"_s;
    QTest::newRow("cpp tiny") << f(ExportFormat::Cpp) << true << u"1e-300"_s << u"{{1e-300}}"_s;
    QTest::newRow("python fraction") << f(ExportFormat::Python) << true << u"-2/3"_s << u"[-2/3],"_s;
    QTest::newRow("r fraction") << f(ExportFormat::R) << true << u"1/4"_s << u"  1/4  #"_s;
    QTest::newRow("julia negative in parentheses") << f(ExportFormat::Julia) << true << u"-1/4"_s << u"(-1/4)  #"_s;
    QTest::newRow("matlab fraction") << f(ExportFormat::Matlab) << true << u"-1/4"_s << u"    -1/4  %"_s;
    QTest::newRow("latex fraction") << f(ExportFormat::Latex) << true << u"-2/3"_s << u"$-\\frac{2}{3}$"_s;
    QTest::newRow("latex exponent") << f(ExportFormat::Latex) << false << u"1e-300"_s << u"$1 \\times 10^{-300}$"_s;
    QTest::newRow("latex huge denominator as decimal") << f(ExportFormat::Latex) << true << u"1e-300"_s
                                                       << u"$1 \\times 10^{-300}$"_s;
    QTest::newRow("markdown fraction") << f(ExportFormat::Markdown) << true << u"-2/3"_s << u"| x | -2/3 |"_s;
}

void TestExport::numbersPerFormat()
{
    QFETCH(int, format);
    QFETCH(bool, exact);
    QFETCH(QString, weight);
    QFETCH(QString, expected);
    ExportTable t;
    t.title = u"one"_s;
    t.variableName = u"v"_s;
    t.rowHeader = u"r"_s;
    t.columnHeader = u"c"_s;
    t.rowNames = {u"x"_s};
    t.columnNames = {u"y"_s};
    t.cells = {{wt(weight)}};
    const QString text = exported(t, ExportFormat(format), exact);
    QVERIFY2(text.contains(expected), qPrintable(text));
}

void TestExport::validateNamesTheCell()
{
    ExportTable t = irrigationCoding();
    t.cells[2][1] = Weight::approx(std::nan(""));
    auto r = exportTable(t, ExportFormat::Csv);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(u"row 3 ('twice-weekly'), column 2 ('frequent_vs_weekly')"_s), qPrintable(r.error()));
    t = irrigationCoding();
    t.cells[1].pop_back();
    r = exportTable(t, ExportFormat::R);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(u"row 2 ('weekly') has 2 cells; expected 3"_s), qPrintable(r.error()));
}

void TestExport::codingTableFromScheme()
{
    const ExportTable t = irrigationCoding();
    QCOMPARE(t.rowNames, irrigationScheme().factor.levels);
    QCOMPARE(t.columnNames, (QStringList{u"watered_vs_none"_s, u"frequent_vs_weekly"_s, u"daily_vs_twice"_s}));
    QCOMPARE(t.cells[1][1].rational(), Rational(-2, 3));
    QCOMPARE(t.cells[3][2].rational(), Rational(1, 2));
    QVERIFY(t.title.contains(u"irrigation"_s));
}

void TestExport::codingTableRejectsShortColumn()
{
    Scheme s = irrigationScheme();
    s.columns[1].weights.pop_back();
    auto r = codingTable(s);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(u"column 2 ('frequent_vs_weekly') has 3 weights; expected 4"_s), qPrintable(r.error()));
}

void TestExport::hypothesisTableFromAnalysis()
{
    auto r = hypothesisTable(irrigationAnalysis());
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(r->rowNames.front(), u"intercept"_s);
    QCOMPARE(r->columnNames, irrigationScheme().factor.levels);
    QCOMPARE(r->cells[1][0].rational(), Rational(-1));
}

void TestExport::hypothesisTableRejectsRankDeficient()
{
    Analysis a = irrigationAnalysis();
    a.fullRank = false;
    a.rank = 3;
    a.hypotheses.clear();
    a.dependencies = {u"daily_vs_twice = 2 frequent_vs_weekly"_s};
    auto r = hypothesisTable(a);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(u"rank deficient (rank 3, 4 coefficients)"_s), qPrintable(r.error()));
    QVERIFY2(r.error().contains(u"daily_vs_twice = 2 frequent_vs_weekly"_s), qPrintable(r.error()));
}

// The hand-worked hypotheses used above are what the core's analysis derives.
void TestExport::analyzeAgreesWithHandWorkedHypotheses()
{
    auto fromAnalysis = hypothesisTable(analyze(irrigationScheme()));
    QVERIFY2(fromAnalysis.ok(), qPrintable(fromAnalysis.error()));
    const ExportTable byHand = hypothesisTable(irrigationAnalysis()).value();
    QCOMPARE(fromAnalysis->rowNames, byHand.rowNames);
    QCOMPARE(fromAnalysis->columnNames, byHand.columnNames);
    for (size_t i = 0; i < byHand.cells.size(); ++i) {
        for (size_t j = 0; j < byHand.cells[i].size(); ++j)
            QCOMPARE(fromAnalysis->cells[i][j].rational(), byHand.cells[i][j].rational());
    }
}

// Golden files: the coding matrix written with exact fractions and the
// hypothesis matrix with decimals, in every format. Set CB_UPDATE_GOLDEN=1 to
// rewrite them (then read the diff by eye before committing).
void TestExport::goldenFiles_data()
{
    QTest::addColumn<int>("format");
    QTest::addColumn<bool>("hypotheses");
    for (ExportFormat f : exportFormats()) {
        QTest::addRow("coding %s", qPrintable(exportFormatId(f))) << int(f) << false;
        QTest::addRow("hypotheses %s", qPrintable(exportFormatId(f))) << int(f) << true;
    }
}

void TestExport::goldenFiles()
{
    QFETCH(int, format);
    QFETCH(bool, hypotheses);
    const ExportFormat f = ExportFormat(format);
    const ExportTable t = hypotheses ? hypothesisTable(irrigationAnalysis()).value() : irrigationCoding();
    const QString text = exported(t, f, !hypotheses);
    const QString path = goldenDir() + (hypotheses ? u"/irrigation-hypotheses."_s : u"/irrigation-coding."_s)
                         + exportFormatSuffix(f);
    if (qEnvironmentVariableIntValue("CB_UPDATE_GOLDEN") == 1) {
        QDir().mkpath(goldenDir());
        QVERIFY(writeFile(path, text));
        qWarning("rewrote %s", qPrintable(path));
    }
    QFile file(path);
    QVERIFY2(file.open(QIODevice::ReadOnly), qPrintable(u"missing golden file "_s + path));
    const QByteArray golden = file.readAll();
    QCOMPARE(text.toUtf8(), golden);
}

void TestExport::csvRoundTrip_data()
{
    QTest::addColumn<bool>("hostile");
    QTest::addColumn<bool>("exact");
    QTest::newRow("demo exact") << false << true;
    QTest::newRow("demo decimal") << false << false;
    QTest::newRow("hostile exact") << true << true;
    QTest::newRow("hostile decimal") << true << false;
}

void TestExport::csvRoundTrip()
{
    QFETCH(bool, hostile);
    QFETCH(bool, exact);
    const ExportTable t = hostile ? hostileTable() : irrigationCoding();
    const QString text = exported(t, ExportFormat::Csv, exact);
    auto back = test::readExportedCsv(text);
    QVERIFY2(back.ok(), qPrintable(back.error()));
    QCOMPARE(back->rowHeader, cleaned(t.rowHeader));
    QCOMPARE(back->rowNames, cleaned(t.rowNames));
    QCOMPARE(back->columnNames, cleaned(t.columnNames));
    QCOMPARE(back->cells.size(), t.cells.size());
    for (size_t i = 0; i < t.cells.size(); ++i) {
        for (size_t j = 0; j < t.cells[i].size(); ++j) {
            const Weight &original = t.cells[i][j];
            const Weight &read = back->cells[i][j];
            if (exact && original.isExact())
                QVERIFY2(read.isExact() && read.rational() == original.rational(),
                         qPrintable(u"cell %1,%2: %3 read back as %4"_s.arg(i).arg(j).arg(original.storageString(), read.storageString())));
            QVERIFY2(sameDouble(read.value(), original.value()),
                     qPrintable(u"cell %1,%2: %3 read back as %4"_s.arg(i).arg(j).arg(original.storageString(), read.storageString())));
        }
    }
    // LF line ends and a byte order mark read the same.
    QString lf = text;
    lf.replace(u"\r\n"_s, u"\n"_s);
    if (!hostile) {
        auto again = test::readExportedCsv(QChar(0xFEFF) + lf);
        QVERIFY2(again.ok(), qPrintable(again.error()));
        QCOMPARE(again->rowNames, back->rowNames);
    }
}

void TestExport::csvReaderRejects_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<QString>("messagePart");
    QTest::newRow("empty") << QString() << u"CSV is empty"_s;
    QTest::newRow("header only") << u"level,a\r\n"_s << u"found 1 row(s)"_s;
    QTest::newRow("short header") << u"level\r\nx\r\n"_s << u"line 1: the header has 1 field(s)"_s;
    QTest::newRow("ragged row") << u"level,a,b\r\nx,1\r\n"_s << u"line 2: 2 field(s); expected 3"_s;
    QTest::newRow("bad weight") << u"level,a\r\nx,1/0\r\n"_s << u"line 2, field 2 (column 'a'): weight '1/0' divides by zero"_s;
    QTest::newRow("not a number") << u"level,a\r\nx,abc\r\n"_s << u"line 2, field 2 (column 'a')"_s;
    QTest::newRow("unclosed quote") << u"level,a\r\n\"x,1\r\n"_s << u"CSV line 2: a quoted field is never closed"_s;
    QTest::newRow("text after quote") << u"level,a\r\n\"x\"y,1\r\n"_s << u"CSV line 2: field 1 has text after its closing quote"_s;
    QTest::newRow("line count after quoted newline") << u"level,\"a\nb\"\r\nx,\r\n"_s << u"line 3, field 2"_s;
}

void TestExport::csvReaderRejects()
{
    QFETCH(QString, text);
    QFETCH(QString, messagePart);
    auto r = test::readExportedCsv(text);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(messagePart), qPrintable(r.error()));
}

// OWASP's advice against CSV injection: a name a spreadsheet would run as a
// formula gets a leading apostrophe; plain numbers are left alone.
void TestExport::csvGuardsFormulas()
{
    ExportTable t = oneColumnTable();
    t.rowNames = {u"=1+2"_s, u"-1"_s};
    t.columnNames = {u"@x"_s};
    const QString text = exported(t, ExportFormat::Csv, true);
    QCOMPARE(text, u"level,'@x\r\n'=1+2,-1/2\r\n-1,1/2\r\n"_s);
}

void TestExport::cppCompilesAndReproducesValues()
{
    QTemporaryDir dir;
    QVERIFY(dir.isValid());
    QString main = u"#include <cstdio>\n#include <cstring>\n"_s;
    QString calls;
    for (const Case &c : executionCases()) {
        const QString file = c.variable + u".hpp"_s;
        QVERIFY(writeFile(dir.filePath(file), exported(c.table, ExportFormat::Cpp, c.exact, c.variable)));
        main += u"#include \"%1\"\n"_s.arg(file);
        calls += u"    dump(\"%1\", %1, %1_array, %1_rows, %1_columns);\n"_s.arg(c.variable);
    }
    main += uR"(
template <class M, class A, class R, class C>
void dump(const char *name, const M &m, const A &arr, const R &rows, const C &cols)
{
    std::printf("table %s\nshape %ld %ld\n", name, long(m.rows()), long(m.cols()));
    for (auto s : rows) {
        std::printf("row ");
        for (unsigned char ch : s)
            std::printf("%02x", ch);
        std::printf("\n");
    }
    for (auto s : cols) {
        std::printf("column ");
        for (unsigned char ch : s)
            std::printf("%02x", ch);
        std::printf("\n");
    }
    for (long i = 0; i < m.rows(); ++i)
        for (long j = 0; j < m.cols(); ++j) {
            double a = arr[size_t(i)][size_t(j)], e = m(i, j);
            if (std::memcmp(&a, &e, sizeof a) != 0)
                std::printf("array and Eigen differ at %ld %ld\n", i, j);
            std::printf("cell %ld %ld %a\n", i, j, e);
        }
}

int main()
{
)"_s + calls + u"}\n"_s;
    QVERIFY(writeFile(dir.filePath(u"main.cpp"_s), main));
    const Run build = run(u"g++"_s, {u"-std=c++20"_s, u"-O1"_s, u"-Wall"_s, u"-Wextra"_s, u"-Werror"_s, u"-isystem"_s,
                                     u"/usr/include/eigen3"_s, u"main.cpp"_s, u"-o"_s, u"exported"_s},
                          dir.path());
    QVERIFY2(build.started, "g++ did not start");
    QVERIFY2(build.exitCode == 0, build.err.left(4000).constData());
    const Run prog = run(dir.filePath(u"exported"_s), {}, dir.path());
    QCOMPARE(prog.exitCode, 0);
    QVERIFY2(!QFile::exists(dir.filePath(u"pwned-marker"_s)), "a name ran code");
    const auto dumps = parseDump(prog.out);
    for (const Case &c : executionCases()) {
        QVERIFY2(dumps.count(c.variable), qPrintable(c.variable));
        compareDump(dumps.at(c.variable), c.table, c.variable);
    }
    // An outside value: the IEEE double nearest 1/10 is 0x1.999999999999ap-4
    // (its last bit rounds up; truncation would give ...9999p-4).
    QCOMPARE(dumps.at(u"hostile"_s).cells.at({0, 0}), 0x1.999999999999ap-4);
}

void TestExport::pythonReproducesValues()
{
    QTemporaryDir dir;
    QVERIFY(dir.isValid());
    QStringList args{QStringLiteral(CB_SOURCE_DIR) + u"/tests/python/run_export.py"_s};
    for (const Case &c : executionCases()) {
        const QString file = dir.filePath(c.variable + u".py"_s);
        QVERIFY(writeFile(file, exported(c.table, ExportFormat::Python, c.exact, c.variable)));
        args << file << c.variable;
    }
    const Run py = run(QStringLiteral(CB_PYTHON), args, dir.path());
    QVERIFY2(py.started, "python did not start");
    QVERIFY2(py.exitCode == 0, py.err.left(4000).constData());
    QVERIFY2(!QFile::exists(dir.filePath(u"pwned-marker"_s)), "a name ran code");
    const auto dumps = parseDump(py.out);
    for (const Case &c : executionCases()) {
        QVERIFY2(dumps.count(c.variable), qPrintable(c.variable));
        compareDump(dumps.at(c.variable), c.table, c.variable);
    }
}

void TestExport::scriptsAreWellFormed_data()
{
    QTest::addColumn<int>("format");
    QTest::addColumn<int>("which");
    const ExportFormat formats[] = {ExportFormat::R, ExportFormat::Julia, ExportFormat::Matlab, ExportFormat::Python,
                                    ExportFormat::Cpp};
    const auto cases = executionCases();
    for (ExportFormat f : formats) {
        for (size_t k = 0; k < cases.size(); ++k)
            QTest::addRow("%s %s", qPrintable(exportFormatId(f)), qPrintable(cases[k].variable)) << int(f) << int(k);
    }
}

void TestExport::scriptsAreWellFormed()
{
    QFETCH(int, format);
    QFETCH(int, which);
    const ExportFormat f = ExportFormat(format);
    const Case c = executionCases()[size_t(which)];
    const QString text = exported(c.table, f, c.exact, c.variable);
    keepForReading(c.variable, f, text);
    // C++ and Python are also compiled and run above; their data lines are
    // written twice (C++) or inside brackets on one line, so only names are checked.
    const bool data = f == ExportFormat::R || f == ExportFormat::Julia || f == ExportFormat::Matlab;
    checkScript(text, langOf(f), c.table, c.variable, data);
}

// LaTeX: braces balance, only the control words the exporter uses, one row
// per line with one '&' per column, names back after undoing the escapes.
void TestExport::latexIsWellFormed()
{
    const ExportTable t = hostileTable();
    const QString text = exported(t, ExportFormat::Latex, true);
    keepForReading(u"hostile"_s, ExportFormat::Latex, text);
    const QSet<QString> allowed{u"begin"_s, u"end"_s, u"centering"_s, u"caption"_s, u"hline"_s, u"frac"_s, u"times"_s,
                                u"textbackslash"_s, u"textasciicircum"_s, u"textasciitilde"_s, u"textless"_s,
                                u"textgreater"_s, u"textbar"_s};
    const std::map<QString, QString> symbols{{u"textbackslash"_s, u"\\"_s}, {u"textasciicircum"_s, u"^"_s},
                                             {u"textasciitilde"_s, u"~"_s}, {u"textless"_s, u"<"_s},
                                             {u"textgreater"_s, u">"_s}, {u"textbar"_s, u"|"_s}};
    QStringList problems;
    int rowLines = 0;
    QStringList firstCells;
    const QStringList lines = text.split(u'\n');
    for (const QString &line : lines) {
        int depth = 0, amps = 0;
        QString firstCell;
        bool inFirst = line.startsWith(u"    {"_s);
        bool firstDone = false;
        for (qsizetype i = 0; i < line.size(); ++i) {
            const QChar c = line[i];
            if (c == u'%' && i == 0)
                break; // our own header comment
            if (c == u'\\') {
                qsizetype j = i + 1;
                while (j < line.size() && line[j].isLetter() && line[j].unicode() < 128)
                    ++j;
                if (j == i + 1) {
                    // A control symbol: \{ \} \$ \& \# \_ \% or the row end \\.
                    if (j < line.size() && inFirst && !firstDone && depth >= 1)
                        firstCell += line[j];
                    i = j;
                    continue;
                }
                const QString word = line.mid(i + 1, j - i - 1);
                if (!allowed.contains(word))
                    problems.append(u"unexpected control word \\"_s + word);
                if (inFirst && !firstDone && depth >= 1 && symbols.count(word))
                    firstCell += symbols.at(word);
                if (j + 1 < line.size() && line[j] == u'{' && line[j + 1] == u'}' && symbols.count(word))
                    j += 2;
                i = j - 1;
                continue;
            }
            if (c == u'{') {
                if (depth >= 1 && inFirst && !firstDone)
                    firstCell += c;
                ++depth;
            } else if (c == u'}') {
                --depth;
                if (depth < 0)
                    problems.append(u"unbalanced '}' in: "_s + line);
                if (depth == 0 && inFirst && !firstDone)
                    firstDone = true;
                else if (inFirst && !firstDone)
                    firstCell += c;
            } else if (c == u'&') {
                ++amps;
            } else if (c == u'%') {
                problems.append(u"unescaped '%' in: "_s + line);
            } else if (inFirst && !firstDone && depth >= 1) {
                firstCell += c;
            }
        }
        if (depth != 0)
            problems.append(u"unbalanced braces in: "_s + line);
        if (line.endsWith(u" \\\\"_s)) {
            ++rowLines;
            if (amps != t.columnCount())
                problems.append(u"%1 '&' in a row; expected %2: "_s.arg(amps).arg(t.columnCount()) + line);
            firstCells.append(firstCell);
        }
    }
    QCOMPARE(rowLines, t.rowCount() + 1);
    QVERIFY2(problems.isEmpty(), qPrintable(problems.mid(0, 10).join(u"\n"_s)));
    // Names without line breaks, controls or runs of spaces come back exactly.
    const QStringList rows = firstCells.mid(1);
    QCOMPARE(rows.size(), t.rowCount());
    QCOMPARE(QSet<QString>(rows.begin(), rows.end()).size(), rows.size());
    for (qsizetype i = 0; i < t.rowNames.size(); ++i) {
        const QString &n = t.rowNames[i];
        bool plain = n == n.simplified();
        for (QChar c : n)
            plain = plain && c.category() != QChar::Other_Control && c.category() != QChar::Other_Format
                    && c.category() != QChar::Other_Surrogate;
        if (plain)
            QCOMPARE(rows[i], n);
    }
}

// Markdown: every table line has the same number of unescaped '|', no raw '<'
// or '[' that could start HTML or a link, names back after removing the escapes.
void TestExport::markdownIsWellFormed()
{
    const ExportTable t = hostileTable();
    const QString text = exported(t, ExportFormat::Markdown, true);
    keepForReading(u"hostile"_s, ExportFormat::Markdown, text);
    QStringList problems;
    QStringList firstCells;
    for (const QString &line : text.split(u'\n')) {
        QStringList cells{QString()};
        bool raw = false;
        for (qsizetype i = 0; i < line.size(); ++i) {
            if (line[i] == u'\\' && i + 1 < line.size()) {
                if (!line[i + 1].isPunct() && !line[i + 1].isSymbol())
                    problems.append(u"a backslash before a letter in: "_s + line);
                cells.back() += line[++i];
            } else if (line[i] == u'|') {
                cells.append(QString());
            } else {
                if (line[i] == u'<' || line[i] == u'[' || line[i] == u'`' || line[i] == u'&')
                    raw = true;
                cells.back() += line[i];
            }
        }
        if (raw)
            problems.append(u"an unescaped markup character in: "_s + line);
        if (!line.startsWith(u'|'))
            continue;
        if (cells.size() != t.columnCount() + 3)
            problems.append(u"%1 cells; expected %2: "_s.arg(cells.size() - 2).arg(t.columnCount() + 1) + line);
        else
            firstCells.append(cells[1].trimmed());
    }
    QVERIFY2(problems.isEmpty(), qPrintable(problems.mid(0, 10).join(u"\n"_s)));
    QCOMPARE(firstCells.size(), t.rowCount() + 2);
    const QStringList rows = firstCells.mid(2);
    QCOMPARE(QSet<QString>(rows.begin(), rows.end()).size(), rows.size());
    QCOMPARE(rows[0], t.rowNames[0]);
    QCOMPARE(rows[13], t.rowNames[13]); // "<script>...| pipe |"
}

// "a b", "a\nb" and "  a   b  " read the same in a table for people: the later
// ones get a suffix so that every row stays distinguishable.
void TestExport::displayNamesStayUnique()
{
    ExportTable t = oneColumnTable();
    t.rowNames = {u"a b"_s, u"a\nb"_s, u"  a   b  "_s};
    t.cells = {{wt(u"1"_s)}, {wt(u"2"_s)}, {wt(u"3"_s)}};
    const QString md = exported(t, ExportFormat::Markdown, true);
    QVERIFY2(md.contains(u"| a b | 1 |\n| a b (2) | 2 |\n| a b (3) | 3 |"_s), qPrintable(md));
    // In code the names are kept exactly, so nothing is renamed.
    const QString py = exported(t, ExportFormat::Python, true);
    QVERIFY2(py.contains(u"\"a\\nb\""_s) && !py.contains(u"(2)"_s), qPrintable(py));
}

namespace {
QString cliPath()
{
    return QStringLiteral(CB_BINARY_DIR) + u"/app/contrast-bench-cli"_s;
}
} // namespace

// The built command line reads a scheme file with awkward level names and
// writes the same text as the library, to standard output or through -o.
void TestExport::cliExportsSchemeFile_data()
{
    QTest::addColumn<QString>("format");
    QTest::addColumn<bool>("toFile");
    QTest::newRow("csv to stdout") << u"csv"_s << false;
    QTest::newRow("python to file") << u"python"_s << true;
    QTest::newRow("latex to file") << u"latex"_s << true;
}

void TestExport::cliExportsSchemeFile()
{
    QFETCH(QString, format);
    QFETCH(bool, toFile);
    QVERIFY2(QFile::exists(cliPath()), qPrintable(u"build contrast-bench-cli first: "_s + cliPath()));
    QTemporaryDir dir;
    QVERIFY(dir.isValid());
    Scheme s = irrigationScheme();
    s.factor.levels = {u"none \"; rm -rf /; \""_s, u"$weekly"_s, u"twice\nweekly"_s, u"daily é"_s};
    const QString schemePath = dir.filePath(u"scheme.json"_s);
    const QString saveError = saveScheme(s, schemePath);
    QVERIFY2(saveError.isEmpty(), qPrintable(saveError));
    auto loaded = loadStudy(schemePath);
    QVERIFY2(loaded.ok(), qPrintable(loaded.error()));
    auto table = codingTable(loaded->activeScheme());
    QVERIFY2(table.ok(), qPrintable(table.error()));
    const ExportFormat f = *exportFormatFromId(format);
    const QString expected = exported(*table, f, true);

    QStringList args{u"export"_s, u"--file"_s, schemePath, u"--format"_s, format, u"--exact"_s};
    const QString outPath = dir.filePath(u"out."_s + exportFormatSuffix(f));
    if (toFile)
        args << u"-o"_s << outPath;
    const Run cli = run(cliPath(), args, dir.path(), 60000);
    QVERIFY2(cli.exitCode == 0, cli.err.constData());
    QByteArray written = cli.out;
    if (toFile) {
        QVERIFY(cli.out.isEmpty());
        QFile file(outPath);
        QVERIFY(file.open(QIODevice::ReadOnly));
        written = file.readAll();
    }
    QCOMPARE(QString::fromUtf8(written), expected);
}

void TestExport::cliRejects_data()
{
    QTest::addColumn<QStringList>("args");
    QTest::addColumn<int>("exitCode");
    QTest::addColumn<QString>("messagePart");
    const QStringList scheme{u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"treatment"_s};
    QTest::newRow("unknown format") << scheme + QStringList{u"--format"_s, u"xls"_s} << 2 << u"--format: unknown format 'xls'"_s;
    QTest::newRow("missing format") << scheme << 2 << u"--format: missing"_s;
    QTest::newRow("unknown matrix") << scheme + QStringList{u"--format"_s, u"csv"_s, u"--matrix"_s, u"both"_s} << 2
                                    << u"--matrix: unknown matrix 'both'"_s;
    QTest::newRow("rank deficient hypotheses")
        << QStringList{u"--levels"_s, u"a,b,c"_s, u"--columns"_s, u"1,0,-1;2,0,-2"_s, u"--format"_s, u"r"_s, u"--matrix"_s, u"hypotheses"_s}
        << 2 << u"--matrix hypotheses: cannot export the hypotheses: the coding is rank deficient"_s;
    QTest::newRow("unwritable output") << scheme + QStringList{u"--format"_s, u"csv"_s, u"-o"_s, u"/nonexistent-dir/x.csv"_s} << 1
                                       << u"/nonexistent-dir/x.csv"_s;
}

void TestExport::cliRejects()
{
    QFETCH(QStringList, args);
    QFETCH(int, exitCode);
    QFETCH(QString, messagePart);
    QVERIFY2(QFile::exists(cliPath()), qPrintable(u"build contrast-bench-cli first: "_s + cliPath()));
    const Run cli = run(cliPath(), QStringList{u"export"_s} + args, QDir::tempPath(), 60000);
    QCOMPARE(cli.exitCode, exitCode);
    QVERIFY2(QString::fromUtf8(cli.err).contains(messagePart), cli.err.constData());
    QVERIFY(cli.out.isEmpty());
}

QTEST_GUILESS_MAIN(TestExport)

// A design file is exported over its cells: for centred +-1/2 coding of a 2 x 2 design the
// columns are the Kronecker products (A: -1/2, -1/2, 1/2, 1/2; B: -1/2, 1/2, -1/2, 1/2;
// A x B: 1/4, -1/4, -1/4, 1/4; cells A-major). An empty cell is refused, naming it.
void TestExport::cliExportsDesignOverItsCells()
{
    QVERIFY2(QFile::exists(cliPath()), qPrintable(u"build contrast-bench-cli first: "_s + cliPath()));
    const auto centred = [](const QString &name, const QString &a, const QString &b) {
        Scheme s;
        s.kind = SchemeKind::Custom;
        s.factor.name = name;
        s.factor.levels = {a, b};
        s.columns.push_back(Column{name, {Weight::exact(Rational(-1, 2)), Weight::exact(Rational(1, 2))}});
        return s;
    };
    Design d;
    d.factors = {centred(u"A"_s, u"a1"_s, u"a2"_s), centred(u"B"_s, u"b1"_s, u"b2"_s)};
    d.terms = Design::fullFactorial(2);
    QTemporaryDir dir;
    const QString path = dir.filePath(u"design.json"_s);
    QVERIFY(writeFile(path, QString::fromUtf8(designToJson(d))));
    const Run r = run(cliPath(), {u"export"_s, u"--file"_s, path, u"--format"_s, u"csv"_s, u"--exact"_s}, dir.path());
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QStringList lines = r.outText().split(QRegularExpression(u"\r?\n"_s), Qt::SkipEmptyParts);
    QCOMPARE(lines.size(), 5);
    QCOMPARE(lines[1], u"a1\u00b7b1,-1/2,-1/2,1/4"_s);
    QCOMPARE(lines[2], u"a1\u00b7b2,-1/2,1/2,-1/4"_s);
    QCOMPARE(lines[3], u"a2\u00b7b1,1/2,-1/2,-1/4"_s);
    QCOMPARE(lines[4], u"a2\u00b7b2,1/2,1/2,1/4"_s);

    d.cellN = {5, 5, 0, 5};
    QVERIFY(writeFile(path, QString::fromUtf8(designToJson(d))));
    const Run empty = run(cliPath(), {u"export"_s, u"--file"_s, path, u"--format"_s, u"csv"_s}, dir.path());
    QCOMPARE(empty.exitCode, 2);
    // With the interaction the terms cannot be estimated without the empty cell: refused with the
    // reason (TestEmptyCells: main effects only, the export is over the other cells).
    QVERIFY2(empty.errText().contains(u"empty cell (planned n = 0): a2\u00b7b1. The chosen terms cannot be estimated"_s), empty.err.constData());
}

#include "TestExport.moc"
