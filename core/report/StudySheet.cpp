#include "core/report/StudySheet.h"

#include "core/files/StudyFile.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/analysis/Analysis.h"
#include "core/analysis/Compare.h"
#include "core/base/NumberText.h"
#include "core/base/Version.h"
#include "core/model/Design.h"
#include "core/report/LevelBars.h"

#include <QCryptographicHash>
#include <QDateTime>

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// The colours of the window's look (ui/common/Look.cpp), written as CSS: raised and lowered bars,
// the baseline and quiet text.
constexpr QStringView kRaised = u"#2b6cb0";
constexpr QStringView kLowered = u"#d67a1e";
constexpr QStringView kBaseline = u"#5a606b";
constexpr QStringView kQuiet = u"#8a9099";

// Bars on the sheet: the chart box's size; names and weights go above and below it.
constexpr int kPictureWidthPerLevel = 96;
constexpr int kPictureMinWidth = 240;
constexpr int kPictureMaxWidth = 800;
constexpr int kPictureHeight = 110;
constexpr int kPictureText = 16; // a line of small text
constexpr double kMaxBarWidth = 34.0;
// Up to this many levels the picture names each level and writes its weight (as the cards do).
constexpr int kLabelledLevels = 10;

QString px(double v)
{
    return QString::number(v, 'f', 1);
}

QString esc(const QString &s)
{
    return htmlEscaped(s);
}

// In a browser the page is a column of readable width; Qt's rich text (PDF, printing) takes the
// page's width as it is, and only knows a table's width from its attribute.
const char16_t *kBrowserStyle = uR"(body { max-width: 60em; margin: 2em auto; padding: 0 1em; line-height: 1.4; }
@media print { body { margin: 0; max-width: none; } }
)";

