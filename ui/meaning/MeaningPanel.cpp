#include "ui/meaning/MeaningPanel.h"
#include "ui/common/WrapLabel.h"

#include "ui/document/Document.h"
#include "ui/common/Look.h"
#include "ui/meaning/MeaningDelegate.h"
#include "ui/meaning/MeaningModel.h"

#include <QLabel>
#include <QVBoxLayout>

using namespace Qt::StringLiterals;

namespace cb {

MeaningPanel::MeaningPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_model(new MeaningModel(document, this))
    , m_view(new MeaningList(this))
    , m_header(new WrapLabel(this))
    , m_empty(new WrapLabel(this))
{
    m_view->setObjectName(u"meaningList"_s);
    m_view->setModel(m_model);
    m_view->setItemDelegate(new MeaningDelegate(m_view));
    m_view->setResizeMode(QListView::Adjust);
    m_view->setUniformItemSizes(false);
    m_view->setVerticalScrollMode(QAbstractItemView::ScrollPerPixel);
    m_view->setSelectionMode(QAbstractItemView::SingleSelection);
    m_view->setFrameShape(QFrame::NoFrame);
    m_empty->setStyleSheet(u"QLabel { background: %1; color: %2; padding: 6px; }"_s
                               .arg(look::tint(look::State::Problem).name(), look::ink(look::State::Problem).name()));

    auto *layout = new QVBoxLayout(this);
    layout->setContentsMargins(6, 6, 6, 6);
    layout->addWidget(m_header);
    layout->addWidget(m_empty);
    layout->addWidget(m_view, 1);
    connect(document, &Document::changed, this, &MeaningPanel::follow);
    follow();
}

void MeaningPanel::follow()
{
    const Analysis &a = m_document->analysis();
    const QString bars = tr("Bars: weight on each level\u2019s mean, <span style='color:%1'>\u25b2 above the line counted in</span>, "
                            "<span style='color:%2'>\u25bc below it subtracted</span>.")
                             .arg(look::raisedBar().name(), look::loweredBar().name());
    look::setText(m_header, a.dependsOnSizes
                          ? tr("Fewer columns than levels \u2212 1: each coefficient is a least-squares combination that depends on the "
                               "planned n.<br>%1").arg(bars)
                          : bars);
    if (a.hypotheses.empty()) {
        QString why = tr("No hypotheses: the coefficients are not identifiable.");
        for (const Finding &f : a.findings)
            if (f.topic == Finding::Topic::Rank && f.severity == Finding::Severity::Problem && !f.message.isEmpty()) {
                why = look::mark(look::State::Problem) + u" "_s + f.message.front().toUpper() + f.message.mid(1);
                break;
            }
        m_empty->setText(why);
    }
    m_empty->setVisible(a.hypotheses.empty());
    m_view->relayout();
}

void MeaningPanel::showCoefficient(int coefficient)
{
    const QModelIndex i = m_model->index(coefficient, 0);
    if (!i.isValid())
        return;
    m_view->setCurrentIndex(i);
    m_view->scrollTo(i);
}

} // namespace cb
