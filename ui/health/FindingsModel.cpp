#include "ui/health/FindingsModel.h"

#include "ui/document/Document.h"
#include "ui/common/Look.h"

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

FindingsModel::FindingsModel(Document *document, QObject *parent)
    : DocumentTableModel(document, parent)
{
    follow();
}

DocumentTableModel::Shape FindingsModel::currentShape() const
{
    // With nothing to report, one row says so.
    return {std::max(1, int(document()->analysis().findings.size())), 1};
}

void FindingsModel::aboutToFollow()
{
    const auto &f = document()->analysis().findings;
    m_order.resize(f.size());
    for (size_t i = 0; i < f.size(); ++i)
        m_order[i] = int(i);
    std::stable_sort(m_order.begin(), m_order.end(), [&f](int a, int b) {
        return static_cast<int>(f[size_t(a)].severity) > static_cast<int>(f[size_t(b)].severity);
    });
}

bool FindingsModel::showsChange()
{
    const auto &findings = document()->analysis().findings;
    QList<QPair<int, QString>> shown;
    shown.reserve(qsizetype(m_order.size()));
    for (const int i : m_order)
        shown.append({int(findings[size_t(i)].severity), findings[size_t(i)].message});
    const bool same = shown == m_shown;
    m_shown = std::move(shown);
    return !same;
}

QVariant FindingsModel::data(const QModelIndex &index, int role) const
{
    const auto &findings = document()->analysis().findings;
    if (!index.isValid())
        return {};
    if (findings.empty()) {
        if (role == Qt::DisplayRole)
            return tr("%1  Nothing to flag: the columns are identifiable, well conditioned and orthogonal.").arg(look::mark(look::State::Good));
        if (role == Qt::ForegroundRole)
            return look::ink(look::State::Good);
        return {};
    }
    if (size_t(index.row()) >= m_order.size())
        return {};
    const Finding &f = findings[size_t(m_order[size_t(index.row())])];
    const look::State state = look::ofSeverity(f.severity);
    switch (role) {
    case Qt::DisplayRole: {
        const QString mark = state == look::State::Neutral ? u"i"_s : look::mark(state);
        QString text = f.message;
        if (!text.isEmpty())
            text[0] = text[0].toUpper();
        return mark + u"  "_s + text;
    }
    case Qt::ToolTipRole:
        return f.message;
    case Qt::ForegroundRole:
        return look::ink(state);
    case Qt::BackgroundRole:
        return state == look::State::Neutral ? QVariant() : QVariant(look::tint(state));
    default:
        return {};
    }
}

} // namespace cb
