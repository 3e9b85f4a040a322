#include "core/analysis/HypothesisEdit.h"

#include "core/analysis/Analysis.h"

using namespace Qt::StringLiterals;

namespace cb::edits {

Result<Scheme> withHypotheses(const Scheme &scheme, const std::vector<std::vector<Weight>> &coefficientRows)
{
    std::optional<std::vector<Weight>> interceptRow;
    std::vector<std::vector<Weight>> rows = coefficientRows;
    if (scheme.intercept && !rows.empty()) {
        interceptRow = rows.front();
        rows.erase(rows.begin());
    }
    auto columns = codingFromHypotheses(scheme.factor, rows, scheme.intercept, interceptRow);
    if (!columns)
        return Result<Scheme>::failure(columns.error());
    Scheme s = asCustom(scheme);
    std::vector<Column> cols = columns.take();
    QStringList names;
    for (size_t j = 0; j < cols.size() && j < scheme.columns.size(); ++j) {
        const Column &before = scheme.columns[j];
        names << (cols[j].name = before.name);
        cols[j].named = before.named;
        cols[j].namedFor = before.namedFor;
    }
    for (size_t j = scheme.columns.size(); j < cols.size(); ++j)
        names << (cols[j].name = freshName(names, u"comparison"_s));
    s.columns = std::move(cols);
    return Result<Scheme>(std::move(s));
}

} // namespace cb::edits
