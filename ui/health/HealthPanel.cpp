#include "ui/health/HealthPanel.h"
#include "ui/common/WrapLabel.h"

#include "ui/common/ColumnStatus.h"
#include "ui/document/Document.h"
#include "ui/health/FindingsModel.h"
#include "ui/common/Look.h"
#include "ui/health/VifModel.h"

#include <QAction>
#include <QClipboard>
#include <QGuiApplication>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QListView>
#include <QTableView>
#include <QVBoxLayout>

using namespace Qt::StringLiterals;

namespace cb {

HealthPanel::HealthPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_vif(new VifModel(document, this))
    , m_findings(new FindingsModel(document, this))
    , m_vifView(new QTableView(this))
    , m_findingsView(new QListView(this))
{
    // Plain labels with a Copy menu rather than selectable text: a selectable label lays its text
    // out as a text document, several times over on every edit that changes a figure.
    for (QLabel *&l : m_lines) {
        l = new WrapLabel(this);
        l->setTextFormat(Qt::PlainText);
        l->setContextMenuPolicy(Qt::ActionsContextMenu);
        auto *copyLine = new QAction(tr("Copy this line"), l);
        connect(copyLine, &QAction::triggered, l, [l] { QGuiApplication::clipboard()->setText(l->text()); });
        auto *copyAll = new QAction(tr("Copy every line"), l);
        connect(copyAll, &QAction::triggered, this, [this] { QGuiApplication::clipboard()->setText(summaryText()); });
        l->addActions({copyLine, copyAll});
        l->setToolTip(tr("Right-click to copy"));
    }
    m_vifView->setModel(m_vif);
    m_vifView->setObjectName(u"vifTable"_s);
    m_vifView->verticalHeader()->hide();
    m_vifView->verticalHeader()->setDefaultSectionSize(22);
    m_vifView->horizontalHeader()->setSectionResizeMode(VifModel::NameColumn, QHeaderView::Stretch);
    // Fixed widths for the number and the verdict: measuring every row on every edit is not needed.
    const QFontMetrics fm(font());
    m_vifView->horizontalHeader()->setSectionResizeMode(VifModel::VifColumn, QHeaderView::Fixed);
    m_vifView->horizontalHeader()->setSectionResizeMode(VifModel::VerdictColumn, QHeaderView::Fixed);
    m_vifView->setColumnWidth(VifModel::VifColumn, fm.horizontalAdvance(u"0000.00"_s) + 12);
    m_vifView->setColumnWidth(VifModel::VerdictColumn, fm.horizontalAdvance(tr("undefined")) + 16);
    m_vifView->setSelectionMode(QAbstractItemView::NoSelection);
    m_findingsView->setModel(m_findings);
    m_findingsView->setObjectName(u"findingsList"_s);
    m_findingsView->setWordWrap(true);
    m_findingsView->setSpacing(2);
    m_findingsView->setSelectionMode(QAbstractItemView::NoSelection);
    // The lists take the height the dock gives them (and scroll); they do not ask for more.
    m_vifView->setSizePolicy(QSizePolicy::Expanding, QSizePolicy::Ignored);
    m_findingsView->setSizePolicy(QSizePolicy::Expanding, QSizePolicy::Ignored);

    auto *thresholds = look::note(tr("Flags: condition index \u2265 %1; VIF \u2265 %2 notable, \u2265 %3 serious.")
                                      .arg(kConditionIndexFlag).arg(kVifCaution).arg(kVifProblem), this);
    thresholds->setToolTip(tr("Thresholds of common practice, not laws. A condition index of %1 or more flags strong collinearity "
                              "(Belsley, Kuh & Welsch 1980); a VIF of %2 or more is notable, %3 or more serious.")
                               .arg(kConditionIndexFlag).arg(kVifCaution).arg(kVifProblem));

    auto *left = new QVBoxLayout;
    left->setSpacing(2);
    left->addWidget(look::caption(tr("Overall"), this));
    for (QLabel *l : m_lines)
        left->addWidget(l);
    left->addStretch(1);
    left->addWidget(thresholds);
    auto *middle = new QVBoxLayout;
    middle->addWidget(look::caption(tr("Variance inflation per column"), this));
    middle->addWidget(m_vifView, 1);
    auto *right = new QVBoxLayout;
    right->addWidget(look::caption(tr("What to look at"), this));
    right->addWidget(m_findingsView, 1);
    auto *layout = new QHBoxLayout(this);
    layout->setContentsMargins(6, 4, 6, 4);
    // The VIF table gets the widest share, so column names are not cut where there is room.
    layout->addLayout(left, 3);
    layout->addLayout(middle, 4);
    layout->addLayout(right, 3);

    connect(document, &Document::changed, this, &HealthPanel::follow);
    follow();
}

QString HealthPanel::summaryText() const
{
    QStringList lines;
    for (const QLabel *l : m_lines)
        if (l->isVisibleTo(this))
            lines << l->text();
    return lines.join(u'\n');
}

void HealthPanel::setLine(Line line, look::State state, const QString &text)
{
    QLabel *l = m_lines[line];
    const QString shown = state == look::State::Neutral ? text : look::mark(state) + u" "_s + text;
    look::setText(l, shown);
    QPalette p = l->palette();
    const QColor colour = state == look::State::Neutral ? palette().color(QPalette::WindowText) : look::ink(state);
    if (p.color(QPalette::WindowText) != colour) {
        p.setColor(QPalette::WindowText, colour);
        l->setPalette(p);
    }
    l->setVisible(!text.isEmpty());
}

void HealthPanel::follow()
{
    const Analysis &a = m_document->analysis();
    using look::State;
    if (a.fullRank)
        setLine(RankLine, State::Good, tr("Rank %1 of %2: every coefficient can be estimated.").arg(a.rank).arg(a.coefficientCount));
    else
        setLine(RankLine, State::Problem, tr("Rank %1 of %2: the columns are linearly dependent.").arg(a.rank).arg(a.coefficientCount)
                                              + (a.dependencies.isEmpty() ? QString() : u"\n"_s + a.dependencies.join(u"; "_s)));
    if (a.conditionNumber) {
        const bool flagged = *a.conditionNumber >= kConditionIndexFlag;
        setLine(ConditionLine, flagged ? State::Caution : State::Good,
                tr("Condition number %1 (flag at %2)").arg(formatIndex(*a.conditionNumber)).arg(kConditionIndexFlag));
    } else {
        setLine(ConditionLine, State::Problem, tr("Condition number: infinite (the design is singular)"));
    }
    QStringList indices;
    for (double v : a.conditionIndices)
        indices << formatIndex(v);
    if (indices.size() > 12)
        indices = indices.mid(0, 6) + QStringList{u"\u2026"_s} + indices.mid(indices.size() - 3);
    setLine(IndicesLine, State::Neutral, tr("Condition indices: %1").arg(indices.join(u", "_s)));
    setLine(ArithmeticLine, State::Neutral, a.exact ? tr("Arithmetic: exact fractions.") : tr("Arithmetic: floating point."));
    setLine(SizesLine, State::Caution,
            a.dependsOnSizes ? tr("Fewer columns than levels \u2212 1: what each coefficient tests depends on the planned n.") : QString());
}

} // namespace cb
