#include "ui/coding/HypothesisModel.h"

#include "core/analysis/HypothesisEdit.h"
#include "core/base/NumberText.h"
#include "ui/common/ColumnStatus.h"
#include "ui/document/Document.h"
#include "ui/common/Look.h"

using namespace Qt::StringLiterals;

namespace cb {

HypothesisModel::HypothesisModel(Document *document, QObject *parent)
    : WeightTableModel(document, parent)
{
    follow();
}

DocumentTableModel::Shape HypothesisModel::currentShape() const
{
    const Analysis &a = document()->analysis();
    return {a.levelCount, draftIsCurrent() ? int(m_draft->size()) : a.coefficientCount};
}

bool HypothesisModel::draftIsCurrent() const
{
    return m_draft && m_draftRevision == document()->codingRevision();
}

void HypothesisModel::aboutToFollow()
{
    // Any change of the document (our own commit, an undo, a level edit) ends a draft.
    if (m_draft && !draftIsCurrent()) {
        m_draft.reset();
        m_draftColumns.clear();
        m_draftProblem.clear();
        emit draftChanged({});
    }
}

void HypothesisModel::discardDraft()
{
    if (!m_draft)
        return;
    m_draftRevision = document()->codingRevision() + 1; // no longer current
    follow();
}

bool HypothesisModel::addComparison()
{
    const auto *current = rows();
    const Analysis &a = document()->analysis();
    if (!current) {
        emit editRefused(tr("Not added: the coding is rank deficient, so there are no hypotheses to add to. Fix the coding first."));
        return false;
    }
    if (int(current->size()) >= a.levelCount) {
        emit editRefused(tr("Not added: %1 levels allow at most %2 comparisons beside the intercept.")
                             .arg(a.levelCount).arg(a.intercept ? a.levelCount - 1 : a.levelCount));
        return false;
    }
    std::vector<std::vector<Weight>> next = *current;
    next.emplace_back(size_t(a.levelCount), Weight(0));
    QSet<int> touched = m_draft ? m_draftColumns : QSet<int>();
    touched.insert(int(next.size()) - 1);
    m_draft = std::move(next);
    m_draftRevision = document()->codingRevision();
    m_draftColumns = touched;
    m_draftProblem = tr("the new comparison has no weights yet; type weights on the level means that sum to 0");
    follow();
    emit draftChanged(m_draftProblem);
    return true;
}

const std::vector<std::vector<Weight>> *HypothesisModel::rows() const
{
    if (draftIsCurrent())
        return &*m_draft;
    const auto &h = document()->analysis().hypotheses;
    return h.empty() ? nullptr : &h;
}

int HypothesisModel::weightRowCount() const
{
    return document()->analysis().levelCount;
}

std::optional<Weight> HypothesisModel::weightAt(int row, int column) const
{
    const auto *r = rows();
    if (!r || column < 0 || size_t(column) >= r->size() || row < 0 || size_t(row) >= (*r)[size_t(column)].size())
        return std::nullopt;
    return (*r)[size_t(column)][size_t(row)];
}

QString HypothesisModel::coefficientLabel(int column) const
{
    const Analysis &a = document()->analysis();
    if (column >= a.coefficientNames.size() && column < columnCount())
        return cb::coefficientLabel(a.intercept, column, tr("new comparison"));
    if (column < 0 || column >= a.coefficientNames.size())
        return {};
    return cb::coefficientLabel(a.intercept, column, a.coefficientNames[column]);
}

QString HypothesisModel::cellName(int row, int column) const
{
    return tr("level \u2018%1\u2019 in hypothesis %2").arg(document()->analysis().levels.value(row), coefficientLabel(column));
}

bool HypothesisModel::applyWeights(const std::vector<edits::CellWeight> &cells, const QString &actionName, const QString &mergeKey)
{
    const auto *current = rows();
    if (!current)
        return false;
    std::vector<std::vector<Weight>> next = *current;
    QSet<int> touched = m_draft ? m_draftColumns : QSet<int>();
    for (const edits::CellWeight &c : cells) {
        next[size_t(c.column)][size_t(c.level)] = c.weight;
        touched.insert(c.column);
    }
    Document *d = document();
    auto coded = edits::withHypotheses(d->scheme(), next);
    if (!coded) {
        m_draft = std::move(next);
        m_draftRevision = d->codingRevision();
        m_draftColumns = touched;
        m_draftProblem = coded.error();
        follow();
        emit draftChanged(m_draftProblem);
        return true;
    }
    d->edit(coded.take(), actionName, mergeKey.isEmpty() ? MergeId::None : MergeId::HypothesisWeight, mergeKey);
    return true;
}

Qt::ItemFlags HypothesisModel::flags(const QModelIndex &index) const
{
    return weightFlags(index);
}

QVariant HypothesisModel::data(const QModelIndex &index, int role) const
{
    if (!index.isValid())
        return {};
    const auto w = weightAt(index.row(), index.column());
    const bool pending = draftIsCurrent() && m_draftColumns.contains(index.column());
    switch (role) {
    case Qt::DisplayRole:
        return w ? formatWeight(*w) : kMissingMark.toString();
    case Qt::EditRole:
        return w ? editableWeight(*w, true) : QString();
    case Qt::TextAlignmentRole:
        return QVariant::fromValue(Qt::AlignCenter);
    case Qt::BackgroundRole:
        return pending ? QVariant(look::tint(look::State::Problem)) : QVariant();
    case Qt::ToolTipRole:
        if (!w)
            return tr("No hypotheses: the coding is rank deficient, so its coefficients are not identifiable. Fix the coding first.");
        if (pending)
            return tr("Typed but not applied yet: %1").arg(m_draftProblem);
        return tr("Weight of \u2018%1\u2019 in what %2 tests: %3. Type another weight to get the coding that tests it.")
            .arg(document()->analysis().levels.value(index.row()), coefficientLabel(index.column()), formatWeight(*w));
    default:
        return {};
    }
}

QVariant HypothesisModel::headerData(int section, Qt::Orientation orientation, int role) const
{
    const Analysis &a = document()->analysis();
    if (orientation == Qt::Vertical) {
        if (role == Qt::DisplayRole && section >= 0 && section < a.levels.size())
            return a.levels[section];
        return {};
    }
    if (section < 0 || section >= columnCount())
        return {};
    const bool pending = draftIsCurrent() && m_draftColumns.contains(section);
    switch (role) {
    case Qt::DisplayRole:
        return look::twoLines(pending ? look::mark(look::State::Problem) + u" "_s + coefficientLabel(section) : coefficientLabel(section));
    case Qt::ForegroundRole:
        return pending ? QVariant(look::ink(look::State::Problem)) : QVariant();
    case Qt::ToolTipRole:
        if (pending)
            return tr("Not applied yet: %1").arg(m_draftProblem);
        if (section < a.hypothesisSymbols.size())
            return a.hypothesisSymbols[section] + u"\n"_s + a.hypothesisWords[section];
        return {};
    default:
        return {};
    }
}

} // namespace cb
