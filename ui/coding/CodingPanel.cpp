#include "ui/coding/CodingPanel.h"
#include "ui/common/WrapLabel.h"

#include "ui/coding/CodingModel.h"
#include "ui/coding/FooterStrip.h"
#include "ui/common/ColumnStatus.h"
#include "ui/document/Document.h"
#include "ui/coding/HypothesisModel.h"
#include "ui/common/Look.h"
#include "ui/health/PairsModel.h"
#include "core/model/SchemeEdits.h"
#include "ui/coding/SchemePicker.h"
#include "ui/coding/WeightGridView.h"

#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QMenu>
#include <QPushButton>
#include <QSplitter>
#include <QStyle>
#include <QTabWidget>
#include <QTimer>
#include <QVBoxLayout>

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

void styleNotice(QLabel *label, look::State state)
{
    label->setTextInteractionFlags(Qt::TextSelectableByMouse);
    label->setStyleSheet(u"QLabel { background: %1; color: %2; border-left: 4px solid %2; padding: 5px 8px; }"_s
                             .arg(look::tint(state).name(), look::ink(state).name()));
    label->hide();
}

} // namespace

CodingPanel::CodingPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_coding(new CodingModel(document, this))
    , m_hypotheses(new HypothesisModel(document, this))
    , m_pairs(new PairsModel(document, this))
    , m_picker(new SchemePicker(document, this))
    , m_tabs(new QTabWidget(this))
    , m_notice(new WrapLabel(this))
{
    styleNotice(m_notice, look::State::Problem);
    m_tabs->addTab(buildCodingTab(), tr("Coding \u2192 hypotheses"));
    m_tabs->addTab(buildHypothesisTab(), tr("Hypotheses \u2192 coding"));
    m_tabs->setTabToolTip(0, tr("Type the coding weights that go into the model; read what each coefficient tests on the right."));
    m_tabs->setTabToolTip(1, tr("Type the weights on the level means you want each coefficient to test; the coding follows."));
    m_tabs->setDocumentMode(true);

    auto *layout = new QVBoxLayout(this);
    layout->setContentsMargins(6, 6, 6, 6);
    layout->addWidget(m_picker);
    layout->addWidget(m_tabs, 1);
    layout->addWidget(m_notice);

    auto refused = [this](const QString &text) {
        showNotice(text);
        emit message(text);
    };
    connect(m_coding, &WeightTableModel::editRefused, this, refused);
    connect(m_hypotheses, &WeightTableModel::editRefused, this, refused);
    connect(m_picker, &SchemePicker::editRefused, this, refused);
    connect(m_coding, &WeightTableModel::editAccepted, this, [this] { showNotice({}); });
    connect(m_hypotheses, &WeightTableModel::editAccepted, this, [this] { showNotice({}); });
    // Any edit that goes through (here, in the levels or the design, an undo) ends the refusal's notice.
    connect(document, &Document::changed, this, [this] { showNotice({}); });
    connect(m_hypotheses, &HypothesisModel::draftChanged, this, [this](const QString &problem) {
        m_draftNotice->setText(problem.isEmpty() ? QString()
                                                 : tr("\u2717 Typed, not applied yet: %1. The coding changes as soon as the hypotheses "
                                                      "can be tested together.").arg(problem));
        m_draftNotice->setVisible(!problem.isEmpty());
    });
    connect(document, &Document::changed, this, &CodingPanel::follow);
    follow();
}

