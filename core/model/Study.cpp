#include "core/model/Study.h"

#include "core/model/SchemeEdits.h"

#include <QCoreApplication>

#include <algorithm>
#include <map>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

using R = Result<Study>;

// For each level of `next`, the level of `before` it continues: same name, else the same
// place when the count is unchanged (a rename); -1 when it is new.
std::vector<int> levelMap(const Factor &before, const Factor &next)
{
    std::vector<int> out(size_t(next.levelCount()), -1);
    for (int l = 0; l < next.levelCount(); ++l) {
        out[size_t(l)] = int(before.levels.indexOf(next.levels[l]));
        if (out[size_t(l)] < 0 && before.levelCount() == next.levelCount())
            out[size_t(l)] = l;
    }
    return out;
}

// The intercept and the notes belong to the design; every factor shows them, so the
// one-factor panels (intercept box, notes) read and edit them.
void syncShared(Design &d)
{
    for (Scheme &s : d.factors) {
        s.intercept = d.intercept;
        s.notes = d.notes;
    }
}

QString factorName(const Design &d, int f)
{
    return d.factors[size_t(f)].factor.name;
}

} // namespace

Study consistent(Study study)
{
    Design &d = study.design;
    if (study.isDesign()) {
        syncShared(d);
        for (size_t f = 0; f < d.factors.size(); ++f) {
            Scheme &s = d.factors[f];
            std::vector<Rational> totals;
            if (!d.cellN.empty() && d.cellN.size() == size_t(d.cellCount())) {
                // Planned n counts participants: the same participants fill every cell of the
                // within factors other than this one, so a level's total over the cells counts
                // each of them that many times (1 when no other factor is within participants).
                // The proportions, and with them every weighting by n, do not change.
                int repeats = 1;
                for (size_t g = 0; g < d.factors.size(); ++g)
                    if (g != f && d.factors[g].factor.isWithin())
                        repeats *= d.factors[g].levelCount();
                totals.assign(size_t(s.levelCount()), Rational(0));
                for (int c = 0; c < d.cellCount(); ++c)
                    totals[size_t(cellLevels(d, c)[f])] += d.cellN[size_t(c)];
                for (Rational &t : totals)
                    t /= repeats;
                // Equal totals stay written out too: the levels panel shows what the cell table implies.
                if (!std::all_of(totals.begin(), totals.end(), [](const Rational &n) { return n > 0; }))
                    totals.clear();
            }
            if (totals == s.factor.plannedN)
                continue;
            if (auto next = edits::withSizes(s, std::move(totals)))
                s = next.take();
        }
    }
    study.power = prunedPlan(std::move(study.power), study.powerLevelNames());
    return study;
}

Study withPowerPlan(Study study, PowerPlan plan)
{
    study.power = std::move(plan);
    return consistent(std::move(study));
}

Study studyOf(Scheme scheme)
{
    Study s;
    s.design.intercept = scheme.intercept;
    s.design.notes = scheme.notes;
    s.design.factors.push_back(std::move(scheme));
    return s;
}

Study withActiveScheme(const Study &study, Scheme next)
{
    Study out = study;
    Design &d = out.design;
    const Scheme before = d.factors[size_t(study.active)];
    if (!out.isDesign()) {
        d.factors[0] = std::move(next);
        d.intercept = d.factors[0].intercept;
        d.notes = d.factors[0].notes;
        return out;
    }
    d.factors[size_t(study.active)] = std::move(next);
    const Scheme &edited = d.factors[size_t(study.active)];
    if (edited.intercept != d.intercept || edited.notes != d.notes) {
        d.intercept = edited.intercept;
        d.notes = edited.notes;
        syncShared(d);
    }
    if (study.design.cellN.empty() || before.factor.levels == d.factors[size_t(study.active)].factor.levels)
        return out;
    const std::vector<int> map = levelMap(before.factor, d.factors[size_t(study.active)].factor);
    if (std::find(map.begin(), map.end(), -1) != map.end()) {
        d.cellN.clear();
        out.cellSizeNote = QCoreApplication::translate("cb::Study", "Cell sizes went back to equal: %1 has a new level whose cells have no planned n yet.")
                               .arg(factorName(d, study.active));
        return out;
    }
    std::vector<Rational> n(size_t(d.cellCount()));
    for (int c = 0; c < d.cellCount(); ++c) {
        std::vector<int> lv = cellLevels(d, c);
        lv[size_t(study.active)] = map[size_t(lv[size_t(study.active)])];
        n[size_t(c)] = study.design.cellN[size_t(cellIndex(study.design, lv))];
    }
    d.cellN = std::move(n);
    return out;
}

