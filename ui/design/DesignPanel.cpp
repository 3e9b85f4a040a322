#include "ui/design/DesignPanel.h"

#include "ui/design/CellPicture.h"
#include "ui/document/Document.h"
#include "ui/common/Look.h"

#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QPushButton>
#include <QRegularExpression>
#include <QTableWidget>
#include <QTreeWidget>
#include <QVBoxLayout>

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

constexpr int kCandidateRole = Qt::UserRole + 1;
constexpr int kColumnRole = Qt::UserRole + 2;

QString capitalised(QString text)
{
    if (!text.isEmpty())
        text[0] = text[0].toUpper();
    return text;
}

int coefficientOffset(const Analysis &a)
{
    return a.intercept ? 1 : 0;
}

} // namespace

DesignPanel::DesignPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_intro(look::note(QString(), this))
    , m_designPart(new QWidget(this))
    , m_factors(new QTableWidget(this))
    , m_add(new QPushButton(tr("Add a factor"), this))
    , m_remove(new QPushButton(tr("Remove"), this))
    , m_activate(new QPushButton(tr("Edit in the grid"), this))
    , m_terms(new QTreeWidget(m_designPart))
    , m_cellN(new QTableWidget(m_designPart))
    , m_equal(new QPushButton(tr("Equal sizes"), m_designPart))
    , m_cellNote(look::note(QString(), m_designPart))
    , m_columnTitle(look::caption(QString(), m_designPart))
    , m_picture(new CellPicture(m_designPart))
    , m_hypothesis(new QLabel(m_designPart))
    , m_findings(new QLabel(m_designPart))
{
    setObjectName(u"designPanel"_s);
    auto *layout = new QVBoxLayout(this);
    layout->addWidget(look::caption(tr("Factors"), this));
    layout->addWidget(m_intro);
    m_factors->setObjectName(u"designFactors"_s);
    m_factors->setColumnCount(4);
    m_factors->setHorizontalHeaderLabels({u"\u270e"_s, tr("Factor"), tr("Levels"), tr("Coding")});
    m_factors->verticalHeader()->hide();
    m_factors->setSelectionBehavior(QAbstractItemView::SelectRows);
    m_factors->setSelectionMode(QAbstractItemView::SingleSelection);
    m_factors->setEditTriggers(QAbstractItemView::NoEditTriggers);
    m_factors->horizontalHeader()->setSectionResizeMode(2, QHeaderView::Stretch);
    m_factors->setToolTip(tr("Double-click a factor to edit its levels and coding in the grid."));
    layout->addWidget(m_factors);
    auto *buttons = new QHBoxLayout;
    buttons->addWidget(m_add);
    buttons->addWidget(m_remove);
    buttons->addWidget(m_activate);
    buttons->addStretch(1);
    layout->addLayout(buttons);
    m_add->setToolTip(tr("Cross the study with another factor (two levels coded +1/2 and \u22121/2; rename and recode it in the grid)."));
    connect(m_add, &QPushButton::clicked, this, &DesignPanel::addFactor);
    connect(m_remove, &QPushButton::clicked, this, &DesignPanel::removeFactor);
    connect(m_activate, &QPushButton::clicked, this, [this] { makeActive(m_factors->currentRow()); });
    connect(m_factors, &QTableWidget::cellDoubleClicked, this, [this](int row, int) { makeActive(row); });

    auto *design = new QVBoxLayout(m_designPart);
    design->setContentsMargins(0, 0, 0, 0);
    design->addWidget(look::caption(tr("Terms and their columns"), m_designPart));
    m_terms->setObjectName(u"designTerms"_s);
    m_terms->setHeaderHidden(true);
    m_terms->setRootIsDecorated(true);
    m_terms->setToolTip(tr("Tick the terms of the model; pick a column to see its weights over the cells."));
    design->addWidget(m_terms);
    connect(m_terms, &QTreeWidget::itemChanged, this, [this](QTreeWidgetItem *item) { termToggled(item); });
    connect(m_terms, &QTreeWidget::currentItemChanged, this, [this](QTreeWidgetItem *item) {
        if (!m_filling && item && item->data(0, kColumnRole).isValid())
            selectColumn(item->data(0, kColumnRole).toInt());
    });

    design->addWidget(m_columnTitle);
    design->addWidget(m_picture);
    m_hypothesis->setWordWrap(true);
    m_hypothesis->setTextInteractionFlags(Qt::TextSelectableByMouse);
    design->addWidget(m_hypothesis);

    design->addWidget(look::caption(tr("Planned n per cell"), m_designPart));
    m_cellN->setObjectName(u"designCellSizes"_s);
    m_cellN->setToolTip(tr("Type the planned number of observations in each cell; 0 marks an empty cell."));
    design->addWidget(m_cellN);
    auto *sizeRow = new QHBoxLayout;
    sizeRow->addWidget(m_cellNote, 1);
    sizeRow->addWidget(m_equal, 0, Qt::AlignTop);
    design->addLayout(sizeRow);
    connect(m_cellN, &QTableWidget::itemChanged, this, [this](QTableWidgetItem *item) { cellSizeTyped(item); });
    connect(m_equal, &QPushButton::clicked, this, [this] {
        m_document->editStudy(withEqualCellSizes(m_document->study()), tr("Equal cell sizes"));
    });

    design->addWidget(look::caption(tr("Design findings"), m_designPart));
    m_findings->setObjectName(u"designFindings"_s);
    m_findings->setWordWrap(true);
    m_findings->setTextFormat(Qt::RichText);
    m_findings->setTextInteractionFlags(Qt::TextSelectableByMouse);
    design->addWidget(m_findings);
    layout->addWidget(m_designPart);
    layout->addStretch(1);

    connect(m_document, &Document::changed, this, &DesignPanel::follow);
    follow();
}

