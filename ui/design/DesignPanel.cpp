#include "ui/design/DesignPanel.h"
#include "core/analysis/DesignAnalysis.h"
#include "ui/common/WrapLabel.h"

#include "ui/design/CellPicture.h"
#include "ui/design/TermModel.h"
#include "ui/document/Document.h"
#include "ui/common/CellTable.h"
#include "ui/common/Look.h"

#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QPushButton>
#include <QRegularExpression>
#include <QTableView>
#include <QTreeView>
#include <QVBoxLayout>

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

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
    , m_factors(new CellTableModel({u"\u270e"_s, tr("Factor"), tr("Levels"), tr("Coding")}, this))
    , m_factorView(new QTableView(this))
    , m_add(new QPushButton(tr("Add a factor"), this))
    , m_remove(new QPushButton(tr("Remove"), this))
    , m_activate(new QPushButton(tr("Edit in the grid"), this))
    , m_terms(new TermModel(this))
    , m_termView(new QTreeView(m_designPart))
    , m_cellN(new CellTableModel({}, this))
    , m_cellView(new QTableView(m_designPart))
    , m_equal(new QPushButton(tr("Equal sizes"), m_designPart))
    , m_cellNote(look::note(QString(), m_designPart))
    , m_columnTitle(look::caption(QString(), m_designPart))
    , m_picture(new CellPicture(m_designPart))
    , m_hypothesis(new WrapLabel(m_designPart))
    , m_findings(new WrapLabel(m_designPart))
{
    setObjectName(u"designPanel"_s);
    buildFactorPart();
    buildDesignPart();
    connect(m_document, &Document::changed, this, &DesignPanel::follow);
    follow();
}

// The factors, with the buttons that add, remove and choose one.
void DesignPanel::buildFactorPart()
{
    auto *layout = new QVBoxLayout(this);
    layout->addWidget(look::caption(tr("Factors"), this));
    layout->addWidget(m_intro);
    m_factorView->setObjectName(u"designFactors"_s);
    m_factorView->setModel(m_factors);
    m_factorView->verticalHeader()->hide();
    m_factorView->setSelectionBehavior(QAbstractItemView::SelectRows);
    m_factorView->setSelectionMode(QAbstractItemView::SingleSelection);
    m_factorView->setEditTriggers(QAbstractItemView::NoEditTriggers);
    m_factorView->horizontalHeader()->setSectionResizeMode(2, QHeaderView::Stretch);
    m_factorView->setToolTip(tr("Double-click a factor to edit its levels and coding in the grid."));
    layout->addWidget(m_factorView);
    auto *buttons = new QHBoxLayout;
    buttons->addWidget(m_add);
    buttons->addWidget(m_remove);
    buttons->addWidget(m_activate);
    buttons->addStretch(1);
    layout->addLayout(buttons);
    m_add->setToolTip(tr("Cross the study with another factor (two levels coded +1/2 and \u22121/2; rename and recode it in the grid)."));
    connect(m_add, &QPushButton::clicked, this, &DesignPanel::addFactor);
    connect(m_remove, &QPushButton::clicked, this, &DesignPanel::removeFactor);
    connect(m_activate, &QPushButton::clicked, this, [this] { makeActive(m_factorView->currentIndex().row()); });
    connect(m_factorView, &QTableView::doubleClicked, this, [this](const QModelIndex &index) { makeActive(index.row()); });
    layout->addWidget(m_designPart);
    layout->addStretch(1);
}

// Shown for a design: its terms and columns, the picture of one column, the cell sizes, the findings.
void DesignPanel::buildDesignPart()
{
    auto *design = new QVBoxLayout(m_designPart);
    design->setContentsMargins(0, 0, 0, 0);
    design->addWidget(look::caption(tr("Terms and their columns"), m_designPart));
    m_termView->setObjectName(u"designTerms"_s);
    m_termView->setModel(m_terms);
    m_termView->setHeaderHidden(true);
    m_termView->setRootIsDecorated(true);
    m_termView->setToolTip(tr("Tick the terms of the model; pick a column to see its weights over the cells."));
    design->addWidget(m_termView);
    connect(m_terms, &TermModel::toggled, this, &DesignPanel::termToggled);
    connect(m_termView->selectionModel(), &QItemSelectionModel::currentChanged, this, [this](const QModelIndex &current) {
        if (current.data(TermModel::ColumnRole).isValid())
            selectColumn(current.data(TermModel::ColumnRole).toInt());
    });

    design->addWidget(m_columnTitle);
    design->addWidget(m_picture);
    m_hypothesis->setTextInteractionFlags(Qt::TextSelectableByMouse);
    design->addWidget(m_hypothesis);

    design->addWidget(look::caption(tr("Planned n per cell"), m_designPart));
    m_cellView->setObjectName(u"designCellSizes"_s);
    m_cellView->setModel(m_cellN);
    m_cellView->setToolTip(tr("Type the planned number of observations in each cell; 0 marks an empty cell."));
    design->addWidget(m_cellView);
    auto *sizeRow = new QHBoxLayout;
    sizeRow->addWidget(m_cellNote, 1);
    sizeRow->addWidget(m_equal, 0, Qt::AlignTop);
    design->addLayout(sizeRow);
    connect(m_cellN, &CellTableModel::edited, this,
            [this](int row, int column, const QVariant &text) { cellSizeTyped(row, column, text.toString()); });
    connect(m_equal, &QPushButton::clicked, this, [this] {
        m_document->editStudy(withEqualCellSizes(m_document->study()), tr("Equal cell sizes"));
    });

    design->addWidget(look::caption(tr("Design findings"), m_designPart));
    m_findings->setObjectName(u"designFindings"_s);
    m_findings->setTextFormat(Qt::RichText);
    m_findings->setTextInteractionFlags(Qt::TextSelectableByMouse);
    design->addWidget(m_findings);
}

