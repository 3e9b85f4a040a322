#include "ui/levels/LevelsModel.h"

#include "ui/document/Document.h"
#include "ui/common/Look.h"
#include "core/model/SchemeEdits.h"

#include <QMimeData>

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
const QString kLevelMime = u"application/x-contrast-bench-level-row"_s;
} // namespace

LevelsModel::LevelsModel(Document *document, QObject *parent)
    : DocumentTableModel(document, parent)
{
    follow();
}

DocumentTableModel::Shape LevelsModel::currentShape() const
{
    return {document()->scheme().levelCount(), ColumnCount};
}

bool LevelsModel::showsChange()
{
    const Scheme &s = document()->scheme();
    const bool same = s.factor.levels == m_shown.levels && s.factor.plannedN == m_shown.plannedN
                      && s.factor.spacing == m_shown.spacing && s.kind == m_shownKind && s.reference == m_shownReference;
    m_shown = s.factor;
    m_shownKind = s.kind;
    m_shownReference = s.reference;
    return !same;
}

QString LevelsModel::roleOf(int level) const
{
    const Scheme &s = document()->scheme();
    if (level != s.reference || s.kind == SchemeKind::Custom)
        return {};
    switch (s.kind) {
    case SchemeKind::Treatment:
    case SchemeKind::Simple:
        return tr("reference");
    case SchemeKind::Sum:
    case SchemeKind::WeightedEffect:
        return tr("base (\u22121)");
    default:
        return {};
    }
}

QVariant LevelsModel::data(const QModelIndex &index, int role) const
{
    if (!index.isValid())
        return {};
    const Factor &f = document()->scheme().factor;
    const int r = index.row();
    switch (index.column()) {
    case NameColumn:
        if (role == Qt::DisplayRole || role == Qt::EditRole)
            return f.levels[r];
        if (role == Qt::ToolTipRole)
            return tr("Level %1. Rename it here: every hypothesis text follows. Drag the row, or press Ctrl+Up / Ctrl+Down, to reorder.").arg(r + 1);
        return {};
    case SizeColumn:
        if (role == Qt::DisplayRole || role == Qt::EditRole)
            return f.hasPlannedN() ? rationalToString(f.plannedN[size_t(r)]) : u"1"_s;
        if (role == Qt::ForegroundRole && !f.hasPlannedN())
            return look::quietText();
        if (role == Qt::TextAlignmentRole)
            return QVariant::fromValue(Qt::AlignRight | Qt::AlignVCenter);
        if (role == Qt::ToolTipRole && document()->study().isDesign())
            return tr("In a design the planned sizes are set per cell, in the Design tab; this is the level's total over the "
                      "cells in participants (each counted once across the levels of the other factors measured within "
                      "participants), which the panels for this factor on its own use.");
        if (role == Qt::ToolTipRole)
            return f.hasPlannedN() ? tr("Planned group size of this level. Weighted-effect coding, the intercept's meaning and "
                                        "orthogonality \u2018under the planned n\u2019 use it.")
                                   : tr("No sizes planned: all groups count equally (shown as 1). Type a size to plan unequal groups.");
        return {};
    case PositionColumn:
        if (role == Qt::DisplayRole || role == Qt::EditRole)
            return f.positions()[size_t(r)].display(role == Qt::DisplayRole);
        if (role == Qt::ForegroundRole && f.spacing.empty())
            return look::quietText();
        if (role == Qt::TextAlignmentRole)
            return QVariant::fromValue(Qt::AlignRight | Qt::AlignVCenter);
        if (role == Qt::ToolTipRole)
            return f.spacing.empty() ? tr("Evenly spaced (1, 2, \u2026, k). Type a value, such as a dose or a temperature, for uneven spacing.")
                                     : tr("Position of this level for polynomial trends.");
        return {};
    case RoleColumn:
        if (role == Qt::DisplayRole)
            return roleOf(r);
        if (role == Qt::ForegroundRole)
            return look::quietText();
        if (role == Qt::ToolTipRole)
            return tr("The level the current standard scheme compares against. Choose it under \u2018Reference\u2019 above the grid.");
        return {};
    default:
        return {};
    }
}

QVariant LevelsModel::headerData(int section, Qt::Orientation orientation, int role) const
{
    if (orientation == Qt::Vertical)
        return role == Qt::DisplayRole ? QVariant(QString::number(section + 1)) : QVariant();
    if (role == Qt::DisplayRole) {
        switch (section) {
        case NameColumn: return tr("Level");
        case SizeColumn: return tr("Planned n");
        case PositionColumn: return tr("Position");
        case RoleColumn: return tr("Role");
        default: return {};
        }
    }
    if (role == Qt::ToolTipRole) {
        switch (section) {
        case SizeColumn: return tr("Planned group sizes. Grey: none planned (equal).");
        case PositionColumn: return tr("Numeric spacing for trends. Grey: evenly spaced.");
        default: return {};
        }
    }
    return {};
}