void DesignPanel::follow()
{
    m_filling = true;
    const bool design = m_document->isDesign();
    look::setText(m_intro, design ? tr("The grid edits the factor marked \u270e; double-click another to edit it.")
                                  : tr("One factor. Add a factor to cross it with another and see the design over the cells."));
    m_designPart->setVisible(design);
    m_remove->setEnabled(design);
    m_activate->setEnabled(design);
    m_add->setEnabled(m_document->study().factorCount() < kMaxDesignFactors);
    fillFactors();
    if (design) {
        const int columns = m_document->designAnalysis().analysis.columnCount;
        m_column = std::clamp(m_column, 0, std::max(0, columns - 1));
        fillTerms();
        fillCellSizes();
        fillPicture();
        fillFindings();
    }
    m_filling = false;
}

void DesignPanel::fillFactors()
{
    const Study &s = m_document->study();
    m_factors->setRowCount(s.factorCount());
    for (int f = 0; f < s.factorCount(); ++f) {
        const Scheme &scheme = s.design.factors[size_t(f)];
        const QStringList texts{f == s.active ? u"\u270e"_s : QString(), scheme.factor.name,
                                u"%1: %2"_s.arg(scheme.levelCount()).arg(scheme.factor.levels.join(u", "_s)), schemeTitle(scheme.kind)};
        for (int c = 0; c < texts.size(); ++c) {
            auto *item = m_factors->item(f, c);
            if (!item) {
                item = new QTableWidgetItem;
                m_factors->setItem(f, c, item);
            }
            item->setText(texts[c]);
            item->setToolTip(c == 0 && f == s.active ? tr("The coding grid and the levels panel edit this factor.") : QString());
        }
    }
    m_factors->resizeColumnToContents(0);
    m_factors->resizeColumnToContents(1);
    m_factors->resizeColumnToContents(3);
    m_factors->setFixedHeight(m_factors->horizontalHeader()->height() + s.factorCount() * m_factors->verticalHeader()->defaultSectionSize() + 4);
    if (m_factors->currentRow() < 0 || m_factors->currentRow() >= s.factorCount())
        m_factors->selectRow(s.active);
}

