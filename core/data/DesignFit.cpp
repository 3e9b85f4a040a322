#include "core/data/DesignFit.h"

#include "core/model/Design.h"

using namespace Qt::StringLiterals;

namespace cb {

Result<DesignFit> fitDesign(const Design &d, const DataSummary &data, const FitOptions &options, const LevelMapping &mapping)
{
    using R = Result<DesignFit>;
    if (QString e = d.validate(); !e.isEmpty())
        return R::failure(u"the design cannot be fitted: "_s + e);
    const QStringList cells = d.cellNames();
    std::vector<double> observed(size_t(cells.size()), 0.0);
    for (const LevelStats &l : data.levels) {
        const qsizetype c = cells.indexOf(mapping.value(l.name, l.name));
        if (c < 0) // a cell the design does not have: the level matching names it (and the cells without data)
            if (auto matched = matchLevels(cells, data, mapping); !matched)
                return R::failure(matched.error());
        if (c >= 0)
            observed[size_t(c)] += l.stats.n;
    }
    bool anyAbsent = false;
    for (double n : observed)
        anyAbsent = anyAbsent || !(n > 0.0);
    Design fitted = d;
    if (anyAbsent) {
        fitted.cellN.clear();
        for (double n : observed)
            fitted.cellN.push_back(n > 0.0 ? Rational(n) : Rational(0));
    } else {
        fitted.cellN = filledCellN(d);
    }
    DesignFit out;
    out.design = analyzeDesign(fitted, u"no rows in the data"_s);
    if (!out.design.empty.estimable)
        return R::failure(out.design.empty.refusal);
    if (out.design.refused() || out.design.cellScheme.columns.empty())
        return R::failure(u"the design cannot be fitted: %1"_s.arg(
            out.design.analysis.findings.empty() ? u"it has no cells"_s : out.design.analysis.findings.front().message));
    auto fit = fitScheme(out.design.cellScheme, data, options, mapping);
    if (!fit)
        return R::failure(fit.error());
    out.fit = fit.take();
    if (data.participantIndex < 0) {
        QStringList within;
        for (const Scheme &f : d.factors)
            if (f.factor.isWithin())
                within << f.factor.name;
        if (!within.isEmpty())
            out.fit.cautions << independentRowsCaution(within);
    }
    if (anyAbsent) {
        QStringList notes{out.design.empty.summary};
        for (const HypothesisShift &s : out.design.empty.shifts)
            notes << s.words;
        out.fit.notes = notes + out.fit.notes;
    }
    return out;
}

} // namespace cb