QWidget *CodingPanel::buildCodingTab()
{
    auto *tab = new QWidget(this);
    m_codingView = new WeightGridView(tab);
    m_codingView->setWeightModel(m_coding);
    m_codingView->setColumnsRenamable(true);
    m_codingView->setObjectName(u"codingGrid"_s);
    QHeaderView *header = m_codingView->horizontalHeader();
    header->setContextMenuPolicy(Qt::CustomContextMenu);
    connect(header, &QHeaderView::customContextMenuRequested, this, [this, header](const QPoint &at) {
        if (QMenu *menu = columnNameMenu(header->logicalIndexAt(at))) {
            menu->exec(header->viewport()->mapToGlobal(at));
            delete menu;
        }
    });

    auto *add = new QPushButton(tr("+ Column"), tab);
    auto *remove = new QPushButton(tr("\u2212 Column"), tab);
    add->setToolTip(tr("Add a coding column of zeros (at most one per level)."));
    remove->setToolTip(tr("Remove the coding column the cursor is in."));
    connect(add, &QPushButton::clicked, this, &CodingPanel::addColumn);
    connect(remove, &QPushButton::clicked, this, &CodingPanel::removeColumn);
    auto *bar = new QHBoxLayout;
    auto *hint = look::note(tr("Rows are levels, columns are coding columns. Type 1/3 or 0.25; paste from a spreadsheet."), tab);
    hint->setToolTip(tr("Type fractions (1/3) or decimals; paste blocks from a spreadsheet; double-click a column name to rename it."));
    bar->addWidget(hint, 1);
    bar->addWidget(add);
    bar->addWidget(remove);

    auto *pairsBox = new QWidget(tab);
    m_pairsCaption = look::note(QString(), pairsBox);
    m_pairsView = new QTableView(pairsBox);
    m_pairsView->setModel(m_pairs);
    m_pairsView->setObjectName(u"pairsGrid"_s);
    m_pairsView->setSelectionMode(QAbstractItemView::NoSelection);
    m_pairsView->setEditTriggers(QAbstractItemView::NoEditTriggers);
    m_pairsView->horizontalHeader()->setDefaultSectionSize(30);
    m_pairsView->horizontalHeader()->setMinimumSectionSize(24);
    m_pairsView->horizontalHeader()->setSectionResizeMode(QHeaderView::Fixed);
    m_pairsView->verticalHeader()->setDefaultSectionSize(24);
    m_pairsView->verticalHeader()->setSectionResizeMode(QHeaderView::Fixed);
    auto *pairsLayout = new QVBoxLayout(pairsBox);
    pairsLayout->setContentsMargins(0, 4, 0, 0);
    pairsLayout->setSpacing(2);
    pairsLayout->addWidget(m_pairsCaption);
    pairsLayout->addWidget(m_pairsView, 1); // up to its maximum size, from the left

    // The grid comes first; the pairs table gets the room it needs up to a share of the
    // height (fitSplit), and the person can move the divider.
    // The indicator rows stay in a strip under the grid while a long grid scrolls.
    auto *gridBox = new QWidget(tab);
    auto *gridLayout = new QVBoxLayout(gridBox);
    gridLayout->setContentsMargins(0, 0, 0, 0);
    gridLayout->setSpacing(0);
    gridLayout->addWidget(m_codingView, 1);
    m_footer = new FooterStrip(m_codingView, m_coding, gridBox);
    gridLayout->addWidget(m_footer);
    m_split = new QSplitter(Qt::Vertical, tab);
    m_split->addWidget(gridBox);
    m_split->addWidget(pairsBox);
    m_split->setChildrenCollapsible(false);
    m_split->setStretchFactor(0, 1);
    m_split->setStretchFactor(1, 0);
    connect(m_split, &QSplitter::splitterMoved, this, [this] { m_splitMoved = true; });
    connect(m_pairs, &QAbstractItemModel::modelReset, this, &CodingPanel::fitSplit);
    connect(m_coding, &QAbstractItemModel::modelReset, this, &CodingPanel::fitSplit);
    // A column title that now takes two lines makes the header taller: the grid's rows keep their room.
    connect(m_codingView->horizontalHeader(), &QHeaderView::geometriesChanged, this,
            [this] { QTimer::singleShot(0, this, &CodingPanel::fitSplit); });

    auto *layout = new QVBoxLayout(tab);
    layout->setContentsMargins(0, 4, 0, 0);
    layout->addLayout(bar);
    layout->addWidget(m_split, 1);

    connect(m_codingView->selectionModel(), &QItemSelectionModel::currentChanged, this, [this](const QModelIndex &i) {
        if (i.isValid())
            emit currentCoefficientChanged(i.column() + (m_document->scheme().intercept ? 1 : 0));
    });
    return tab;
}