void DesignPanel::fillTerms()
{
    const Design &d = m_document->design();
    const DesignAnalysis &da = m_document->designAnalysis();
    const Analysis &a = da.analysis;
    const int off = coefficientOffset(a);
    const std::vector<Term> candidates = candidateTerms(int(d.factors.size()));
    // Items are updated in place: a tick's own itemChanged signal may be what led here.
    if (m_terms->topLevelItemCount() != int(candidates.size())) {
        m_terms->clear();
        for (size_t c = 0; c < candidates.size(); ++c) {
            auto *item = new QTreeWidgetItem(m_terms);
            item->setFlags(Qt::ItemIsEnabled | Qt::ItemIsUserCheckable);
            item->setData(0, kCandidateRole, int(c));
        }
    }
    QTreeWidgetItem *current = nullptr;
    int rows = 0;
    for (size_t c = 0; c < candidates.size(); ++c) {
        const Term &t = candidates[c];
        QTreeWidgetItem *item = m_terms->topLevelItem(int(c));
        while (item->childCount() > 0)
            delete item->takeChild(0);
        const auto found = std::find_if(d.terms.begin(), d.terms.end(), [&](const Term &x) { return sameTerm(x, t); });
        const bool included = found != d.terms.end();
        item->setText(0, termName(d, t));
        item->setCheckState(0, included ? Qt::Checked : Qt::Unchecked);
        item->setForeground(0, included ? palette().color(QPalette::Text) : look::quietText());
        item->setToolTip(0, t.within < 0 ? QString()
                                         : tr("An alternative to %1 and its interaction with %2: the contrasts of %1 within each level of %2.")
                                               .arg(termName(d, Term{t.factors, -1}), d.factors[size_t(t.within)].factor.name));
        ++rows;
        if (!included)
            continue;
        const int termIndex = int(found - d.terms.begin());
        for (int j = 0; j < int(da.columnTerm.size()); ++j) {
            if (da.columnTerm[size_t(j)] != termIndex)
                continue;
            auto *child = new QTreeWidgetItem(item, {coefficientLabel(a.intercept, j + off, da.cellScheme.columns[size_t(j)].name)});
            child->setData(0, kColumnRole, j);
            child->setToolTip(0, tr("Show this column's weights over the cells"));
            ++rows;
            if (j == m_column)
                current = child;
        }
    }
    m_terms->expandAll();
    if (current)
        m_terms->setCurrentItem(current);
    const int hinted = m_terms->sizeHintForRow(0);
    const int rowHeight = hinted > 0 ? hinted : m_terms->fontMetrics().height() + 2;
    m_terms->setFixedHeight(std::min(rows, 16) * rowHeight + 2 * m_terms->frameWidth() + 2);
}

void DesignPanel::fillCellSizes()
{
    const Design &d = m_document->design();
    const QStringList cells = d.cellNames();
    const Scheme &first = d.factors[0];
    const int rows = first.levelCount();
    const int cols = d.cellCount() / std::max(1, rows);
    m_cellN->setRowCount(rows);
    m_cellN->setColumnCount(cols);
    m_cellN->setVerticalHeaderLabels(first.factor.levels);
    QStringList columnTitles;
    for (int c = 0; c < cols; ++c)
        columnTitles << cells[c].mid(first.factor.levels.value(0).size() + cellJoiner().size());
    m_cellN->setHorizontalHeaderLabels(columnTitles);
    const QStringList empty = m_document->designAnalysis().emptyCells;
    for (int r = 0; r < rows; ++r)
        for (int c = 0; c < cols; ++c) {
            const int cell = r * cols + c;
            auto *item = m_cellN->item(r, c);
            if (!item) {
                item = new QTableWidgetItem;
                m_cellN->setItem(r, c, item);
            }
            item->setTextAlignment(Qt::AlignCenter);
            if (d.cellN.empty()) {
                item->setText(u"1"_s);
                item->setForeground(look::quietText());
                item->setToolTip(tr("Equal sizes (none given); type a number to plan this cell."));
                item->setBackground(QBrush());
            } else {
                const bool isEmpty = empty.contains(cells[cell]);
                item->setText((isEmpty ? look::mark(look::State::Problem) + u" "_s : QString()) + rationalToString(d.cellN[size_t(cell)]));
                item->setForeground(isEmpty ? look::ink(look::State::Problem) : palette().color(QPalette::Text));
                item->setBackground(isEmpty ? QBrush(look::tint(look::State::Problem)) : QBrush());
                item->setToolTip(isEmpty ? tr("An empty cell: no observations planned for %1.").arg(cells[cell]) : cells[cell]);
            }
        }
    m_cellN->resizeColumnsToContents();
    m_cellN->setFixedHeight(m_cellN->horizontalHeader()->height() + rows * m_cellN->verticalHeader()->defaultSectionSize() + 4);
    look::setText(m_cellNote, m_document->study().cellSizeNote.isEmpty()
                                  ? (d.cellN.empty() ? tr("Equal sizes in every cell.") : QString())
                                  : look::mark(look::State::Caution) + u" "_s + m_document->study().cellSizeNote);
    m_equal->setEnabled(!d.cellN.empty());
}

