#include "ui/levels/LevelsPanel.h"
#include "ui/common/WrapLabel.h"

#include "ui/document/Document.h"
#include "ui/levels/LevelsModel.h"
#include "ui/levels/LevelsView.h"
#include "ui/common/Look.h"
#include "core/model/SchemeEdits.h"

#include <QComboBox>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QLabel>
#include <QLineEdit>
#include <QMenu>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QSignalBlocker>
#include <QToolButton>
#include <QVBoxLayout>

using namespace Qt::StringLiterals;

namespace cb {

LevelsPanel::LevelsPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_model(new LevelsModel(document, this))
    , m_view(new LevelsView(this))
    , m_factorName(new QLineEdit(this))
    , m_measure(new QComboBox(this))
    , m_notes(new QPlainTextEdit(this))
    , m_notice(new WrapLabel(this))
{
    m_view->setLevelsModel(m_model);
    m_view->setObjectName(u"levelsTable"_s);
    m_factorName->setObjectName(u"factorName"_s);
    m_factorName->setPlaceholderText(tr("name of the factor"));
    m_measure->setObjectName(u"factorMeasure"_s);
    for (Measure m : {Measure::Between, Measure::Within})
        m_measure->addItem(measureTitle(m), QVariant::fromValue(int(m)));
    m_measure->setItemData(0, tr("Each participant is in one level: the levels are separate groups"), Qt::ToolTipRole);
    m_measure->setItemData(1, tr("Each participant gives a value at every level (repeated measures): power and the "
                                 "data check work on participants' contrast scores"),
                           Qt::ToolTipRole);
    m_notes->setObjectName(u"notes"_s);
    m_notes->setPlaceholderText(tr("Notes about the study: what the levels are, why these comparisons\u2026"));
    m_notice->setStyleSheet(u"QLabel { color: %1; }"_s.arg(look::ink(look::State::Problem).name()));
    m_notice->hide();

    auto *add = new QPushButton(tr("+ Level"), this);
    auto *remove = new QPushButton(tr("\u2212 Level"), this);
    auto *up = new QToolButton(this);
    auto *down = new QToolButton(this);
    up->setText(tr("\u2191"));
    down->setText(tr("\u2193"));
    up->setToolTip(tr("Move the level up (Ctrl+Up)"));
    down->setToolTip(tr("Move the level down (Ctrl+Down)"));
    auto *more = new QToolButton(this);
    more->setText(tr("Defaults"));
    more->setPopupMode(QToolButton::InstantPopup);
    auto *menu = new QMenu(more);
    menu->addAction(tr("Equal group sizes"), this, [this] { m_model->useEqualSizes(); });
    menu->addAction(tr("Evenly spaced positions"), this, [this] { m_model->useDefaultPositions(); });
    more->setMenu(menu);
    connect(add, &QPushButton::clicked, this, &LevelsPanel::addLevel);
    connect(remove, &QPushButton::clicked, this, &LevelsPanel::removeLevel);
    connect(up, &QToolButton::clicked, this, [this] { m_view->moveCurrent(-1); });
    connect(down, &QToolButton::clicked, this, [this] { m_view->moveCurrent(+1); });

    auto *buttons = new QHBoxLayout;
    buttons->addWidget(add);
    buttons->addWidget(remove);
    buttons->addWidget(up);
    buttons->addWidget(down);
    buttons->addStretch(1);
    buttons->addWidget(more);

    auto *form = new QFormLayout;
    form->addRow(tr("Factor:"), m_factorName);
    form->addRow(tr("Measured:"), m_measure);
    auto *layout = new QVBoxLayout(this);
    layout->setContentsMargins(6, 6, 6, 6);
    layout->addLayout(form);
    layout->addWidget(m_view, 3);
    layout->addLayout(buttons);
    layout->addWidget(m_notice);
    layout->addWidget(new QLabel(tr("Notes"), this));
    layout->addWidget(m_notes, 1);

    connect(m_model, &LevelsModel::editRefused, this, [this](const QString &text) {
        m_notice->setText(text);
        m_notice->show();
        emit message(text);
    });
    connect(m_model, &LevelsModel::editAccepted, m_notice, &QLabel::hide);
    connect(m_factorName, &QLineEdit::editingFinished, this, [this] {
        if (m_factorName->text().trimmed() == m_document->scheme().factor.name)
            return;
        auto next = edits::withFactorName(m_document->scheme(), m_factorName->text());
        if (next)
            m_document->edit(next.take(), tr("Rename the factor to \u2018%1\u2019").arg(m_factorName->text().trimmed()), MergeId::FactorName);
    });
    connect(m_measure, &QComboBox::activated, this, [this](int index) {
        const auto measure = Measure(m_measure->itemData(index).toInt());
        if (measure == m_document->scheme().factor.measure)
            return;
        auto next = edits::withMeasure(m_document->scheme(), measure);
        if (!next) {
            m_notice->setText(next.error());
            m_notice->show();
            emit message(next.error());
            follow(); // the choice goes back to what the factor is
            return;
        }
        m_notice->hide();
        m_document->edit(next.take(), tr("Measure \u2018%1\u2019 %2").arg(m_document->scheme().factor.name, measureTitle(measure)));
    });
    connect(m_notes, &QPlainTextEdit::textChanged, this, [this] {
        if (m_notes->toPlainText() == m_document->scheme().notes)
            return;
        m_document->edit(edits::withNotes(m_document->scheme(), m_notes->toPlainText()), tr("Edit the notes"), MergeId::Notes);
    });
    connect(document, &Document::changed, this, &LevelsPanel::follow);
    follow();
}

void LevelsPanel::follow()
{
    const Scheme &s = m_document->scheme();
    const bool roleHidden = s.kind == SchemeKind::Custom || !schemeUsesReference(s.kind);
    if (m_view->isColumnHidden(LevelsModel::RoleColumn) != roleHidden) {
        m_view->setColumnHidden(LevelsModel::RoleColumn, roleHidden);
        if (!roleHidden)
            m_view->resizeColumnToContents(LevelsModel::RoleColumn);
    }
    if (m_factorName->text() != s.factor.name && !m_factorName->hasFocus())
        m_factorName->setText(s.factor.name);
    if (const int index = m_measure->findData(int(s.factor.measure)); index != m_measure->currentIndex())
        m_measure->setCurrentIndex(index);
    if (m_notes->toPlainText() != s.notes) {
        const QSignalBlocker block(m_notes);
        m_notes->setPlainText(s.notes);
    }
}

void LevelsPanel::addLevel()
{
    if (m_model->addLevel())
        m_view->setCurrentIndex(m_model->index(m_model->rowCount() - 1, LevelsModel::NameColumn));
}

void LevelsPanel::removeLevel()
{
    const QModelIndex cur = m_view->currentIndex();
    m_model->removeLevel(cur.isValid() ? cur.row() : m_model->rowCount() - 1);
}

} // namespace cb
