#include "HealthPanel.h"

#include "ColumnStatus.h"
#include "Document.h"
#include "FindingsModel.h"
#include "Look.h"
#include "VifModel.h"

#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QListView>
#include <QTableView>
#include <QVBoxLayout>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString stateSpan(look::State state, const QString &text)
{
    return u"<span style='color:%1'><b>%2</b> %3</span>"_s.arg(look::ink(state).name(), look::mark(state), text);
}

QLabel *caption(const QString &text, QWidget *parent)
{
    auto *l = new QLabel(text, parent);
    QFont f = l->font();
    f.setBold(true);
    l->setFont(f);
    return l;
}

} // namespace

HealthPanel::HealthPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_vif(new VifModel(document, this))
    , m_findings(new FindingsModel(document, this))
    , m_summary(new QLabel(this))
    , m_vifView(new QTableView(this))
    , m_findingsView(new QListView(this))
{
    m_summary->setWordWrap(true);
    m_summary->setTextFormat(Qt::RichText);
    m_summary->setAlignment(Qt::AlignTop | Qt::AlignLeft);
    m_summary->setTextInteractionFlags(Qt::TextSelectableByMouse);
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

    auto *thresholds = look::note(tr("Thresholds (common practice, not laws): a condition index of %1 or more flags strong collinearity "
                                     "(Belsley, Kuh & Welsch 1980); VIF %2 or more is notable, %3 or more serious.")
                                      .arg(kConditionIndexFlag).arg(kVifCaution).arg(kVifProblem), this);

    auto *left = new QVBoxLayout;
    left->addWidget(caption(tr("Overall"), this));
    left->addWidget(m_summary, 1);
    left->addWidget(thresholds);
    auto *middle = new QVBoxLayout;
    middle->addWidget(caption(tr("Variance inflation per column"), this));
    middle->addWidget(m_vifView, 1);
    auto *right = new QVBoxLayout;
    right->addWidget(caption(tr("What to look at"), this));
    right->addWidget(m_findingsView, 1);
    auto *layout = new QHBoxLayout(this);
    layout->setContentsMargins(6, 4, 6, 4);
    layout->addLayout(left, 3);
    layout->addLayout(middle, 3);
    layout->addLayout(right, 5);

    connect(document, &Document::changed, this, &HealthPanel::follow);
    follow();
}

QString HealthPanel::summaryText() const
{
    return m_summary->text();
}

void HealthPanel::follow()
{
    const Analysis &a = m_document->analysis();
    using look::State;
    QStringList lines;
    if (a.fullRank)
        lines << stateSpan(State::Good, tr("Rank %1 of %2: every coefficient can be estimated.").arg(a.rank).arg(a.coefficientCount));
    else
        lines << stateSpan(State::Problem, tr("Rank %1 of %2: the columns are linearly dependent.").arg(a.rank).arg(a.coefficientCount))
                     + (a.dependencies.isEmpty() ? QString() : u"<br>&nbsp;&nbsp;"_s + a.dependencies.join(u"; "_s).toHtmlEscaped());
    if (a.conditionNumber) {
        const bool flagged = *a.conditionNumber >= kConditionIndexFlag;
        lines << stateSpan(flagged ? State::Caution : State::Good,
                           tr("Condition number %1 (flag at %2)").arg(formatIndex(*a.conditionNumber)).arg(kConditionIndexFlag));
    } else {
        lines << stateSpan(State::Problem, tr("Condition number: infinite (the design is singular)"));
    }
    QStringList indices;
    for (double v : a.conditionIndices)
        indices << formatIndex(v);
    if (indices.size() > 12)
        indices = indices.mid(0, 6) + QStringList{u"\u2026"_s} + indices.mid(indices.size() - 3);
    lines << tr("Condition indices: %1").arg(indices.join(u", "_s));
    lines << (a.exact ? tr("Arithmetic: exact fractions.") : tr("Arithmetic: floating point."));
    if (a.dependsOnSizes)
        lines << stateSpan(State::Caution, tr("Fewer columns than levels \u2212 1: what each coefficient tests depends on the planned n."));
    look::setText(m_summary, lines.join(u"<br>"_s));
}

} // namespace cb