Result<Study> withFactorAdded(const Study &study)
{
    if (study.factorCount() >= kMaxDesignFactors)
        return R::failure(QCoreApplication::translate("cb::Study", "Not added: a design crosses at most %1 factors.").arg(kMaxDesignFactors));
    if (study.design.cellCount() * 2 > kMaxCells)
        return R::failure(QCoreApplication::translate("cb::Study", "Not added: the design would have %1 cells; at most %2 are supported.")
                              .arg(study.design.cellCount() * 2)
                              .arg(kMaxCells));
    Study out = study;
    Design &d = out.design;
    if (!study.isDesign()) {
        d.intercept = d.factors[0].intercept;
        d.notes = d.factors[0].notes;
    }
    // A two-level starter coded +1/2 and -1/2 (centred: its main effect averages over the others).
    Scheme s;
    s.kind = SchemeKind::Custom;
    s.factor.name = u"factor %1"_s.arg(QChar(u'A' + study.factorCount()));
    for (int i = 1; d.factors.end() != std::find_if(d.factors.begin(), d.factors.end(), [&](const Scheme &x) { return x.factor.name == s.factor.name; }); ++i)
        s.factor.name = u"factor %1%2"_s.arg(QChar(u'A' + study.factorCount())).arg(i);
    const QString prefix = QString(QChar(u'a' + study.factorCount()));
    s.factor.levels = {prefix + u"1"_s, prefix + u"2"_s};
    s.columns.push_back(Column{u"%1 vs %2"_s.arg(s.factor.levels[0], s.factor.levels[1]),
                               {Weight::exact(Rational(1, 2)), Weight::exact(Rational(-1, 2))}});
    d.factors.push_back(std::move(s));
    syncShared(d);
    d.terms = Design::fullFactorial(out.factorCount());
    // Each cell of the new factor gets the planned n of the cell (or, coming from one factor,
    // the level) it splits, so the sizes keep their proportions.
    const std::vector<Rational> before = study.isDesign() ? study.design.cellN : study.design.factors[0].factor.plannedN;
    if (!before.empty()) {
        std::vector<Rational> n;
        for (const Rational &r : before)
            for (int l = 0; l < 2; ++l)
                n.push_back(r);
        d.cellN = std::move(n);
    }
    out.active = out.factorCount() - 1;
    return R(std::move(out));
}

namespace {

// The terms that remain when a factor leaves a design: those without it, renumbered. "A within B"
// loses B and becomes A's main effect (within a factor that is gone, A's contrasts are simply
// A's). When nothing remains, the full factorial of the factors left.
std::vector<Term> termsWithoutFactor(const std::vector<Term> &terms, int factor, int factorsLeft)
{
    const auto renumber = [factor](int f) { return f > factor ? f - 1 : f; };
    std::vector<Term> kept;
    for (const Term &t : terms) {
        if (std::find(t.factors.begin(), t.factors.end(), factor) != t.factors.end())
            continue;
        Term next;
        for (int f : t.factors)
            next.factors.push_back(renumber(f));
        next.within = t.within == factor || t.within < 0 ? -1 : renumber(t.within);
        if (std::none_of(kept.begin(), kept.end(), [&](const Term &k) { return sameTerm(k, next); }))
            kept.push_back(std::move(next));
    }
    if (kept.empty())
        return Design::fullFactorial(factorsLeft);
    // In the order the term list shows them.
    std::vector<Term> ordered;
    for (const Term &t : candidateTerms(factorsLeft))
        if (std::any_of(kept.begin(), kept.end(), [&](const Term &k) { return sameTerm(k, t); }))
            ordered.push_back(t);
    return ordered;
}

} // namespace