const char16_t *kStyle = uR"(
body { font-family: "DejaVu Sans", "Helvetica", "Arial", sans-serif; font-size: 10.5pt; color: #1d232b; }
h1 { font-size: 18pt; margin-bottom: 0.2em; }
h2 { font-size: 13pt; border-bottom: 1px solid #d5d9df; padding-bottom: 0.2em; margin-top: 1.6em; }
h3 { font-size: 11pt; margin: 1em 0 0.2em 0; }
p.meta, p.quiet, td.quiet { color: #5a606b; }
table { border-collapse: collapse; margin: 0.5em 0; }
th, td { border: 1px solid #d5d9df; padding: 0.15em 0.5em; text-align: right; vertical-align: top; }
th { background: #f1f3f6; font-weight: bold; }
th.name, td.name, td p, td h3 { text-align: left; }
tr.sum td { background: #f7f8fa; font-style: italic; }
.coefficient { break-inside: avoid; page-break-inside: avoid; margin-bottom: 1em; }
.symbols { font-family: "DejaVu Sans Mono", monospace; font-size: 9.5pt; color: #5a606b; }
.problem { color: #b83b3b; font-weight: bold; }
.caution { color: #a05a00; font-weight: bold; }
.fine, .same { color: #17663a; }
.rescaled { color: #2b6cb0; font-weight: bold; }
.different { color: #8e3b8f; font-weight: bold; }
.checksum { font-family: "DejaVu Sans Mono", monospace; font-size: 9pt; word-break: break-all; }
@media print { h2 { break-after: avoid; page-break-after: avoid; } }
)";

class Writer
{
public:
    Writer(SheetPictures mode) : m_mode(mode) {}
    bool forQt() const { return m_mode == SheetPictures::ImageReferences; }

    QString html;
    std::vector<QByteArray> pictures;

    Writer &operator<<(QStringView s)
    {
        html += s;
        return *this;
    }
    Writer &operator<<(const QString &s)
    {
        html += s;
        return *this;
    }
    Writer &operator<<(const char16_t *s)
    {
        html += QStringView(s);
        return *this;
    }
    void picture(const QByteArray &svg, const QString &description, int width, int height)
    {
        // A paragraph of its own: Qt's rich text would otherwise set the image in the text's line.
        html += u"<p class=\"picture\">"_s;
        if (m_mode == SheetPictures::InlineSvg) {
            html += QString::fromUtf8(svg);
        } else {
            pictures.push_back(svg);
            html += u"<img src=\"picture:%1\" width=\"%2\" height=\"%3\" alt=\"%4\" />"_s.arg(pictures.size() - 1).arg(width).arg(height).arg(esc(description));
        }
        html += u"</p>"_s;
    }

private:
    SheetPictures m_mode;
};

// Which columns of a table hold text (left-aligned) and which numbers: "tnnt" is text, two
// numbers, text; columns past the end of the spec hold numbers.
bool textColumn(QStringView spec, qsizetype i)
{
    return i < spec.size() && spec[i] == u't';
}

void tableStart(Writer &w, const QStringList &header, QStringView spec = u"t")
{
    w << (w.forQt() ? u"<table width=\"100%\" cellspacing=\"0\">\n<tr>"_s : u"<table>\n<tr>"_s);
    for (qsizetype i = 0; i < header.size(); ++i)
        w << (textColumn(spec, i) ? u"<th class=\"name\">"_s : u"<th>"_s) << esc(header[i]) << u"</th>";
    w << u"</tr>\n";
}

void row(Writer &w, const QStringList &cells, const QString &rowClass = {}, QStringView spec = u"t")
{
    w << (rowClass.isEmpty() ? u"<tr>"_s : u"<tr class=\"%1\">"_s.arg(rowClass));
    for (qsizetype i = 0; i < cells.size(); ++i)
        w << (textColumn(spec, i) ? u"<td class=\"name\">"_s : u"<td>"_s) << esc(cells[i]) << u"</td>";
    w << u"</tr>\n";
}

QString sizesText(const Factor &f)
{
    if (!f.hasPlannedN())
        return u"equal"_s;
    QStringList n;
    for (const Rational &q : f.plannedN)
        n << rationalToString(q);
    return n.join(u", "_s);
}

QString codingText(const Scheme &s)
{
    QString t = schemeTitle(s.kind);
    if (schemeUsesReference(s.kind) && s.reference >= 0 && s.reference < s.levelCount())
        t += u", "_s + (s.kind == SchemeKind::Sum || s.kind == SchemeKind::WeightedEffect ? u"base level "_s : u"reference "_s)
             + s.factor.levels[s.reference];
    return t;
}

QString defaultTitle(const Study &study, const SheetOptions &o)
{
    if (!o.title.isEmpty())
        return o.title;
    if (!o.fileName.isEmpty())
        return o.fileName;
    QStringList names;
    for (const Scheme &s : study.design.factors)
        names << (s.factor.name.isEmpty() ? u"unnamed factor"_s : s.factor.name);
    return names.join(kCrossJoiner);
}

QString severityWord(Finding::Severity s)
{
    return s == Finding::Severity::Problem ? u"problem"_s : s == Finding::Severity::Caution ? u"caution"_s : u"note"_s;
}

void factorsSection(Writer &w, const Study &study)
{
    w << u"<h2>Factors</h2>\n";
    tableStart(w, {u"factor"_s, u"levels"_s, u"planned n"_s, u"positions"_s, u"coding"_s, u"intercept"_s}, u"tttttt");
    for (const Scheme &s : study.design.factors) {
        QStringList x;
        for (const Weight &p : s.factor.positions())
            x << p.display();
        row(w, {s.factor.name.isEmpty() ? u"(unnamed)"_s : s.factor.name, s.factor.levels.join(u", "_s), sizesText(s.factor),
                x.join(u", "_s), codingText(s), s.intercept ? u"yes"_s : u"no"_s}, {}, u"tttttt");
    }
    w << u"</table>\n";
}

void designSection(Writer &w, const Study &study, const DesignAnalysis &da)
{
    const Design &d = study.design;
    w << u"<h2>Design</h2>\n<p>Cells (the first factor varies slowest): " << esc(da.cells.join(u", "_s)) << u".</p>\n";
    w << u"<p>Terms: " << esc(da.termNames.join(u", "_s)) << u".</p>\n";
    if (!d.cellN.empty()) {
        tableStart(w, {u"cell"_s, u"planned n"_s});
        for (qsizetype c = 0; c < da.cells.size() && size_t(c) < d.cellN.size(); ++c)
            row(w, {da.cells[c], rationalToString(d.cellN[size_t(c)])});
        w << u"</table>\n";
    } else {
        w << u"<p>Planned n: equal in every cell.</p>\n";
    }
}

void codingSection(Writer &w, const Scheme &s, const Analysis &a)
{
    w << u"<h2>Coding matrix</h2>\n<p class=\"quiet\">Rows: levels; columns: the coding columns, in exact fractions where they are exact.</p>\n";
    QStringList header{u"level"_s};
    header << a.columnNames;
    tableStart(w, header);
    for (int i = 0; i < a.levelCount; ++i) {
        QStringList r{a.levels[i]};
        for (const Column &c : s.columns)
            r << c.weights[size_t(i)].display(true);
        row(w, r);
    }
    QStringList sums{u"column sum"_s};
    for (const Weight &x : a.columnSums)
        sums << x.display(true);
    row(w, sums, u"sum"_s);
    w << u"</table>\n";
}

void hypothesisSection(Writer &w, const Analysis &a)
{
    w << u"<h2>Hypothesis matrix</h2>\n";
    if (!a.fullRank || a.hypotheses.empty()) {
        w << u"<p class=\"problem\">Rank " << QString::number(a.rank) << u" of " << QString::number(a.coefficientCount)
          << u": the coefficients are not identifiable, so they test no hypotheses.</p>\n";
        for (const QString &d : a.dependencies)
            w << u"<p>Dependent: " << esc(d) << u"</p>\n";
        return;
    }
    w << u"<p class=\"quiet\">Rows: coefficients; columns: the weights each puts on the level means.";
    if (a.dependsOnSizes)
        w << u" The model is not saturated, so these rows depend on the planned n.";
    w << u"</p>\n";
    QStringList header{u"coefficient"_s};
    header << a.levels;
    tableStart(w, header);
    for (int r = 0; r < a.coefficientCount; ++r) {
        QStringList cells{coefficientLabel(a.intercept, r, a.coefficientNames[r])};
        for (const Weight &x : a.hypotheses[size_t(r)])
            cells << x.display(true);
        row(w, cells);
    }
    w << u"</table>\n";

    w << u"<h2>What each coefficient tests</h2>\n";
    for (int r = 0; r < a.coefficientCount; ++r) {
        const bool intercept = a.intercept && r == 0;
        const QString label = coefficientLabel(a.intercept, r, a.coefficientNames[r]);
        w << u"<div class=\"coefficient\">\n<h3>" << esc(label) << u"</h3>\n";
        w << u"<p class=\"symbols\">" << esc(a.hypothesisSymbols.value(r)) << u"</p>\n";
        w << u"<p>" << esc(intercept ? u"The intercept is %1."_s.arg(a.hypothesisWords.value(r))
                                     : u"Estimates %1."_s.arg(a.hypothesisWords.value(r)))
          << u"</p>\n";
        const int width = std::clamp(a.levelCount * kPictureWidthPerLevel, kPictureMinWidth, kPictureMaxWidth);
        w.picture(levelBarsSvg(a.hypotheses[size_t(r)], a.levels, width, kPictureHeight), u"weights of %1 on the level means"_s.arg(label), width,
                  kPictureHeight);
        w << u"\n</div>\n";
    }
}

void healthSection(Writer &w, const Analysis &a)
{
    w << u"<h2>Design health</h2>\n" << (w.forQt() ? u"<table width=\"100%\" cellspacing=\"0\">\n"_s : u"<table>\n"_s);
    auto line = [&](const QString &what, const QString &value, const QString &state) {
        w << u"<tr><th class=\"name\">" << esc(what) << u"</th><td class=\"name\">" << esc(value);
        if (!state.isEmpty())
            w << u" <span class=\"" << state << u"\">(" << state << u")</span>";
        w << u"</td></tr>\n";
    };
    line(u"rank"_s, u"%1 of %2%3"_s.arg(a.rank).arg(a.coefficientCount).arg(a.fullRank ? u" (full rank)"_s : QString()),
         a.fullRank ? QString() : u"problem"_s);
    line(u"arithmetic"_s, a.exact ? u"exact"_s : u"floating-point"_s, {});
    const bool conditionFlag = a.conditionNumber && *a.conditionNumber >= kConditionIndexFlag;
    line(u"condition number (unit-length columns, weighted by the planned n)"_s, numberText(a.conditionNumber),
         !a.conditionNumber ? u"problem"_s : conditionFlag ? u"caution"_s : QString());
    w << u"</table>\n";
    if (a.columnCount > 0) {
        tableStart(w, {u"column"_s, u"sum"_s, u"VIF"_s, u"orthogonal under the planned n to"_s}, u"tnnt");
        for (int j = 0; j < a.columnCount; ++j) {
            const auto &v = a.vif[size_t(j)];
            QStringList with;
            for (int i = 0; i < a.columnCount; ++i)
                if (i != j && a.orthogonalInDesign(i, j))
                    with << a.columnNames[i];
            QString vifText = numberText(v);
            if (v && *v >= kVifProblem)
                vifText += u" (problem)"_s;
            else if (v && *v >= kVifCaution)
                vifText += u" (caution)"_s;
            row(w, {a.columnNames[j], a.columnSums[size_t(j)].display(true), vifText,
                    a.columnCount == 1 ? kMissingMark.toString() : with.isEmpty() ? u"none"_s : with.join(u", "_s)},
                {}, u"tnnt");
        }
        w << u"</table>\n";
        w << u"<p class=\"quiet\">Flags: a VIF of 5 or more is a caution and 10 or more a problem; a condition number of 30 or "
             "more flags collinearity (common practice, not laws).</p>\n";
    }
}

QByteArray powerCurveSvg(const std::vector<std::pair<QString, std::vector<std::pair<double, double>>>> &lines, int width, int height)
{
    static const QStringView colours[] = {u"#2b6cb0", u"#d67a1e", u"#178a77", u"#8e3b8f", u"#5a606b", u"#b83b3b", u"#6a9a2c", u"#1f9ec4"};
    const double left = 44, top = 10, right = 180, bottom = 36;
    const double plotW = width - left - right, plotH = height - top - bottom;
    double xHi = 2;
    for (const auto &l : lines)
        for (const auto &p : l.second)
            xHi = std::max(xHi, p.first);
    auto X = [&](double x) { return left + (x - 2.0) / std::max(1.0, xHi - 2.0) * plotW; };
    auto Y = [&](double y) { return top + (1.0 - y) * plotH; };
    QString s = u"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%1\" height=\"%2\" viewBox=\"0 0 %1 %2\" font-family=\"DejaVu Sans, sans-serif\" font-size=\"11\">"_s
                    .arg(width).arg(height);
    s += u"<title>power against the size of the smallest group</title>"_s;
    for (int i = 0; i <= 4; ++i) {
        const double y = Y(i / 4.0);
        s += u"<line x1=\"%1\" y1=\"%2\" x2=\"%3\" y2=\"%2\" stroke=\"#e3e6ea\" />"_s.arg(px(left), px(y), px(left + plotW));
        s += u"<text x=\"%1\" y=\"%2\" text-anchor=\"end\" fill=\"%3\">%4</text>"_s.arg(px(left - 4), px(y + 4), kBaseline, QString::number(i / 4.0));
    }
    s += u"<line x1=\"%1\" y1=\"%2\" x2=\"%1\" y2=\"%3\" stroke=\"%4\" />"_s.arg(px(left), px(top), px(top + plotH), kBaseline);
    s += u"<line x1=\"%1\" y1=\"%2\" x2=\"%3\" y2=\"%2\" stroke=\"%4\" />"_s.arg(px(left), px(top + plotH), px(left + plotW), kBaseline);
    s += u"<text x=\"%1\" y=\"%2\" text-anchor=\"start\" fill=\"%3\">2</text>"_s.arg(px(left), px(top + plotH + 14), kBaseline);
    s += u"<text x=\"%1\" y=\"%2\" text-anchor=\"end\" fill=\"%3\">%4</text>"_s.arg(px(left + plotW), px(top + plotH + 14), kBaseline, numberText(xHi));
    s += u"<text x=\"%1\" y=\"%2\" text-anchor=\"middle\" fill=\"%3\">n in the smallest group</text>"_s.arg(px(left + plotW / 2), px(top + plotH + 30), kBaseline);
    for (size_t i = 0; i < lines.size(); ++i) {
        QString points;
        for (const auto &p : lines[i].second)
            if (std::isfinite(p.second))
                points += px(X(p.first)) + u","_s + px(Y(p.second)) + u" "_s;
        const QStringView colour = colours[i % 8];
        s += u"<polyline fill=\"none\" stroke=\"%1\" stroke-width=\"2\" points=\"%2\" />"_s.arg(colour, points.trimmed());
        const double ly = top + 6 + double(i) * 16;
        s += u"<line x1=\"%1\" y1=\"%2\" x2=\"%3\" y2=\"%2\" stroke=\"%4\" stroke-width=\"2\" />"_s.arg(px(left + plotW + 10), px(ly), px(left + plotW + 28), colour);
        s += u"<text x=\"%1\" y=\"%2\" fill=\"#1d232b\">%3</text>"_s.arg(px(left + plotW + 32), px(ly + 4), esc(lines[i].first.left(24)));
    }
    s += u"</svg>"_s;
    return s.toUtf8();
}

void powerSection(Writer &w, const Analysis &a, const PowerSettings &settings)
{
    w << u"<h2>Power</h2>\n";
    auto rows = contrastRowsOf(a);
    if (!rows) {
        w << u"<p class=\"problem\">" << esc(rows.error()) << u"</p>\n";
        return;
    }
    auto report = computePower(rows->rows, rows->names, settings);
    if (!report) {
        w << u"<p class=\"problem\">" << esc(report.error()) << u"</p>\n";
        return;
    }
    const PowerReport &r = report.value();
    QStringList means;
    for (double m : settings.means)
        means << numberText(m);
    QStringList n;
    for (double x : r.plannedN)
        n << numberText(x, 10);
    w << u"<p>Expected means: " << esc(means.join(u", "_s)) << u"; SD " << esc(numberText(settings.sd)) << u"; planned n "
      << esc(n.join(u", "_s)) << u"; alpha " << esc(numberText(r.alpha)) << u" (" << esc(numberText(r.perTestAlpha))
      << u" per test), " << (r.oneSided ? u"one-sided"_s : u"two-sided"_s) << u"; target power " << esc(numberText(r.target)) << u".</p>\n";
    tableStart(w, {u"test"_s, u"estimate"_s, u"effect size"_s, u"power at plan"_s, u"n needed per level"_s, u"total N"_s});
    auto needed = [](const SampleSize &s) {
        QStringList out;
        for (long long v : s.perLevel)
            out << QString::number(v);
        return s.reachable ? out.join(u", "_s) : kMissingMark.toString();
    };
    for (const ContrastPower &c : r.contrasts)
        row(w, {c.name, numberText(c.estimate), numberText(c.effectSize), numberText(c.power, 3), needed(c.required),
                c.required.reachable ? QString::number(c.required.total) : kMissingMark.toString()});
    row(w, {u"all means equal (F)"_s, kMissingMark.toString(), u"f = "_s + numberText(r.omnibus.effectSize), numberText(r.omnibus.power, 3),
            needed(r.omnibus.required), r.omnibus.required.reachable ? QString::number(r.omnibus.required.total) : kMissingMark.toString()});
    w << u"</table>\n";

    // The curves: power against the smallest group's size, up to twice the largest size needed.
    long long upTo = 20;
    for (const ContrastPower &c : r.contrasts)
        if (c.required.reachable && !c.required.perLevel.empty())
            upTo = std::max(upTo, 2 * *std::min_element(c.required.perLevel.begin(), c.required.perLevel.end()));
    upTo = std::min(upTo, 2000LL);
    const std::vector<long long> sizes = powerCurveSizes(upTo, 40);
    std::vector<std::pair<QString, std::vector<std::pair<double, double>>>> lines;
    for (int c = -1; c < int(r.contrasts.size()); ++c) {
        auto curve = powerCurve(rows->rows, c, settings, sizes);
        if (!curve)
            continue;
        std::vector<std::pair<double, double>> pts;
        for (size_t i = 0; i < sizes.size(); ++i)
            pts.emplace_back(double(sizes[i]), curve.value()[i]);
        lines.emplace_back(c < 0 ? u"all means equal (F)"_s : r.contrasts[size_t(c)].name, std::move(pts));
    }
    w.picture(powerCurveSvg(lines, 640, 240), u"power curves"_s, 640, 240);
    w << u"\n";
    for (const QString &c : r.cautions)
        w << u"<p class=\"quiet\">" << esc(c) << u"</p>\n";
}

void pageHead(Writer &w, const QString &title, const QString &heading)
{
    w << u"<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\" />\n<title>" << esc(title)
      << u"</title>\n<style>" << kStyle << (w.forQt() ? u"" : kBrowserStyle) << u"</style>\n</head>\n<body>\n";
    w << u"<h1>" << esc(heading) << u"</h1>\n";
}

// One coefficient as a cell of the comparison: label, symbols, words, picture.
void coefficientCell(Writer &w, const Analysis &a, int index)
{
    w << u"<td class=\"name\">";
    if (index < 0) {
        w << u"<p class=\"quiet\">no such coefficient</p></td>";
        return;
    }
    w << u"<h3>" << esc(coefficientLabel(a.intercept, index, a.coefficientNames[index])) << u"</h3>\n";
    if (a.hypotheses.empty()) {
        w << u"<p class=\"problem\">not identifiable (rank deficient)</p></td>";
        return;
    }
    w << u"<p class=\"symbols\">" << esc(a.hypothesisSymbols.value(index)) << u"</p>\n<p>" << esc(a.hypothesisWords.value(index))
      << u"</p>\n";
    const int width = std::clamp(a.levelCount * kPictureWidthPerLevel / 2, kPictureMinWidth, kPictureMaxWidth / 2);
    w.picture(levelBarsSvg(a.hypotheses[size_t(index)], a.levels, width, kPictureHeight), u"weights on the level means"_s, width, kPictureHeight);
    w << u"</td>";
}

void cautionsSection(Writer &w, const Analysis &a)
{
    w << u"<h2>Cautions</h2>\n";
    if (a.findings.empty()) {
        w << u"<p class=\"fine\">None: nothing to flag.</p>\n";
        return;
    }
    w << u"<ul>\n";
    for (const Finding &f : a.findings) {
        const QString word = severityWord(f.severity);
        w << u"<li><span class=\"" << (word == u"note"_s ? u"quiet"_s : word) << u"\">" << word << u"</span>: " << esc(f.message) << u"</li>\n";
    }
    w << u"</ul>\n";
}

} // namespace

QString htmlEscaped(QStringView text)
{
    QString out;
    out.reserve(text.size());
    for (QChar c : text) {
        switch (c.unicode()) {
        case u'&': out += u"&amp;"_s; break;
        case u'<': out += u"&lt;"_s; break;
        case u'>': out += u"&gt;"_s; break;
        case u'"': out += u"&quot;"_s; break;
        case u'\'': out += u"&#39;"_s; break;
        default:
            // Control characters other than tab and newline are not allowed in XML: shown as U+FFFD.
            out += (c.unicode() < 0x20 && c != u'\t' && c != u'\n') ? QChar(0xfffd) : c;
        }
    }
    return out;
}

QByteArray levelBarsSvg(const std::vector<Weight> &row, const QStringList &levels, int width, int height)
{
    const int k = int(row.size());
    const bool labelled = k <= kLabelledLevels;
    const int line = labelled ? kPictureText : 0;
    std::vector<double> values;
    for (const Weight &x : row)
        values.push_back(x.value());
    const LevelBarsLayout bars = levelBarsLayout(values, 0, line, width, height - 2 * line, kMaxBarWidth);
    QString s = u"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%1\" height=\"%2\" viewBox=\"0 0 %1 %2\" font-family=\"DejaVu Sans, sans-serif\" font-size=\"11\">"_s
                    .arg(width).arg(height);
    QStringList described;
    for (int i = 0; i < k; ++i)
        described << levels.value(i) + u" "_s + row[size_t(i)].display();
    s += u"<title>"_s + esc(described.join(u", "_s)) + u"</title>"_s;
    for (int i = 0; i < k; ++i) {
        const LevelBar &b = bars.bars[size_t(i)];
        if (b.sign != 0)
            s += u"<rect x=\"%1\" y=\"%2\" width=\"%3\" height=\"%4\" fill=\"%5\" />"_s.arg(px(b.x), px(b.y), px(b.width), px(b.height),
                                                                                          b.sign > 0 ? kRaised : kLowered);
        else
            s += u"<line x1=\"%1\" y1=\"%2\" x2=\"%3\" y2=\"%2\" stroke=\"%4\" />"_s.arg(px(b.x), px(bars.zeroY + 0.5), px(b.x + b.width), kQuiet);
        if (labelled) {
            const double w = row[size_t(i)].value();
            const QStringView ink = w > 0 ? kRaised : w < 0 ? kLowered : kQuiet;
            s += u"<text x=\"%1\" y=\"%2\" text-anchor=\"middle\" fill=\"%3\">%4</text>"_s.arg(px(b.center), px(line - 4), ink,
                                                                                               esc(row[size_t(i)].display(true)));
            QString name = levels.value(i);
            const int room = std::max(2, int(bars.slot / 7.0)); // about 7 pixels a character at 11 px
            if (name.size() > room)
                name = name.left(room - 1) + u"\u2026"_s;
            s += u"<text x=\"%1\" y=\"%2\" text-anchor=\"middle\" fill=\"%3\">%4</text>"_s.arg(px(b.center), px(height - 4), kBaseline, esc(name));
        }
    }
    s += u"<line x1=\"0\" y1=\"%1\" x2=\"%2\" y2=\"%1\" stroke=\"%3\" />"_s.arg(px(bars.zeroY + 0.5)).arg(width).arg(kBaseline);
    s += u"</svg>"_s;
    return s.toUtf8();
}

StudySheet studySheet(const Study &study, const SheetOptions &o, SheetPictures mode)
{
    StudySheet out;
    const QByteArray bytes = o.fileBytes.isEmpty() ? studyToJson(study) : o.fileBytes;
    out.checksum = QString::fromLatin1(QCryptographicHash::hash(bytes, QCryptographicHash::Sha256).toHex());
    const QString title = defaultTitle(study, o);
    const QString date = o.date.isEmpty() ? QDateTime::currentDateTimeUtc().date().toString(Qt::ISODate) : o.date;

    // The analysis the sheet describes: the factor's, or the design's over its cells.
    std::optional<DesignAnalysis> da;
    if (study.isDesign())
        da = analyzeDesign(study.design);
    const Scheme &scheme = da ? da->cellScheme : study.activeScheme();
    const Analysis a = da ? da->analysis : analyze(scheme);
    const QString notes = study.isDesign() ? study.design.notes : study.activeScheme().notes;

    Writer w(mode);
    pageHead(w, u"Study sheet: "_s + title, title);
    w << u"<p class=\"meta\">Study sheet written by Contrast Bench " << QStringView(kVersion) << u" on " << esc(date) << u".</p>\n";
    if (!notes.trimmed().isEmpty()) {
        w << u"<h2>Notes</h2>\n";
        for (const QString &para : notes.split(u'\n', Qt::SkipEmptyParts))
            w << u"<p>" << esc(para) << u"</p>\n";
    }
    factorsSection(w, study);
    if (da)
        designSection(w, study, *da);
    if (!scheme.columns.empty()) {
        codingSection(w, scheme, a);
        hypothesisSection(w, a);
        healthSection(w, a);
        if (o.power)
            powerSection(w, a, *o.power);
    }
    cautionsSection(w, a);
    w << u"<h2>Record</h2>\n" << (w.forQt() ? u"<table width=\"100%\" cellspacing=\"0\">\n"_s : u"<table>\n"_s);
    w << u"<tr><th class=\"name\">date</th><td class=\"name\">" << esc(date) << u"</td></tr>\n";
    w << u"<tr><th class=\"name\">written by</th><td class=\"name\">Contrast Bench " << QStringView(kVersion) << u"</td></tr>\n";
    w << u"<tr><th class=\"name\">study file</th><td class=\"name\">"
      << (o.fileBytes.isEmpty() ? u"not saved: the checksum is of the study as Contrast Bench writes it"_s : esc(o.fileName))
      << u"</td></tr>\n";
    w << u"<tr><th class=\"name\">SHA-256 of the file</th><td class=\"name checksum\">" << out.checksum << u"</td></tr>\n";
    w << u"</table>\n<p class=\"quiet\">To check that an attached file is the one described: <span class=\"symbols\">sha256sum FILE</span> "
         "prints the same 64 hexadecimal digits.</p>\n";
    w << u"</body>\n</html>\n";
    out.html = std::move(w.html);
    out.pictures = std::move(w.pictures);
    return out;
}

StudySheet comparisonPage(const CodingComparison &c, SheetPictures mode)
{
    Writer w(mode);
    pageHead(w, u"Two codings compared"_s, u"Two codings compared"_s);
    w << u"<p class=\"meta\">First: " << esc(c.leftTitle) << u". Second: " << esc(c.rightTitle) << u".</p>\n";
    for (const QString &line : c.summary)
        w << u"<p>" << esc(line) << u"</p>\n";
    w << u"<h2>Coefficient by coefficient</h2>\n";
    tableStart(w, {u"first: "_s + c.leftTitle, u"second: "_s + c.rightTitle}, u"tt");
    for (const ComparedCoefficient &cc : c.coefficients) {
        w << u"<tr>";
        coefficientCell(w, c.left, cc.left);
        coefficientCell(w, c.right, cc.right);
        const QString state = cc.relation.kind == Correspondence::Same ? u"same"_s
                            : cc.relation.kind == Correspondence::Rescaled ? u"rescaled"_s : u"different"_s;
        w << u"</tr>\n<tr><td class=\"name\" colspan=\"2\"><span class=\"" << state << u"\">" << esc(cc.verdict) << u"</span></td></tr>\n";
    }
    w << u"</table>\n<h2>Design health</h2>\n";
    tableStart(w, {QString(), u"first"_s, u"second"_s, QString()}, u"tnnt");
    for (const HealthDifference &h : c.health)
        row(w, {h.what, h.left, h.right, h.differs ? u"differs"_s : QString()}, {}, u"tnnt");
    w << u"</table>\n</body>\n</html>\n";
    return {std::move(w.html), std::move(w.pictures), QString()};
}

} // namespace cb
