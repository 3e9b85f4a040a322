#include "core/analysis/Compare.h"

#include "core/analysis/Settled.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/base/NumberText.h"

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// Floating rows are proportional when every weight agrees within this share of the largest.
constexpr double kRelativeTolerance = 1e-9;

bool allExact(const std::vector<Weight> &row)
{
    return std::all_of(row.begin(), row.end(), [](const Weight &w) { return w.isExact(); });
}

RowRelation relation(Correspondence kind, Weight factor)
{
    return {kind, std::move(factor)};
}

RowRelation relateExact(const std::vector<Weight> &l, const std::vector<Weight> &r)
{
    const auto pivot = std::find_if(l.begin(), l.end(), [](const Weight &w) { return !w.isZero(); });
    if (pivot == l.end()) // a zero row is proportional only to a zero row
        return std::all_of(r.begin(), r.end(), [](const Weight &w) { return w.isZero(); })
                   ? relation(Correspondence::Same, Weight(1)) : RowRelation{};
    const size_t i = size_t(pivot - l.begin());
    const Rational factor = r[i].rational() / l[i].rational();
    for (size_t j = 0; j < l.size(); ++j)
        if (r[j].rational() != factor * l[j].rational())
            return {};
    if (factor == 0)
        return {};
    return relation(factor == 1 ? Correspondence::Same : Correspondence::Rescaled, Weight::exact(factor));
}

RowRelation relateFloating(const std::vector<Weight> &l, const std::vector<Weight> &r)
{
    size_t pivot = 0;
    double largestLeft = 0.0, largestRight = 0.0;
    for (size_t j = 0; j < l.size(); ++j) {
        if (std::abs(l[j].value()) > largestLeft) {
            largestLeft = std::abs(l[j].value());
            pivot = j;
        }
        largestRight = std::max(largestRight, std::abs(r[j].value()));
    }
    if (largestLeft == 0.0 || largestRight == 0.0)
        return largestLeft == largestRight ? relation(Correspondence::Same, Weight(1)) : RowRelation{};
    const double factor = r[pivot].value() / l[pivot].value();
    for (size_t j = 0; j < l.size(); ++j)
        if (!(std::abs(r[j].value() - factor * l[j].value()) <= kRelativeTolerance * largestRight))
            return {};
    if (std::abs(factor - 1.0) <= kRelativeTolerance)
        return relation(Correspondence::Same, Weight(1));
    // A factor that is a simple fraction is shown as one (-1/2, not -0.5 or -0.499999...).
    if (const auto q = recogniseFraction(factor))
        return relation(Correspondence::Rescaled, Weight::exact(*q));
    return relation(Correspondence::Rescaled, Weight::approx(factor));
}

bool proportional(const RowRelation &r)
{
    return r.kind == Correspondence::Same || r.kind == Correspondence::Rescaled;
}

// "b1 b vs a" or "no coefficient".
QString label(const Analysis &a, int index)
{
    return index < 0 ? u"no coefficient"_s : coefficientLabel(a.intercept, index, a.coefficientNames[index]);
}

int orthogonalPairs(const SquareTable<bool> &t)
{
    int count = 0;
    for (int i = 0; i < t.size(); ++i)
        for (int j = i + 1; j < t.size(); ++j)
            count += t(i, j) ? 1 : 0;
    return count;
}

QString pairsText(const Analysis &a, const SquareTable<bool> &t)
{
    const int m = a.columnCount;
    return u"%1 of %2"_s.arg(orthogonalPairs(t)).arg(m * (m - 1) / 2);
}

QString vifText(const Analysis &a)
{
    QStringList out;
    for (const auto &v : a.vif)
        out << numberText(v);
    return out.join(u", "_s);
}

int findingCount(const Analysis &a, Finding::Severity severity)
{
    return int(std::count_if(a.findings.begin(), a.findings.end(), [&](const Finding &f) { return f.severity == severity; }));
}

QString sizesText(const Scheme &s)
{
    if (!s.factor.hasPlannedN())
        return u"equal"_s;
    QStringList n;
    for (const Rational &q : s.factor.plannedN)
        n << rationalToString(q);
    return n.join(u", "_s);
}

std::vector<HealthDifference> healthDifferences(const Scheme &ls, const Analysis &l, const Scheme &rs, const Analysis &r)
{
    std::vector<HealthDifference> out;
    auto add = [&](const QString &what, const QString &left, const QString &right) {
        out.push_back({what, left, right, left != right});
    };
    add(u"planned n"_s, sizesText(ls), sizesText(rs));
    add(u"rank"_s, u"%1 of %2"_s.arg(l.rank).arg(l.coefficientCount), u"%1 of %2"_s.arg(r.rank).arg(r.coefficientCount));
    add(u"column pairs orthogonal as written"_s, pairsText(l, l.orthogonal), pairsText(r, r.orthogonal));
    add(u"column pairs orthogonal under the planned n"_s, pairsText(l, l.orthogonalInDesign), pairsText(r, r.orthogonalInDesign));
    add(u"condition number"_s, numberText(l.conditionNumber), numberText(r.conditionNumber));
    add(u"VIF per column"_s, vifText(l), vifText(r));
    add(u"hypotheses depend on the planned n"_s, l.dependsOnSizes ? u"yes"_s : u"no"_s, r.dependsOnSizes ? u"yes"_s : u"no"_s);
    add(u"cautions and problems"_s, QString::number(findingCount(l, Finding::Severity::Caution) + findingCount(l, Finding::Severity::Problem)),
        QString::number(findingCount(r, Finding::Severity::Caution) + findingCount(r, Finding::Severity::Problem)));
    return out;
}

