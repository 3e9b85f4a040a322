#include "ui/coding/CodingModel.h"

#include "core/analysis/ColumnNames.h"
#include "core/base/NumberText.h"
#include "ui/document/Document.h"

#include <QFont>

using namespace Qt::StringLiterals;

namespace cb {

CodingModel::CodingModel(Document *document, QObject *parent)
    : WeightTableModel(document, parent)
{
    follow();
}

DocumentTableModel::Shape CodingModel::currentShape() const
{
    const Scheme &s = document()->scheme();
    return {s.levelCount() + FooterRowCount, s.columnCount()};
}

void CodingModel::aboutToFollow()
{
    m_shownStatus = std::move(m_status);
    m_status = columnStatuses(document()->analysis(), document()->scheme().factor.hasPlannedN());
    m_shownWeights = std::move(m_weights);
    m_weights.clear();
    for (const Column &c : document()->scheme().columns)
        m_weights.push_back(c.weights);
}

// A level's cell shows its weight on the tint of its column's status; a footer cell one text
// of the status in its colours.
bool CodingModel::cellChanged(int row, int column) const
{
    const size_t c = size_t(column);
    const ColumnStatus *now = status(column);
    const ColumnStatus *before = c < m_shownStatus.size() ? &m_shownStatus[c] : nullptr;
    if (const int f = footerRow(row); f >= 0) {
        if (!now || !before)
            return now || before; // without a status the cell shows a dash
        switch (f) {
        case SumRow: return now->sum != before->sum || now->sumText != before->sumText;
        case OrthogonalityRow: return now->orthogonality != before->orthogonality || now->orthogonalityText != before->orthogonalityText;
        default: return now->vif != before->vif || now->vifText != before->vifText;
        }
    }
    auto tint = [](const ColumnStatus *s) { return s ? s->overall() : look::State::Neutral; };
    const size_t r = size_t(row);
    if (c >= m_shownWeights.size() || r >= m_shownWeights[c].size() || c >= m_weights.size() || r >= m_weights[c].size())
        return true;
    return tint(now) != tint(before) || m_weights[c][r] != m_shownWeights[c][r];
}

int CodingModel::weightRowCount() const
{
    return document()->scheme().levelCount();
}

int CodingModel::footerRow(int row) const
{
    const int f = row - weightRowCount();
    return f >= 0 && f < FooterRowCount ? f : -1;
}

const ColumnStatus *CodingModel::status(int column) const
{
    return column >= 0 && size_t(column) < m_status.size() ? &m_status[size_t(column)] : nullptr;
}

std::optional<Weight> CodingModel::weightAt(int row, int column) const
{
    const Scheme &s = document()->scheme();
    if (row < 0 || row >= s.levelCount() || column < 0 || column >= s.columnCount())
        return std::nullopt;
    return s.columns[size_t(column)].weights[size_t(row)];
}

QString CodingModel::cellName(int row, int column) const
{
    const Scheme &s = document()->scheme();
    return tr("level \u2018%1\u2019, column %2 \u2018%3\u2019").arg(s.factor.levels.value(row)).arg(column + 1).arg(s.columns[size_t(column)].name);
}

bool CodingModel::applyWeights(const std::vector<edits::CellWeight> &cells, const QString &actionName, const QString &mergeKey)
{
    Document *d = document();
    d->edit(edits::withWeights(d->scheme(), cells), actionName, mergeKey.isEmpty() ? MergeId::None : MergeId::Weight, mergeKey);
    return true;
}

Qt::ItemFlags CodingModel::flags(const QModelIndex &index) const
{
    return weightFlags(index);
}

QVariant CodingModel::data(const QModelIndex &index, int role) const
{
    if (!index.isValid())
        return {};
    if (const int f = footerRow(index.row()); f >= 0)
        return footerData(f, index.column(), role);
    const auto w = weightAt(index.row(), index.column());
    if (!w)
        return {};
    const ColumnStatus *st = status(index.column());
    switch (role) {
    case Qt::DisplayRole:
        return formatWeight(*w);
    case Qt::EditRole:
        return editableWeight(*w, true);
    case Qt::TextAlignmentRole:
        return QVariant::fromValue(Qt::AlignCenter);
    case Qt::BackgroundRole:
        if (st && st->overall() != look::State::Good && st->overall() != look::State::Neutral)
            return look::tint(st->overall());
        return {};
    case Qt::ToolTipRole: {
        QString head = tr("Level \u2018%1\u2019: %2").arg(document()->scheme().factor.levels.value(index.row()), formatWeight(*w));
        head += w->isExact() ? tr(" (exact)") : tr(" (floating value %1)").arg(doubleToString(w->value()));
        return st ? head + u"\n\n"_s + st->explanation : head;
    }
    default:
        return {};
    }
}

QVariant CodingModel::footerData(int footer, int column, int role) const
{
    const ColumnStatus *st = status(column);
    if (!st)
        return role == Qt::DisplayRole ? QVariant(kMissingMark.toString()) : QVariant();
    const look::State state = footer == SumRow ? st->sum : footer == OrthogonalityRow ? st->orthogonality : st->vif;
    switch (role) {
    case Qt::DisplayRole:
        return footer == SumRow ? st->sumText : footer == OrthogonalityRow ? st->orthogonalityText : st->vifText;
    case Qt::TextAlignmentRole:
        return QVariant::fromValue(Qt::AlignCenter);
    case Qt::ForegroundRole:
        return look::ink(state);
    case Qt::BackgroundRole:
        return state == look::State::Neutral ? look::footerBackground() : look::tint(state);
    case Qt::FontRole: {
        QFont f;
        f.setBold(state == look::State::Problem || state == look::State::Caution);
        return f;
    }
    case Qt::ToolTipRole:
        return st->explanation;
    default:
        return {};
    }
}

QVariant CodingModel::footerHeader(int footer, int role) const
{
    const bool planned = document()->scheme().factor.hasPlannedN();
    if (role == Qt::DisplayRole) {
        switch (footer) {
        case SumRow: return tr("\u03a3 sums to");
        case OrthogonalityRow: return tr("\u22a5 not orthogonal to");
        default: return tr("VIF");
        }
    }
    if (role == Qt::ToolTipRole) {
        switch (footer) {
        case SumRow:
            return tr("The sum of each column's weights. \u2713 when it is 0: the column compares groups without shifting the overall level.");
        case OrthogonalityRow:
            return tr("Columns each column is not orthogonal to %1 (centred, n-weighted cross-product not 0). "
                      "\u2713 none: its estimate is uncorrelated with every other.").arg(sizesPhrase(planned));
        default:
            return tr("Variance inflation factor %1. \u2713 below %2, ! from %2 (notable), \u2717 from %3 (serious); common practice, not a law.")
                .arg(sizesPhrase(planned)).arg(kVifCaution).arg(kVifProblem);
        }
    }
    if (role == Qt::BackgroundRole)
        return look::footerBackground();
    return {};
}

QVariant CodingModel::headerData(int section, Qt::Orientation orientation, int role) const
{
    const Scheme &s = document()->scheme();
    if (orientation == Qt::Vertical) {
        if (const int f = footerRow(section); f >= 0)
            return footerHeader(f, role);
        if (section < 0 || section >= s.levelCount())
            return {};
        if (role == Qt::DisplayRole)
            return s.factor.levels[section];
        if (role == Qt::ToolTipRole)
            return tr("Level %1 \u2018%2\u2019%3").arg(section + 1).arg(s.factor.levels[section],
                s.factor.hasPlannedN() ? tr(", planned n %1").arg(rationalToString(s.factor.plannedN[size_t(section)])) : QString());
        return {};
    }
    if (section < 0 || section >= s.columnCount())
        return {};
    const ColumnStatus *st = status(section);
    const look::State state = st ? st->overall() : look::State::Neutral;
    switch (role) {
    case Qt::DisplayRole: {
        QString name = look::twoLines(u"%1  %2"_s.arg(section + 1).arg(s.columns[size_t(section)].name));
        if (nameIsStale(section))
            name = kStaleNameMark.toString() + u" "_s + name;
        return state == look::State::Caution || state == look::State::Problem ? look::mark(state) + u" "_s + name : name;
    }
    case Qt::EditRole:
        return s.columns[size_t(section)].name;
    case Qt::ForegroundRole:
        return state == look::State::Caution || state == look::State::Problem ? QVariant(look::ink(state)) : QVariant();
    case Qt::ToolTipRole: {
        QString tip = st ? st->explanation + u"\n\n"_s : QString();
        if (nameIsStale(section))
            tip += tr("%1 Name out of date: you named this column \u2018%2\u2019 when it tested something else. It now tests %3. "
                      "Right-click the name to use \u2018%4\u2019 or to keep yours.\n\n")
                       .arg(kStaleNameMark, s.columns[size_t(section)].name, nowTests(section), generatedName(section));
        else if (nameIsUsers(section))
            tip += tr("You named this column; the name stays when the weights change. Right-click the name to let the tool name it.\n\n");
        return tip + tr("Double-click the name to rename the column.");
    }
    default:
        return {};
    }
}

bool CodingModel::nameIsStale(int column) const
{
    return cb::nameIsStale(document()->scheme(), document()->analysis(), column);
}

bool CodingModel::nameIsUsers(int column) const
{
    const Scheme &s = document()->scheme();
    return column >= 0 && column < s.columnCount() && s.columns[size_t(column)].named;
}

QString CodingModel::generatedName(int column) const
{
    return generatedColumnName(document()->scheme(), document()->analysis(), column);
}

// "the average of A and B minus C", or what the coefficient's hypothesis says without words.
QString CodingModel::nowTests(int column) const
{
    const Analysis &a = document()->analysis();
    const qsizetype row = column + (a.intercept ? 1 : 0);
    return row < a.hypothesisWords.size() ? a.hypothesisWords[row] : tr("no unique hypothesis (the coding is rank deficient)");
}

bool CodingModel::useGeneratedName(int column)
{
    Document *d = document();
    const QString name = generatedName(column);
    auto next = edits::withGeneratedName(d->scheme(), column);
    if (!next || name.isEmpty())
        return false;
    d->edit(next.take(), tr("Name column %1 \u2018%2\u2019 after what it tests").arg(column + 1).arg(name));
    return true;
}

bool CodingModel::keepName(int column)
{
    Document *d = document();
    auto next = edits::withNameKept(d->scheme(), column);
    if (!next)
        return false;
    d->edit(next.take(), tr("Keep the name \u2018%1\u2019 of column %2").arg(d->scheme().columns[size_t(column)].name).arg(column + 1));
    return true;
}

bool CodingModel::setHeaderData(int section, Qt::Orientation orientation, const QVariant &value, int role)
{
    Document *d = document();
    if (orientation != Qt::Horizontal || role != Qt::EditRole || section < 0 || section >= d->scheme().columnCount())
        return false;
    const QString name = value.toString().trimmed();
    if (name == d->scheme().columns[size_t(section)].name)
        return true;
    auto next = edits::withColumnName(d->scheme(), section, name);
    if (!next) {
        emit editRefused(tr("Not accepted: %1.").arg(next.error()));
        return false;
    }
    d->edit(next.take(), tr("Rename column %1 to \u2018%2\u2019").arg(section + 1).arg(name), MergeId::ColumnName, QString::number(section));
    emit editAccepted();
    return true;
}

} // namespace cb