QWidget *CodingPanel::buildHypothesisTab()
{
    auto *tab = new QWidget(this);
    m_hypothesisView = new WeightGridView(tab);
    m_hypothesisView->setWeightModel(m_hypotheses);
    m_hypothesisView->setObjectName(u"hypothesisGrid"_s);
    m_hypothesisView->horizontalHeader()->setDefaultSectionSize(150);
    m_draftNotice = new WrapLabel(tab);
    styleNotice(m_draftNotice, look::State::Problem);
    auto *layout = new QVBoxLayout(tab);
    layout->setContentsMargins(0, 4, 0, 0);
    auto *add = new QPushButton(tr("+ Comparison"), tab);
    auto *remove = new QPushButton(tr("\u2212 Comparison"), tab);
    add->setToolTip(tr("Add a comparison: type its weights on the level means, summing to 0."));
    remove->setToolTip(tr("Remove the comparison the cursor is in (its coding column goes too)."));
    connect(add, &QPushButton::clicked, this, &CodingPanel::addComparison);
    connect(remove, &QPushButton::clicked, this, &CodingPanel::removeComparison);
    auto *bar = new QHBoxLayout;
    bar->addWidget(look::note(tr("Each column is what one coefficient tests: weights on the level means. A comparison's weights sum to 0; "
                                 "the intercept's sum to 1. Edit them and the coding grid is rebuilt to test exactly these."), tab), 1);
    bar->addWidget(add);
    bar->addWidget(remove);
    layout->addLayout(bar);
    layout->addWidget(m_hypothesisView, 1);
    layout->addWidget(m_draftNotice);
    connect(m_hypotheses, &QAbstractItemModel::modelReset, m_hypothesisView, [this] {
        m_hypothesisView->setEnabled(!m_document->analysis().hypotheses.empty());
    });
    return tab;
}

void CodingPanel::follow()
{
    const bool planned = m_document->scheme().factor.hasPlannedN();
    look::setText(m_pairsCaption, tr("<b>Pairs of columns</b> (%2 yes, %3 no; hover a cell for the cross-product). Above the diagonal: "
                                     "orthogonal as written, the products of their weights sum to 0. Below: orthogonal %1, which "
                                     "makes their estimates uncorrelated.")
                                .arg(sizesPhrase(planned), look::mark(look::State::Good), look::mark(look::State::Problem)));
    m_hypothesisView->setEnabled(!m_document->analysis().hypotheses.empty());
}

void CodingPanel::fitSplit()
{
    // The pairs table is no larger than its cells (set here, on reset and resize, rather than
    // by AdjustToContents, which would lay out the whole panel again on every edit).
    const int frame = 2 * m_pairsView->frameWidth() + 2;
    const int table = m_pairsView->horizontalHeader()->sizeHint().height() + 24 * m_pairs->rowCount() + frame;
    const int tableWidth = m_pairsView->verticalHeader()->sizeHint().width() + 30 * m_pairs->columnCount() + frame;
    const int bar = m_pairsView->style()->pixelMetric(QStyle::PM_ScrollBarExtent);
    m_pairsView->setMaximumSize(tableWidth + bar, table + bar);
    if (m_splitMoved || !m_split || m_split->height() <= 0)
        return;
    // The grid first: its level rows and the indicator strip get the height they need, and the
    // pairs table what is left (at least its caption and a row, at most what it needs).
    const int total = m_split->height();
    const int grid = std::max(m_codingView->horizontalHeader()->height(), m_codingView->horizontalHeader()->sizeHint().height())
                     + m_codingView->verticalHeader()->length() + 2 * m_codingView->frameWidth() + m_footer->sizeHint().height() + 4;
    const int caption = m_pairsCaption->heightForWidth(m_split->width());
    const int wanted = caption + 8 + table;
    const int least = std::min(wanted, caption + 8 + 2 * 24);
    const int pairs = std::clamp(total - grid, least, std::max(least, wanted));
    m_split->setSizes({total - pairs, pairs});
}