void DesignPanel::fillPicture()
{
    const Design &d = m_document->design();
    const DesignAnalysis &da = m_document->designAnalysis();
    const Analysis &a = da.analysis;
    const int off = coefficientOffset(a);
    const int row = m_column + off;
    if (a.hypotheses.empty() || m_column >= a.columnCount || size_t(row) >= a.hypotheses.size()) {
        m_picture->clear();
        look::setText(m_columnTitle, tr("Hypothesis over the cells"));
        look::setText(m_hypothesis, a.columnCount == 0 ? tr("No columns to show: see the findings below.")
                                                       : tr("No hypotheses: the design's columns are not identifiable (see the findings below)."));
        return;
    }
    CellPicture::Content c;
    c.rowFactor = d.factors[0].factor.name;
    c.rows = d.factors[0].factor.levels;
    c.columnFactor = d.factors[1].factor.name;
    c.columns = d.factors[1].factor.levels;
    if (d.factors.size() > 2) {
        c.blockFactor = d.factors[2].factor.name;
        c.blocks = d.factors[2].factor.levels;
    }
    c.weights = a.hypotheses[size_t(row)];
    m_picture->setContent(std::move(c));
    const QString term = da.termNames.value(da.columnTerm[size_t(m_column)]);
    look::setText(m_columnTitle, tr("b%1 over the cells \u2014 %2 (term %3)").arg(row).arg(da.cellScheme.columns[size_t(m_column)].name, term));
    look::setText(m_hypothesis, u"%1\n%2"_s.arg(a.hypothesisSymbols.value(row), capitalised(a.hypothesisWords.value(row))));
}

void DesignPanel::fillFindings()
{
    const DesignAnalysis &da = m_document->designAnalysis();
    const Analysis &a = da.analysis;
    std::vector<Finding> findings = a.findings;
    std::stable_sort(findings.begin(), findings.end(),
                     [](const Finding &x, const Finding &y) { return static_cast<int>(x.severity) > static_cast<int>(y.severity); });
    QStringList lines;
    auto line = [&](look::State state, const QString &text) {
        const QString mark = state == look::State::Neutral ? u"i"_s : look::mark(state);
        lines << u"<div style=\"color:%1\">%2 %3</div>"_s.arg(look::ink(state).name(), mark, capitalised(text).toHtmlEscaped());
    };
    for (const Finding &f : findings)
        line(look::ofSeverity(f.severity), f.message);
    if (findings.empty())
        line(look::State::Good, tr("nothing to flag in the design's columns"));

    // Blocks of columns (terms): orthogonal to each other under the planned cell n?
    QStringList blocks;
    const auto &to = da.termsOrthogonalInDesign;
    for (size_t t = 0; t < to.size(); ++t)
        for (size_t u = t + 1; u < to.size(); ++u)
            blocks << u"%1 %2 \u2013 %3"_s.arg(look::mark(to[t][u] ? look::State::Good : look::State::Problem), da.termNames.value(qsizetype(t)),
                                               da.termNames.value(qsizetype(u)));
    if (!blocks.isEmpty())
        lines << u"<div>%1 %2</div>"_s.arg(tr("Terms orthogonal under the cell n:").toHtmlEscaped(), blocks.join(u", &nbsp;"_s).toHtmlEscaped().replace(u"&amp;nbsp;"_s, u"&nbsp;"_s));
    QStringList vifs;
    const int off = coefficientOffset(a);
    for (size_t j = 0; j < a.vif.size(); ++j)
        if (a.vif[j])
            vifs << u"b%1 %2"_s.arg(int(j) + off).arg(QString::number(*a.vif[j], 'f', 2));
    if (!vifs.isEmpty())
        lines << u"<div>%1 %2</div>"_s.arg(tr("VIF:"), vifs.join(u", "_s).toHtmlEscaped());
    if (a.conditionNumber)
        lines << u"<div>%1 %2</div>"_s.arg(tr("Condition number:"), QString::number(*a.conditionNumber, 'f', 2));
    else if (a.columnCount > 0)
        lines << u"<div>%1</div>"_s.arg(tr("Condition number: none (the columns are not independent)"));
    look::setText(m_findings, lines.join(QString()));
}