Result<Study> withFactorRemoved(const Study &study, int factor)
{
    if (!study.isDesign())
        return R::failure(QCoreApplication::translate("cb::Study", "Not removed: the study needs at least one factor."));
    if (factor < 0 || factor >= study.factorCount())
        return R::failure(QCoreApplication::translate("cb::Study", "Not removed: choose a factor first."));
    Study out = study;
    Design &d = out.design;
    // Cell sizes of the factors that remain: summed over the removed factor's levels.
    if (!d.cellN.empty()) {
        Design rest = d;
        rest.factors.erase(rest.factors.begin() + factor);
        std::vector<Rational> n(size_t(rest.cellCount()), Rational(0));
        for (int c = 0; c < d.cellCount(); ++c) {
            std::vector<int> lv = cellLevels(d, c);
            lv.erase(lv.begin() + factor);
            n[size_t(cellIndex(rest, lv))] += d.cellN[size_t(c)];
        }
        d.cellN = std::move(n);
    }
    d.factors.erase(d.factors.begin() + factor);
    out.active = std::min(study.active > factor ? study.active - 1 : study.active, out.factorCount() - 1);
    if (!out.isDesign()) {
        d.factors[0].intercept = d.intercept;
        d.factors[0].notes = d.notes;
        if (!d.cellN.empty() && std::all_of(d.cellN.begin(), d.cellN.end(), [](const Rational &r) { return r > 0; }))
            d.factors[0].factor.plannedN = d.cellN;
        d.terms.clear();
        d.cellN.clear();
    } else {
        d.terms = termsWithoutFactor(study.design.terms, factor, out.factorCount());
    }
    out.cellSizeNote.clear();
    return R(std::move(out));
}

Result<Study> withActiveFactor(const Study &study, int factor)
{
    if (factor < 0 || factor >= study.factorCount())
        return R::failure(QCoreApplication::translate("cb::Study", "No factor %1.").arg(factor + 1));
    Study out = study;
    out.active = factor;
    return R(std::move(out));
}

bool sameTerm(const Term &a, const Term &b)
{
    return a.factors == b.factors && a.within == b.within;
}

std::vector<Term> candidateTerms(int factorCount)
{
    std::vector<Term> out = Design::fullFactorial(factorCount);
    for (int a = 0; a < factorCount; ++a)
        for (int b = 0; b < factorCount; ++b)
            if (a != b)
                out.push_back(Term{{a}, b});
    return out;
}

Result<Study> withTerm(const Study &study, const Term &term, bool included)
{
    if (!study.isDesign())
        return R::failure(QCoreApplication::translate("cb::Study", "Terms belong to designs of two or more factors."));
    Study out = study;
    std::vector<Term> &terms = out.design.terms;
    auto has = [&](const Term &t) { return std::any_of(terms.begin(), terms.end(), [&](const Term &x) { return sameTerm(x, t); }); };
    if (included == has(term))
        return R(std::move(out));
    if (!included && terms.size() == 1)
        return R::failure(QCoreApplication::translate("cb::Study", "Not left out: a design needs at least one term."));
    std::vector<Term> next;
    for (const Term &t : candidateTerms(study.factorCount()))
        if (sameTerm(t, term) ? included : has(t))
            next.push_back(t);
    terms = std::move(next);
    return R(std::move(out));
}

Study withEqualCellSizes(const Study &study)
{
    Study out = study;
    out.design.cellN.clear();
    out.cellSizeNote.clear();
    return out;
}

Result<Study> withCellSize(const Study &study, int cell, const QString &text)
{
    if (!study.isDesign() || cell < 0 || cell >= study.design.cellCount())
        return R::failure(QCoreApplication::translate("cb::Study", "No such cell."));
    const QString cellName = study.design.cellNames()[cell];
    auto w = parseWeight(text.trimmed());
    if (!w || !w->isExact() || w->rational() < 0)
        return R::failure(QCoreApplication::translate("cb::Study", "Cell %1: '%2' is not a planned size; type 0 (an empty cell) or more, such as 12.")
                              .arg(cellName, text));
    Study out = study;
    if (out.design.cellN.empty())
        out.design.cellN.assign(size_t(out.design.cellCount()), Rational(1));
    out.design.cellN[size_t(cell)] = w->rational();
    out.cellSizeNote.clear();
    return R(std::move(out));
}

} // namespace cb