void DesignPanel::follow()
{
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
}

void DesignPanel::fillFactors()
{
    const Study &s = m_document->study();
    TableRows rows;
    for (int f = 0; f < s.factorCount(); ++f) {
        const Scheme &scheme = s.design.factors[size_t(f)];
        TableCell mark;
        if (f == s.active) {
            mark.text = u"\u270e"_s;
            mark.toolTip = tr("The coding grid and the levels panel edit this factor.");
        }
        rows.push_back({mark, textCell(scheme.factor.name, false),
                         textCell(u"%1: %2"_s.arg(scheme.levelCount()).arg(scheme.factor.levels.join(u", "_s)), false),
                         textCell(schemeTitle(scheme.kind), false)});
    }
    m_factors->setRows(std::move(rows));
    m_factorView->resizeColumnToContents(0);
    m_factorView->resizeColumnToContents(1);
    m_factorView->resizeColumnToContents(3);
    m_factorView->setFixedHeight(m_factorView->horizontalHeader()->height() + s.factorCount() * m_factorView->verticalHeader()->defaultSectionSize() + 4);
    const int current = m_factorView->currentIndex().row();
    if (current < 0 || current >= s.factorCount())
        m_factorView->selectRow(s.active);
}

void DesignPanel::fillTerms()
{
    const Design &d = m_document->design();
    const DesignAnalysis &da = m_document->designAnalysis();
    const Analysis &a = da.analysis;
    const int off = coefficientOffset(a);
    std::vector<TermModel::TermRow> rows;
    for (const Term &t : candidateTerms(int(d.factors.size()))) {
        TermModel::TermRow row;
        const auto found = std::find_if(d.terms.begin(), d.terms.end(), [&](const Term &x) { return sameTerm(x, t); });
        row.included = found != d.terms.end();
        row.name = termName(d, t);
        if (t.within >= 0)
            row.toolTip = tr("An alternative to %1 and its interaction with %2: the contrasts of %1 within each level of %2.")
                              .arg(termName(d, Term{t.factors, -1}), d.factors[size_t(t.within)].factor.name);
        if (row.included) {
            const int termIndex = int(found - d.terms.begin());
            for (int j = 0; j < int(da.columnTerm.size()); ++j)
                if (da.columnTerm[size_t(j)] == termIndex)
                    row.columns.push_back({coefficientLabel(a.intercept, j + off, da.cellScheme.columns[size_t(j)].name), j});
        }
        rows.push_back(std::move(row));
    }
    m_terms->setTerms(std::move(rows));
    m_termView->expandAll();
    if (const QModelIndex current = m_terms->indexOfColumn(m_column); current.isValid())
        m_termView->setCurrentIndex(current);
    const int hinted = m_termView->sizeHintForRow(0);
    const int rowHeight = hinted > 0 ? hinted : m_termView->fontMetrics().height() + 2;
    m_termView->setFixedHeight(std::min(m_terms->rowsShown(), 16) * rowHeight + 2 * m_termView->frameWidth() + 2);
}