Qt::ItemFlags LevelsModel::flags(const QModelIndex &index) const
{
    if (!index.isValid())
        return Qt::ItemIsDropEnabled;
    Qt::ItemFlags f = Qt::ItemIsEnabled | Qt::ItemIsSelectable | Qt::ItemIsDragEnabled | Qt::ItemIsDropEnabled;
    // In a design the sizes are planned per cell (the Design tab); here they are the levels' totals.
    const bool cellSizes = index.column() == SizeColumn && document()->study().isDesign();
    if (index.column() != RoleColumn && !cellSizes)
        f |= Qt::ItemIsEditable;
    return f;
}

bool LevelsModel::commit(const Result<Scheme> &next, const QString &actionName, MergeId mergeId, const QString &mergeKey)
{
    if (!next) {
        emit editRefused(tr("Not accepted: %1").arg(next.error()));
        return false;
    }
    document()->edit(next.value(), actionName, mergeId, mergeKey);
    emit editAccepted();
    return true;
}

bool LevelsModel::setData(const QModelIndex &index, const QVariant &value, int role)
{
    if (!index.isValid() || role != Qt::EditRole)
        return false;
    const QString text = value.toString();
    if (text == data(index, Qt::EditRole).toString())
        return true;
    const Scheme &s = document()->scheme();
    const int r = index.row();
    const QString key = QString::number(r);
    switch (index.column()) {
    case NameColumn:
        if (text.trimmed() == s.factor.levels[r])
            return true;
        return commit(edits::withLevelName(s, r, text), tr("Rename level \u2018%1\u2019 to \u2018%2\u2019").arg(s.factor.levels[r], text.trimmed()),
                      MergeId::LevelName, key);
    case SizeColumn:
        return commit(edits::withPlannedSize(s, r, text), tr("Set planned n of \u2018%1\u2019 to %2").arg(s.factor.levels[r], text.trimmed()),
                      MergeId::PlannedN, key);
    case PositionColumn:
        return commit(edits::withPosition(s, r, text), tr("Set position of \u2018%1\u2019 to %2").arg(s.factor.levels[r], text.trimmed()),
                      MergeId::Spacing, key);
    default:
        return false;
    }
}

bool LevelsModel::addLevel()
{
    return commit(edits::withLevelAdded(document()->scheme()), tr("Add a level"));
}

bool LevelsModel::removeLevel(int level)
{
    const Scheme &s = document()->scheme();
    if (level < 0 || level >= s.levelCount())
        return false;
    return commit(edits::withLevelRemoved(s, level), tr("Remove level \u2018%1\u2019").arg(s.factor.levels[level]));
}

bool LevelsModel::moveLevel(int from, int to)
{
    const Scheme &s = document()->scheme();
    if (from < 0 || from >= s.levelCount() || to < 0 || to >= s.levelCount() || from == to)
        return false;
    return commit(edits::withLevelMoved(s, from, to), tr("Move level \u2018%1\u2019 to place %2").arg(s.factor.levels[from]).arg(to + 1));
}

bool LevelsModel::useEqualSizes()
{
    if (!document()->scheme().factor.hasPlannedN())
        return true;
    return commit(edits::withEqualSizes(document()->scheme()), tr("Use equal group sizes"));
}

bool LevelsModel::useDefaultPositions()
{
    if (document()->scheme().factor.spacing.empty())
        return true;
    return commit(edits::withDefaultPositions(document()->scheme()), tr("Space levels evenly"));
}

Qt::DropActions LevelsModel::supportedDropActions() const
{
    return Qt::MoveAction;
}

QStringList LevelsModel::mimeTypes() const
{
    return {kLevelMime};
}

QMimeData *LevelsModel::mimeData(const QModelIndexList &indexes) const
{
    if (indexes.isEmpty())
        return nullptr;
    auto *m = new QMimeData;
    m->setData(kLevelMime, QByteArray::number(indexes.first().row()));
    return m;
}

bool LevelsModel::dropMimeData(const QMimeData *data, Qt::DropAction action, int row, int, const QModelIndex &parent)
{
    if (!data || !data->hasFormat(kLevelMime) || action != Qt::MoveAction)
        return false;
    bool ok = false;
    const int from = data->data(kLevelMime).toInt(&ok);
    if (!ok)
        return false;
    // Dropped onto a row: take its place. Between rows: go before the row below. Below the last row: go last.
    int to = rowCount() - 1;
    if (row < 0 && parent.isValid())
        to = parent.row();
    else if (row >= 0)
        to = row > from ? row - 1 : row;
    moveLevel(from, std::clamp(to, 0, rowCount() - 1));
    // The move is done (one undo step); returning false keeps the view from also removing the source row.
    return false;
}

} // namespace cb