void CodingPanel::resizeEvent(QResizeEvent *event)
{
    QWidget::resizeEvent(event);
    // After the layout has given the splitter its new height.
    QTimer::singleShot(0, this, &CodingPanel::fitSplit);
}

void CodingPanel::showDirection(Direction direction)
{
    m_tabs->setCurrentIndex(direction == CodingDirection ? 0 : 1);
}

QMenu *CodingPanel::columnNameMenu(int column)
{
    if (column < 0 || column >= m_document->scheme().columnCount() || !m_coding->nameIsUsers(column))
        return nullptr;
    const QString generated = m_coding->generatedName(column);
    const QString name = m_document->scheme().columns[size_t(column)].name;
    auto *menu = new QMenu(this);
    if (generated != name) {
        QAction *use = menu->addAction(tr("Use the name \u2018%1\u2019").arg(generated).replace(u'&', u"&&"_s));
        use->setToolTip(tr("Name the column after what it tests; the name then follows its weights."));
        connect(use, &QAction::triggered, this, [this, column] { m_coding->useGeneratedName(column); });
    } else {
        QAction *follow = menu->addAction(tr("Let the name follow the weights"));
        connect(follow, &QAction::triggered, this, [this, column] { m_coding->useGeneratedName(column); });
    }
    if (m_coding->nameIsStale(column)) {
        QAction *keep = menu->addAction(tr("Keep the name \u2018%1\u2019").arg(name).replace(u'&', u"&&"_s));
        connect(keep, &QAction::triggered, this, [this, column] { m_coding->keepName(column); });
    }
    if (menu->isEmpty()) {
        delete menu;
        return nullptr;
    }
    return menu;
}

WeightGridView *CodingPanel::activeView() const
{
    return m_tabs->currentIndex() == 0 ? m_codingView : m_hypothesisView;
}

QString CodingPanel::notice() const
{
    return m_notice->isVisible() ? m_notice->text() : QString();
}

void CodingPanel::showNotice(const QString &message)
{
    look::setText(m_notice, message);
    m_notice->setVisible(!message.isEmpty());
}

void CodingPanel::addColumn()
{
    auto next = edits::withColumnAdded(m_document->scheme());
    if (!next) {
        showNotice(tr("Not added: %1").arg(next.error()));
        return;
    }
    m_document->edit(next.take(), tr("Add a coding column"));
    showNotice({});
}

void CodingPanel::removeColumn()
{
    const QModelIndex cur = m_codingView->currentIndex();
    removeCodingColumn(cur.isValid() ? cur.column() : m_document->scheme().columnCount() - 1);
}

void CodingPanel::addComparison()
{
    if (m_hypotheses->addComparison()) {
        showNotice({});
        const QModelIndex first = m_hypotheses->index(0, m_hypotheses->columnCount() - 1);
        m_hypothesisView->setCurrentIndex(first);
        m_hypothesisView->scrollTo(first);
    }
}

void CodingPanel::removeComparison()
{
    const Scheme &s = m_document->scheme();
    const QModelIndex cur = m_hypothesisView->currentIndex();
    const int offset = s.intercept ? 1 : 0;
    const int coefficient = cur.isValid() ? cur.column() : m_hypotheses->columnCount() - 1;
    if (coefficient >= offset + s.columnCount()) { // a new comparison not applied yet
        m_hypotheses->discardDraft();
        return;
    }
    if (coefficient < offset) {
        showNotice(tr("Not removed: the intercept is switched off with the \u2018Intercept\u2019 box above, not removed here."));
        return;
    }
    removeCodingColumn(coefficient - offset);
}

void CodingPanel::removeCodingColumn(int column)
{
    const Scheme &s = m_document->scheme();
    auto next = edits::withColumnRemoved(s, column);
    if (!next) {
        showNotice(tr("Not removed: %1").arg(next.error()));
        return;
    }
    m_document->edit(next.take(), tr("Remove column %1 \u2018%2\u2019").arg(column + 1).arg(s.columns[size_t(column)].name));
    showNotice({});
}

} // namespace cb