void DesignPanel::selectColumn(int column)
{
    if (column == m_column)
        return;
    m_column = column;
    if (!m_document->isDesign())
        return;
    m_filling = true;
    fillPicture();
    for (QTreeWidgetItemIterator it(m_terms); *it; ++it)
        if ((*it)->data(0, kColumnRole).isValid() && (*it)->data(0, kColumnRole).toInt() == column)
            m_terms->setCurrentItem(*it);
    m_filling = false;
}

QString DesignPanel::hypothesisText() const
{
    return m_hypothesis->text();
}

QString DesignPanel::findingsText() const
{
    QString plain = m_findings->text();
    plain.replace(u"</div>"_s, u"\n"_s).replace(u"&nbsp;"_s, u" "_s);
    static const QRegularExpression tags(u"<[^>]*>"_s);
    plain.remove(tags);
    return plain.replace(u"&amp;"_s, u"&"_s).replace(u"&lt;"_s, u"<"_s).replace(u"&gt;"_s, u">"_s).replace(u"&quot;"_s, u"\""_s);
}

QString DesignPanel::cellSizeNote() const
{
    return m_cellNote->text();
}

void DesignPanel::addFactor()
{
    auto next = withFactorAdded(m_document->study());
    if (!next) {
        emit message(next.error());
        return;
    }
    m_document->editStudy(next.take(), tr("Add a factor"));
}

void DesignPanel::removeFactor()
{
    const int row = m_factors->currentRow();
    auto next = withFactorRemoved(m_document->study(), row);
    if (!next) {
        emit message(next.error());
        return;
    }
    m_document->editStudy(next.take(), tr("Remove factor %1").arg(m_document->design().factors[size_t(row)].factor.name));
}

void DesignPanel::makeActive(int factor)
{
    if (factor == m_document->study().active)
        return;
    auto next = withActiveFactor(m_document->study(), factor);
    if (!next) {
        emit message(next.error());
        return;
    }
    // Which factor the grid edits is a choice of view, not an edit: the study is swapped in
    // without an undo step, so the document stays as modified as it was. (A later undo brings
    // back the factor that step was made on, with its study.)
    m_document->exchangeStudy(next.take());
}

void DesignPanel::termToggled(QTreeWidgetItem *item)
{
    if (m_filling || !item->data(0, kCandidateRole).isValid())
        return;
    const std::vector<Term> candidates = candidateTerms(m_document->study().factorCount());
    const Term &t = candidates[size_t(item->data(0, kCandidateRole).toInt())];
    const bool include = item->checkState(0) == Qt::Checked;
    auto next = withTerm(m_document->study(), t, include);
    if (!next) {
        emit message(next.error());
        QMetaObject::invokeMethod(this, &DesignPanel::follow, Qt::QueuedConnection); // put the tick back
        return;
    }
    const QString name = termName(m_document->design(), t);
    m_document->editStudy(next.take(), include ? tr("Include term %1").arg(name) : tr("Leave out term %1").arg(name));
}

void DesignPanel::cellSizeTyped(QTableWidgetItem *item)
{
    if (m_filling)
        return;
    const int cols = m_cellN->columnCount();
    const int cell = item->row() * cols + item->column();
    QString text = item->text();
    text.remove(look::mark(look::State::Problem));
    auto next = withCellSize(m_document->study(), cell, text.trimmed());
    if (!next) {
        emit message(next.error());
        QMetaObject::invokeMethod(this, &DesignPanel::follow, Qt::QueuedConnection);
        return;
    }
    m_document->editStudy(next.take(), tr("Cell size"), MergeId::CellSize, QString::number(cell));
}

} // namespace cb
