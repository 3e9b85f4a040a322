#include "ui/common/WrapLabel.h"

#include <QEvent>

namespace cb {

namespace {
constexpr qsizetype kRemembered = 16; // widths kept per text: a layout pass asks a handful
} // namespace

WrapLabel::WrapLabel(QWidget *parent)
    : WrapLabel(QString(), parent)
{
}

WrapLabel::WrapLabel(const QString &text, QWidget *parent)
    : QLabel(text, parent)
{
    setWordWrap(true);
}

int WrapLabel::heightForWidth(int width) const
{
    if (text() != m_measured) {
        m_heights.clear();
        m_measured = text();
    }
    if (const auto it = m_heights.constFind(width); it != m_heights.constEnd())
        return *it;
    if (m_heights.size() >= kRemembered)
        m_heights.clear();
    const int h = QLabel::heightForWidth(width);
    m_heights.insert(width, h);
    return h;
}

void WrapLabel::changeEvent(QEvent *event)
{
    switch (event->type()) {
    case QEvent::FontChange:
    case QEvent::StyleChange:
    case QEvent::ContentsRectChange:
        m_heights.clear();
        break;
    default:
        break;
    }
    QLabel::changeEvent(event);
}

} // namespace cb