QString verdict(const CodingComparison &c, const ComparedCoefficient &cc)
{
    const Analysis &l = c.left;
    const Analysis &r = c.right;
    if (cc.relation.kind == Correspondence::Unavailable) {
        if (cc.left < 0)
            return u"Only the second coding (%1) has %2."_s.arg(c.rightTitle, label(r, cc.right));
        if (cc.right < 0)
            return u"Only the first coding (%1) has %2."_s.arg(c.leftTitle, label(l, cc.left));
        return u"Not identifiable: a coding is rank deficient, so this coefficient tests nothing."_s;
    }
    const QString &lw = l.hypothesisWords[cc.left];
    const QString &rw = r.hypothesisWords[cc.right];
    QString out;
    switch (cc.relation.kind) {
    case Correspondence::Same:
        out = u"Same hypothesis: both estimate %1."_s.arg(lw);
        break;
    case Correspondence::Rescaled: {
        const QString f = cc.relation.factor->display(true);
        out = u"Rescaled: the second estimates %1 \u00d7 the first (%2). The null hypothesis and its t and p are the same; the estimate and its standard error are multiplied by %1."_s
                  .arg(f, rw);
        break;
    }
    default:
        out = u"Different: the first estimates %1; the second estimates %2."_s.arg(lw, rw);
        break;
    }
    if (cc.alsoRight >= 0)
        out += cc.alsoRelation.kind == Correspondence::Same
                   ? u" The second coding's %1 tests the same hypothesis."_s.arg(label(r, cc.alsoRight))
                   : u" The second coding's %1 tests it rescaled by %2."_s.arg(label(r, cc.alsoRight), cc.alsoRelation.factor->display(true));
    return out;
}

QStringList summaryLines(const CodingComparison &c)
{
    QStringList out;
    const bool bothIntercepts = c.left.intercept && c.right.intercept;
    if (bothIntercepts && !c.coefficients.empty()) {
        const ComparedCoefficient &i = c.coefficients.front();
        if (i.relation.kind == Correspondence::Same)
            out << u"The intercept keeps its meaning: under both codings it is %1."_s.arg(c.interceptLeft);
        else if (i.relation.kind != Correspondence::Unavailable)
            out << u"The intercept changes meaning: under %1 it is %2; under %3 it is %4."_s.arg(c.leftTitle, c.interceptLeft,
                                                                                              c.rightTitle, c.interceptRight);
    } else if (c.left.intercept != c.right.intercept) {
        out << u"Only %1 has an intercept."_s.arg(c.left.intercept ? c.leftTitle : c.rightTitle);
    }
    int same = 0, rescaled = 0, different = 0, other = 0;
    for (const ComparedCoefficient &cc : c.coefficients) {
        if (cc.left == 0 && c.left.intercept)
            continue; // the intercept is described above
        switch (cc.relation.kind) {
        case Correspondence::Same: ++same; break;
        case Correspondence::Rescaled: ++rescaled; break;
        case Correspondence::Different: ++different; break;
        case Correspondence::Unavailable: ++other; break;
        }
    }
    out << u"Of the other coefficients, %1 test the same hypothesis, %2 a rescaled one and %3 something different%4."_s
               .arg(same).arg(rescaled).arg(different)
               .arg(other > 0 ? u"; %1 have no counterpart or are not identifiable"_s.arg(other) : QString());
    QStringList changed;
    for (const HealthDifference &h : c.health)
        if (h.differs)
            changed << h.what;
    out << (changed.isEmpty() ? u"The design health is the same under both."_s
                              : u"The design health differs in: %1."_s.arg(changed.join(u", "_s)));
    return out;
}

// The sentences, once the titles are known.
void describe(CodingComparison &c)
{
    for (ComparedCoefficient &cc : c.coefficients)
        cc.verdict = verdict(c, cc);
    c.summary = summaryLines(c);
}

} // namespace

RowRelation relateRows(const std::vector<Weight> &left, const std::vector<Weight> &right)
{
    if (left.size() != right.size() || left.empty())
        return {};
    return allExact(left) && allExact(right) ? relateExact(left, right) : relateFloating(left, right);
}