void DesignPanel::fillCellSizes()
{
    const Design &d = m_document->design();
    const QStringList cells = d.cellNames();
    const Scheme &first = d.factors[0];
    const int rows = first.levelCount();
    const int cols = d.cellCount() / std::max(1, rows);
    QStringList columnTitles;
    for (int c = 0; c < cols; ++c)
        columnTitles << cells[c].mid(first.factor.levels.value(0).size() + cellJoiner().size());
    m_cellN->setHeaders(columnTitles);
    m_cellN->setRowHeaders(first.factor.levels);
    const DesignAnalysis &da = m_document->designAnalysis();
    const QStringList empty = da.emptyCells;
    // An empty cell is a problem only when the terms cannot be estimated without it.
    const look::State emptyState = da.empty.estimable ? look::State::Caution : look::State::Problem;
    TableRows table(static_cast<size_t>(rows));
    for (int r = 0; r < rows; ++r)
        for (int c = 0; c < cols; ++c) {
            const int cell = r * cols + c;
            TableCell item;
            item.centred = true;
            item.editable = true;
            if (d.cellN.empty()) {
                item.text = u"1"_s;
                item.ink = look::quietText();
                item.toolTip = tr("Equal sizes (none given); type a number to plan this cell.");
            } else {
                const bool isEmpty = empty.contains(cells[cell]);
                item.text = (isEmpty ? look::mark(emptyState) + u" "_s : QString()) + rationalToString(d.cellN[size_t(cell)]);
                if (isEmpty) {
                    item.ink = look::ink(emptyState);
                    item.background = look::tint(emptyState);
                }
                item.toolTip = !isEmpty ? cells[cell]
                    : da.empty.estimable
                    ? tr("An empty cell: no observations planned for %1. The design is analysed over the other cells; the findings say "
                         "which hypotheses change.").arg(cells[cell])
                    : tr("An empty cell: no observations planned for %1. The terms cannot be estimated without it (see the findings).")
                          .arg(cells[cell]);
            }
            table[size_t(r)].push_back(std::move(item));
        }
    m_cellN->setRows(std::move(table));
    m_cellView->resizeColumnsToContents();
    m_cellView->setFixedHeight(m_cellView->horizontalHeader()->height() + rows * m_cellView->verticalHeader()->defaultSectionSize() + 4);
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
        look::setText(m_hypothesis, a.columnCount == 0 && da.empty.estimable ? tr("No columns to show: see the findings below.")
                                    : !da.empty.estimable ? tr("No hypotheses: the terms cannot be estimated without the empty cells (see the findings below).")
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
    c.weights = da.rowOverCells(row);
    for (const QString &cell : da.cells)
        c.empty.push_back(da.emptyCells.contains(cell));
    m_picture->setContent(std::move(c));
    const QString term = da.termNames.value(da.columnTerm[size_t(m_column)]);
    look::setText(m_columnTitle, tr("b%1 over the cells \u2014 %2 (term %3)").arg(row).arg(da.cellScheme.columns[size_t(m_column)].name, term));
    QString text = u"%1\n%2"_s.arg(a.hypothesisSymbols.value(row), capitalised(a.hypothesisWords.value(row)));
    for (const HypothesisShift &shift : da.empty.shifts)
        if (shift.coefficient == row)
            text += u"\n"_s + look::mark(look::State::Caution) + u" "_s
                + tr("Without %1: %2").arg(da.emptyCells.join(u", "_s), shift.words);
    look::setText(m_hypothesis, text);
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
    if (!da.empty.summary.isEmpty())
        line(da.empty.shifts.empty() ? look::State::Good : look::State::Caution, da.empty.summary);
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
    fillPicture();
    if (const QModelIndex current = m_terms->indexOfColumn(column); current.isValid())
        m_termView->setCurrentIndex(current);
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
    const int row = m_factorView->currentIndex().row();
    auto next = withFactorRemoved(m_document->study(), row);
    if (!next) {
        emit message(next.error());
        return;
    }
    m_document->editStudy(next.take(), tr("Remove factor %1").arg(m_document->design().factors[size_t(row)].factor.name));
}

void DesignPanel::makeActive(int factor)
{
    if (const Problem problem = m_document->setActiveFactor(factor); !problem.isEmpty())
        emit message(problem.message);
}

void DesignPanel::termToggled(int term, bool include)
{
    const std::vector<Term> candidates = candidateTerms(m_document->study().factorCount());
    if (term < 0 || term >= int(candidates.size()))
        return;
    const Term &t = candidates[size_t(term)];
    auto next = withTerm(m_document->study(), t, include);
    if (!next) {
        emit message(next.error()); // the tick stays as the design has it
        return;
    }
    const QString name = termName(m_document->design(), t);
    m_document->editStudy(next.take(), include ? tr("Include term %1").arg(name) : tr("Leave out term %1").arg(name));
}

void DesignPanel::cellSizeTyped(int row, int column, QString text)
{
    const int cell = row * m_cellN->columnCount() + column;
    text.remove(look::mark(look::State::Problem));
    auto next = withCellSize(m_document->study(), cell, text.trimmed());
    if (!next) {
        emit message(next.error()); // the table still shows the size as it was
        return;
    }
    m_document->editStudy(next.take(), tr("Cell size"), MergeId::CellSize, QString::number(cell));
}

} // namespace cb
