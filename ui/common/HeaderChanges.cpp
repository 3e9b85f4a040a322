#include "ui/common/HeaderChanges.h"

#include <QEvent>
#include <QHeaderView>
#include <QTableView>

namespace cb {

namespace {

// The thickness the view would give the header (QTableView::updateGeometries), and the one it has.
bool thicknessChanges(const QHeaderView *header)
{
    if (header->isHidden())
        return false;
    const QSize hint = header->sizeHint();
    if (header->orientation() == Qt::Horizontal)
        return qBound(header->minimumHeight(), hint.height(), header->maximumHeight()) != header->height();
    return qBound(header->minimumWidth(), hint.width(), header->maximumWidth()) != header->width();
}

// Lays the view out when its headers' thickness changed, or when it is shown after a change
// it could not measure while hidden.
class HeaderFollower : public QObject
{
public:
    explicit HeaderFollower(QTableView *view)
        : QObject(view)
        , m_view(view)
    {
        view->installEventFilter(this);
    }

    void headerChanged(Qt::Orientation orientation)
    {
        if (!m_view->isVisible()) {
            m_pending = true;
            return;
        }
        const QHeaderView *header = orientation == Qt::Horizontal ? m_view->horizontalHeader() : m_view->verticalHeader();
        if (thicknessChanges(header))
            m_view->doItemsLayout();
    }

protected:
    bool eventFilter(QObject *watched, QEvent *event) override
    {
        if (watched == m_view && event->type() == QEvent::Show && m_pending) {
            m_pending = false;
            m_view->doItemsLayout();
        }
        return false;
    }

private:
    QTableView *m_view;
    bool m_pending = false;
};

} // namespace

bool relayoutOnlyWhenHeadersResize(QTableView *view)
{
    QAbstractItemModel *model = view->model();
    if (!model)
        return false;
    // The view's own connection (QAbstractItemView::setModel, Qt 6.4): a delayed items layout.
    if (!QObject::disconnect(model, SIGNAL(headerDataChanged(Qt::Orientation,int,int)), view, SLOT(_q_headerDataChanged())))
        return false;
    auto *follower = new HeaderFollower(view);
    QObject::connect(model, &QAbstractItemModel::headerDataChanged, follower,
                     [follower](Qt::Orientation orientation) { follower->headerChanged(orientation); });
    return true;
}

} // namespace cb