QString codingTitle(const Scheme &s)
{
    QString t = schemeTitle(s.kind);
    if (schemeUsesReference(s.kind) && s.reference >= 0 && s.reference < s.levelCount())
        t += (s.kind == SchemeKind::Sum || s.kind == SchemeKind::WeightedEffect ? u", base level "_s : u", reference "_s)
             + s.factor.levels[s.reference];
    if (s.kind == SchemeKind::Polynomial && s.factor.spacing.empty())
        t += u", equal spacing"_s;
    else if (s.kind == SchemeKind::Polynomial) {
        QStringList x;
        for (const Weight &w : s.factor.spacing)
            x << w.display();
        t += u", spacing "_s + x.join(u", "_s);
    }
    return t;
}

Result<CodingComparison> compareCodings(const Scheme &ls, const Analysis &l, const Scheme &rs, const Analysis &r)
{
    if (l.levels != r.levels)
        return Result<CodingComparison>::failure(u"the two codings must have the same levels in the same order: %1 and %2"_s
                                                     .arg(quoted(l.levels.join(u", "_s)), quoted(r.levels.join(u", "_s))));
    CodingComparison c;
    c.leftTitle = codingTitle(ls);
    c.rightTitle = codingTitle(rs);
    c.left = l;
    c.right = r;
    c.interceptLeft = l.intercept && !l.hypothesisWords.isEmpty() ? l.hypothesisWords.front() : QString();
    c.interceptRight = r.intercept && !r.hypothesisWords.isEmpty() ? r.hypothesisWords.front() : QString();

    // Places: the intercepts pair with each other, then the coding columns in order.
    const int li = l.intercept ? 1 : 0;
    const int ri = r.intercept ? 1 : 0;
    if (li || ri)
        c.coefficients.push_back({li ? 0 : -1, ri ? 0 : -1, {}, -1, {}, {}});
    for (int j = 0; j < std::max(l.columnCount, r.columnCount); ++j)
        c.coefficients.push_back({j < l.columnCount ? j + li : -1, j < r.columnCount ? j + ri : -1, {}, -1, {}, {}});

    const bool bothTestable = !l.hypotheses.empty() && !r.hypotheses.empty();
    for (ComparedCoefficient &cc : c.coefficients) {
        if (cc.left < 0 || cc.right < 0 || !bothTestable) {
            cc.relation.kind = Correspondence::Unavailable;
        } else {
            cc.relation = relateRows(l.hypotheses[size_t(cc.left)], r.hypotheses[size_t(cc.right)]);
        }
        // A coefficient of the first coding may be tested in another place by the second.
        if (bothTestable && cc.left >= 0 && !proportional(cc.relation))
            for (int k = 0; k < r.coefficientCount; ++k) {
                if (k == cc.right || (r.intercept && k == 0) != (l.intercept && cc.left == 0))
                    continue;
                const RowRelation other = relateRows(l.hypotheses[size_t(cc.left)], r.hypotheses[size_t(k)]);
                if (proportional(other)) {
                    cc.alsoRight = k;
                    cc.alsoRelation = other;
                    break;
                }
            }
    }
    c.health = healthDifferences(ls, l, rs, r);
    describe(c);
    return c;
}

Result<CodingComparison> compareCodings(const Scheme &left, const Scheme &right)
{
    return compareCodings(left, analyze(left), right, analyze(right));
}

namespace {

struct Side
{
    Scheme scheme;
    Analysis analysis;
    QString title;
};

Result<Side> studySide(const Study &study)
{
    const Scheme &active = study.activeScheme();
    if (!study.isDesign())
        return Side{active, analyze(active), codingTitle(active)};
    DesignAnalysis da = analyzeDesign(study.design);
    if (da.cellScheme.columns.empty())
        return Result<Side>::failure(da.analysis.findings.empty() ? u"the design has no coding columns"_s
                                                                  : da.analysis.findings.front().message);
    return Side{da.cellScheme, std::move(da.analysis), active.factor.name + u": "_s + codingTitle(active)};
}

} // namespace

Result<CodingComparison> compareStudies(const Study &left, const Study &right)
{
    auto l = studySide(left);
    if (!l)
        return Result<CodingComparison>::failure(l.error());
    auto r = studySide(right);
    if (!r)
        return Result<CodingComparison>::failure(r.error());
    auto c = compareCodings(l->scheme, l->analysis, r->scheme, r->analysis);
    if (c) {
        c.value().leftTitle = l->title;
        c.value().rightTitle = r->title;
        c.value().overCells = left.isDesign();
        describe(c.value());
    }
    return c;
}

Result<Study> recodedStudy(const Study &study, SchemeKind kind, const SchemeOptions &options,
                           const std::optional<std::vector<Weight>> &spacing)
{
    Factor f = study.activeScheme().factor;
    if (spacing)
        f.spacing = *spacing;
    auto made = makeScheme(f, kind, options);
    if (!made)
        return Result<Study>::failure(made.error());
    Scheme s = made.take();
    s.intercept = study.activeScheme().intercept;
    s.notes = study.activeScheme().notes;
    return Result<Study>(settled(withActiveScheme(study, std::move(s))));
}

} // namespace cb
