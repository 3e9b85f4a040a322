#include "ui/power/PowerPanel.h"
#include "ui/common/WrapLabel.h"

#include "core/base/NumberText.h"
#include "core/power/MixedPower.h"
#include "core/power/PowerPlanSettings.h"
#include "ui/document/Document.h"
#include "ui/common/CellTable.h"
#include "ui/common/EntryTableView.h"
#include "ui/common/Look.h"
#include "ui/common/SmallChart.h"

#include <QCheckBox>
#include <QComboBox>
#include <QCoreApplication>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QPlainTextEdit>
#include <QScopedValueRollback>
#include <QShowEvent>
#include <QSignalBlocker>
#include <QTableView>
#include <QTimer>
#include <QVBoxLayout>

#include <algorithm>
#include <tuple>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// The plan's text that a column of the input table shows.
QString PowerPlanLevel::*typedIn(int column)
{
    return column == PowerPanel::ExpectedColumn ? &PowerPlanLevel::expected
           : column == PowerPanel::SdColumn     ? &PowerPlanLevel::sd
                                                : &PowerPlanLevel::ratio;
}

QString dash()
{
    return kMissingMark.toString();
}

QString number(double v, int digits = 4)
{
    return std::isfinite(v) ? numberText(v, digits) : dash();
}

QString sizesText(const SampleSize &size, bool within)
{
    if (!size.reachable || size.perLevel.empty())
        return dash();
    if (within)
        return QCoreApplication::translate("cb::PowerPanel", "%1 participants").arg(size.total);
    const bool equal = std::all_of(size.perLevel.begin(), size.perLevel.end(), [&](long long n) { return n == size.perLevel.front(); });
    if (equal)
        return QCoreApplication::translate("cb::PowerPanel", "%1 each").arg(size.perLevel.front());
    QStringList parts;
    for (long long n : size.perLevel)
        parts << QString::number(n);
    return parts.join(u", "_s);
}

// The note under which a problem of a field shows: the per-level fields share the table's.
QString noteOf(const QString &field)
{
    if (field == u"sd"_s || field == u"total"_s || field == u"alpha"_s || field == u"target"_s || field == u"correlation"_s
        || field == u"correlations"_s)
        return field;
    if (field == u"means"_s || field == u"sds"_s || field == u"n"_s || field == u"ratios"_s || field == u"levels"_s)
        return u"levels"_s;
    return {};
}

QLabel *fieldNote(QWidget *parent)
{
    auto *l = new WrapLabel(parent);
    l->setStyleSheet(u"QLabel { color: %1; }"_s.arg(look::ink(look::State::Problem).name()));
    l->hide();
    return l;
}

TableCell cell(const QString &text, bool numeric = true)
{
    return textCell(text, numeric);
}

TableCell quietCell(const QString &text)
{
    TableCell c = cell(text);
    c.ink = look::quietText();
    return c;
}

TableCell entryCell(const QString &text)
{
    TableCell c = cell(text);
    c.editable = true;
    return c;
}

} // namespace

PowerPanel::PowerPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_inputs(new CellTableModel({tr("Level"), tr("Expected mean"), tr("SD"), tr("Planned n"), tr("Ratio")}, this))
    , m_inputView(new EntryTableView(this))
    , m_expectedKind(new QComboBox(this))
    , m_baseline(new QComboBox(this))
    , m_sd(new QLineEdit(u"1"_s, this))
    , m_perLevelSd(new QCheckBox(tr("per level (Welch df)"), this))
    , m_sizeSource(new QComboBox(this))
    , m_total(new QLineEdit(this))
    , m_correlation(new QLineEdit(this))
    , m_fullMatrix(new QCheckBox(tr("full matrix"), this))
    , m_correlations(new QPlainTextEdit(this))
    , m_alpha(new QLineEdit(u"0.05"_s, this))
    , m_sided(new QComboBox(this))
    , m_target(new QLineEdit(u"0.8"_s, this))
    , m_adjustment(new QComboBox(this))
    , m_general(fieldNote(this))
    , m_results(new CellTableModel({tr("Test"), tr("Power at plan"), tr("n/level for target"), tr("Total N"), tr("Estimate \u03c8"),
                                    tr("SE"), tr("Std. eff."), tr("df"), tr("vs F test")},
                                   this))
    , m_resultView(new QTableView(this))
    , m_notes(look::note({}, this))
    , m_chart(new SmallChart(this))
{
    setObjectName(u"powerPanel"_s);
    buildTables();
    // Inputs on the left (the levels table, then the settings), results in the middle, curves on the right.
    auto *layout = new QHBoxLayout(this);
    m_columns = layout;
    layout->setContentsMargins(6, 4, 6, 4);
    layout->addLayout(buildInputForm(), 3);
    // Within participants the correlations get a column of their own, in sight without scrolling
    // on a laptop screen (below the other settings they fell out of the dock's view).
    layout->addWidget(buildCorrelationColumn(), 2);
    layout->addLayout(buildResultColumn(), 7);
    layout->addWidget(m_chart, 4);
    connectInputs();
    followDocument();
    recompute();
}

void PowerPanel::buildTables()
{
    m_inputView->setObjectName(u"powerInputs"_s);
    m_inputView->setModel(m_inputs);
    m_inputView->verticalHeader()->hide();
    m_inputView->verticalHeader()->setDefaultSectionSize(22);
    m_inputView->horizontalHeader()->setSectionResizeMode(QHeaderView::Stretch);
    m_resultView->setObjectName(u"powerResults"_s);
    m_resultView->setModel(m_results);
    setUpResultTable(m_resultView);
    m_resultView->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    m_resultView->horizontalHeader()->setStretchLastSection(true);
    m_resultView->horizontalHeader()->setMinimumSectionSize(48);
    m_resultView->setSelectionMode(QAbstractItemView::NoSelection);
    m_chart->setObjectName(u"powerCurve"_s);
    m_chart->setAxisTitles(tr("size of the smallest group"), tr("power"));
    m_general->setObjectName(u"powerMessage"_s);
}

// The levels table, then the settings with a message line under each.
QLayout *PowerPanel::buildInputForm()
{
    m_expectedKind->addItems({tr("Means per level"), tr("Differences from a baseline")});
    m_sizeSource->addItems({tr("Planned n of the levels"), tr("Ratios with a total N")});
    m_sided->addItems({tr("Two-sided"), tr("One-sided (\u03c8 > 0 as written)")});
    for (Adjustment a : {Adjustment::None, Adjustment::Bonferroni, Adjustment::Sidak})
        m_adjustment->addItem(adjustmentTitle(a), QVariant::fromValue(int(a)));
    m_total->setPlaceholderText(tr("e.g. 120"));

    auto *form = new QFormLayout;
    form->setFieldGrowthPolicy(QFormLayout::AllNonFixedFieldsGrow);
    const auto addField = [&](const QString &text, QWidget *field, const QString &key) { return addFormField(form, text, field, key); };
    const auto row = [this](QWidget *a, QWidget *b, int bStretch) { return sideBySide(a, b, bStretch); };
    addField(tr("Expected values:"), row(m_expectedKind, m_baseline, 1), {});
    addField(tr("Common SD:"), row(m_sd, m_perLevelSd, 0), u"sd"_s);
    m_sizeSourceLabel = addField(tr("Group sizes:"), m_sizeSource, {});
    m_totalLabel = addField(tr("Total N:"), m_total, u"total"_s);
    m_form = form;
    addField(tr("Alpha (family):"), m_alpha, u"alpha"_s);
    addField(tr("Direction:"), m_sided, {});
    addField(tr("Target power:"), m_target, u"target"_s);
    addField(tr("Adjustment:"), m_adjustment, {});
    QLabel *levelsNote = fieldNote(this);
    levelsNote->setObjectName(u"levelsMessage"_s);
    m_fieldNotes.insert(u"levels"_s, levelsNote);

    auto *left = new QVBoxLayout;
    left->addWidget(m_inputView, 1);
    left->addWidget(levelsNote);
    left->addLayout(form);
    return left;
}

// A field of a settings form with its label, and under it the note where a problem of that field
// (key) shows.
QLabel *PowerPanel::addFormField(QFormLayout *form, const QString &text, QWidget *field, const QString &key)
{
    auto *label = new QLabel(text, this);
    auto *box = new QVBoxLayout;
    box->setSpacing(1);
    box->addWidget(field);
    if (!key.isEmpty()) {
        QLabel *note = fieldNote(this);
        note->setObjectName(key + u"Message"_s);
        m_fieldNotes.insert(key, note);
        box->addWidget(note);
    }
    form->addRow(label, box);
    return label;
}

QWidget *PowerPanel::sideBySide(QWidget *a, QWidget *b, int bStretch)
{
    auto *w = new QWidget(this);
    auto *l = new QHBoxLayout(w);
    l->setContentsMargins(0, 0, 0, 0);
    l->addWidget(a, 1);
    l->addWidget(b, bStretch);
    return w;
}

// Within participants: one common correlation, or the full matrix typed or pasted, and the
// caution that it is usually a guess.
QWidget *PowerPanel::buildCorrelationColumn()
{
    m_correlation->setObjectName(u"powerCorrelation"_s);
    m_correlation->setPlaceholderText(tr("e.g. 0.5"));
    m_correlation->setToolTip(tr("How strongly a participant's values at two levels go together (from -1 to 1): the same "
                                 "correlation for every two levels"));
    m_fullMatrix->setObjectName(u"powerFullMatrix"_s);
    m_fullMatrix->setToolTip(tr("Give every two levels their own correlation: a k × k matrix, symmetric, with ones on "
                                "the diagonal"));
    m_correlations->setObjectName(u"powerCorrelations"_s);
    m_correlations->setPlaceholderText(tr("one row per level, e.g.\n1, 0.6, 0.4\n0.6, 1, 0.5\n0.4, 0.5, 1"));
    m_correlations->setToolTip(tr("The correlations of a participant's values at every two levels, one row per level in the "
                                  "levels' order: type them or paste them from a spreadsheet (commas, semicolons, tabs or "
                                  "spaces between values)"));
    m_correlations->setTabChangesFocus(true);
    m_correlations->setLineWrapMode(QPlainTextEdit::NoWrap);

    m_correlationColumn = new QWidget(this);
    m_correlationColumn->setObjectName(u"powerCorrelationColumn"_s);
    auto *column = new QVBoxLayout(m_correlationColumn);
    column->setContentsMargins(0, 0, 0, 0);
    column->setSpacing(2);
    auto *form = new QFormLayout;
    form->setContentsMargins(0, 0, 0, 0);
    form->setFieldGrowthPolicy(QFormLayout::AllNonFixedFieldsGrow);
    addFormField(form, tr("Correlation:"), sideBySide(m_correlation, m_fullMatrix, 0), u"correlation"_s);
    column->addLayout(form);
    // Up to five rows in sight (the dock is short on a laptop screen); a larger matrix scrolls.
    m_correlations->setFixedHeight(5 * fontMetrics().lineSpacing() + 12);
    column->addWidget(m_correlations);
    QLabel *note = fieldNote(this);
    note->setObjectName(u"correlationsMessage"_s);
    m_fieldNotes.insert(u"correlations"_s, note);
    column->addWidget(note);
    // Within participants the correlation is usually a guess: said beside it, always.
    auto *caution = look::note(look::mark(look::State::Caution) + u" "_s
                                   + tr("Usually a guess, and power changes much with it: try a few values."),
                               this);
    caution->setToolTip(tr("The correlation is usually a guess: power changes much with it. Try a few values, or take it "
                           "from earlier data."));
    caution->setObjectName(u"correlationCaution"_s);
    caution->setStyleSheet(u"QLabel { color: %1; }"_s.arg(look::ink(look::State::Caution).name()));
    column->addWidget(caution);
    column->addStretch(1);
    return m_correlationColumn;
}

// The message, the results, their notes and the cautions.
QLayout *PowerPanel::buildResultColumn()
{
    m_cautions = look::note({}, this);
    m_cautions->setObjectName(u"powerCautions"_s);
    m_cautions->setTextFormat(Qt::RichText);
    m_withinWhy = look::note({}, this);
    m_withinWhy->setObjectName(u"withinExplanation"_s);
    auto *middle = new QVBoxLayout;
    middle->addWidget(m_general);
    middle->addWidget(m_resultView, 2);
    middle->addWidget(m_withinWhy);
    middle->addWidget(m_notes);
    middle->addWidget(m_cautions);
    return middle;
}

// Every input is the study's power plan: an edit goes to the document as one undoable step
// (typing into one field folds into one), and followDocument shows the plan back.
void PowerPanel::connectInputs()
{
    connect(m_inputs, &CellTableModel::edited, this,
            [this](int row, int column, const QVariant &value) { inputEdited(row, column, value.toString()); });
    const std::tuple<QLineEdit *, QString PowerPlan::*, QString> texts[] = {
        {m_sd, &PowerPlan::sd, u"sd"_s},          {m_total, &PowerPlan::total, u"total"_s},
        {m_alpha, &PowerPlan::alpha, u"alpha"_s}, {m_target, &PowerPlan::target, u"target"_s},
        {m_correlation, &PowerPlan::correlation, u"correlation"_s}};
    for (const auto &[edit, member, key] : texts)
        connect(edit, &QLineEdit::textChanged, this,
                [this, member, key](const QString &text) { editPlan([&](PowerPlan &plan) { plan.*member = text; }, key); });
    connect(m_correlations, &QPlainTextEdit::textChanged, this,
            [this] { editPlan([this](PowerPlan &plan) { plan.correlations = m_correlations->toPlainText(); }, u"correlations"_s); });
    connect(m_fullMatrix, &QCheckBox::toggled, this, [this](bool full) {
        editPlan([&](PowerPlan &plan) {
            plan.fullMatrix = full;
            // The matrix starts from the common correlation, for the analyst to change what differs.
            const QString r = plan.correlation.trimmed();
            if (const Result<Weight> w = parseWeight(r); full && plan.correlations.trimmed().isEmpty() && w && std::abs(w->value()) <= 1.0) {
                const int k = int(factor().levels.size());
                QStringList lines;
                for (int i = 0; i < k; ++i) {
                    QStringList cells;
                    for (int j = 0; j < k; ++j)
                        cells << (i == j ? u"1"_s : r);
                    lines << cells.join(u", "_s);
                }
                plan.correlations = lines.join(u'\n');
            }
        });
    });
    connect(m_sided, &QComboBox::currentIndexChanged, this, [this](int i) { editPlan([&](PowerPlan &plan) { plan.oneSided = i == 1; }); });
    connect(m_adjustment, &QComboBox::currentIndexChanged, this,
            [this] { editPlan([this](PowerPlan &plan) { plan.adjustment = adjustmentId(Adjustment(m_adjustment->currentData().toInt())); }); });
    connect(m_baseline, &QComboBox::currentIndexChanged, this, [this](int i) {
        editPlan([&](PowerPlan &plan) { plan.baseline = i >= 0 && i < m_levels.size() ? m_levels[i] : QString(); });
    });
    connect(m_expectedKind, &QComboBox::currentIndexChanged, this,
            [this](int i) { editPlan([&](PowerPlan &plan) { plan.differences = i == 1; }); });
    connect(m_perLevelSd, &QCheckBox::toggled, this, [this](bool on) { editPlan([&](PowerPlan &plan) { plan.perLevelSd = on; }); });
    connect(m_sizeSource, &QComboBox::currentIndexChanged, this, [this](int i) {
        editPlan([&](PowerPlan &plan) { plan.sizes = i == 1 ? PowerPlan::Sizes::Ratios : PowerPlan::Sizes::PlannedN; });
    });
    connect(m_document, &Document::changed, this, &PowerPanel::followDocument);
}

void PowerPanel::editPlan(const std::function<void(PowerPlan &)> &change, const QString &key)
{
    if (m_showingPlan)
        return;
    PowerPlan plan = m_document->study().power;
    change(plan);
    m_document->editStudy(withPowerPlan(m_document->study(), std::move(plan)), tr("Edit power plan"),
                          key.isEmpty() ? MergeId::None : MergeId::PowerPlan, key);
}

// For a design, power is per design column over the cell means: the "levels" are the cells,
// their planned n the cell sizes, the contrasts the design's hypothesis rows.
const Factor &PowerPanel::factor() const
{
    return m_document->isDesign() ? m_document->designAnalysis().cellScheme.factor : m_document->scheme().factor;
}

const Analysis &PowerPanel::analysis() const
{
    return m_document->isDesign() ? m_document->designAnalysis().analysis : m_document->analysis();
}

bool PowerPanel::within() const
{
    return mixed() || factor().isWithin();
}

bool PowerPanel::mixed() const
{
    return m_document->isDesign() && hasWithinFactor(m_document->design());
}

void PowerPanel::followDocument()
{
    const Factor &f = factor();
    // Within participants: one number of participants, a correlation, and its caution.
    const bool isWithin = within();
    m_form->setRowVisible(m_sizeSourceLabel, !isWithin);
    m_correlationColumn->setVisible(isWithin);
    // The correlations' column takes its width from the curves, not from the results.
    m_columns->setStretch(3, isWithin ? 1 : 4);
    m_chart->setMinimumWidth(isWithin ? 160 : 0);
    m_totalLabel->setText(isWithin ? tr("Participants:") : tr("Total N:"));
    m_chart->setAxisTitles(mixed() ? tr("smallest group") : isWithin ? tr("participants") : tr("size of the smallest group"),
                           tr("power"));
    m_cautions->setText(u"<b>%1</b><ul style='margin-left:-20px'><li>%2</li></ul>"_s.arg(
        tr("Read with care"), powerCautions(isWithin).join(u"</li><li>"_s)));
    m_results->setHeaders({tr("Test"), tr("Power at plan"),
                           mixed() ? tr("Participants per group for target") : isWithin ? tr("Participants for target") : tr("n/level for target"),
                           isWithin ? tr("Participants") : tr("Total N"), tr("Estimate \u03c8"), tr("SE"), tr("Std. eff."), tr("df"),
                           isWithin ? tr("vs Hotelling") : tr("vs F test")});
    m_levels = f.levels;
    showPlan();
    schedule();
}

// The widgets as the study's power plan says, without an edit of their own.
void PowerPanel::showPlan()
{
    const QScopedValueRollback guard(m_showingPlan, true);
    const PowerPlan &plan = m_document->study().power;
    const auto setText = [](QLineEdit *edit, const QString &text) {
        if (edit->text() != text)
            edit->setText(text);
    };
    setText(m_sd, plan.sd);
    setText(m_total, plan.total);
    setText(m_alpha, plan.alpha);
    setText(m_target, plan.target);
    setText(m_correlation, plan.correlation);
    if (m_correlations->toPlainText() != plan.correlations)
        m_correlations->setPlainText(plan.correlations);
    m_fullMatrix->setChecked(plan.fullMatrix);
    m_perLevelSd->setChecked(plan.perLevelSd);
    m_expectedKind->setCurrentIndex(plan.differences ? 1 : 0);
    m_sided->setCurrentIndex(plan.oneSided ? 1 : 0);
    m_adjustment->setCurrentIndex(std::max(0, m_adjustment->findData(int(adjustmentFromId(plan.adjustment).value_or(Adjustment::None)))));
    m_sizeSource->setCurrentIndex(planUsesRatios(plan, factor()) ? 1 : 0);
    QStringList listed;
    for (int i = 0; i < m_baseline->count(); ++i)
        listed << m_baseline->itemText(i);
    if (listed != m_levels) {
        m_baseline->clear();
        m_baseline->addItems(m_levels);
    }
    m_baseline->setCurrentIndex(std::max(0, int(m_levels.indexOf(plan.baseline))));
    updateCorrelationRows();
    showInputs();
}

bool PowerPanel::differences() const
{
    return m_expectedKind->currentIndex() == 1;
}

// The input table as the plan and the factor say (one row per level).
void PowerPanel::showInputs()
{
    const Factor &f = factor();
    const PowerPlan &plan = m_document->study().power;
    const std::vector<Rational> sizes = f.sizes();
    const bool diff = differences();
    const int baseline = m_baseline->currentIndex();
    TableRows rows;
    rows.reserve(size_t(m_levels.size()));
    for (int r = 0; r < int(m_levels.size()); ++r) {
        const PowerPlanLevel in = plan.levels.value(m_levels[r]);
        const bool isBaseline = diff && r == baseline;
        rows.push_back({cell(m_levels[r], false), isBaseline ? quietCell(tr("0 (baseline)")) : entryCell(in.expected), entryCell(in.sd),
                        quietCell(f.hasPlannedN() && size_t(r) < sizes.size() ? QString::fromStdString(sizes[size_t(r)].get_str()) : dash()),
                        entryCell(in.ratio)});
    }
    m_inputs->setRows(std::move(rows));
    m_inputs->setHeaders({tr("Level"), diff ? tr("Difference from %1").arg(m_baseline->currentText()) : tr("Expected mean"), tr("SD"),
                          within() ? tr("Participants") : tr("Planned n"), tr("Ratio")});
    m_baseline->setVisible(diff);
    updateColumnVisibility();
}

void PowerPanel::inputEdited(int row, int column, const QString &text)
{
    if (row < 0 || row >= int(m_levels.size()))
        return;
    setLevelText(m_levels[row], column, text);
}

void PowerPanel::setLevelText(const QString &level, int column, const QString &text)
{
    editPlan([&](PowerPlan &plan) { plan.levels[level].*typedIn(column) = text; }, u"%1/%2"_s.arg(column).arg(level));
}

void PowerPanel::updateColumnVisibility()
{
    // Within participants the participants come from the factor's planned n or, without it, the field.
    const bool ratios = within() ? !factor().hasPlannedN() : planUsesRatios(m_document->study().power, factor());
    m_inputView->setColumnHidden(SdColumn, !m_perLevelSd->isChecked());
    m_inputView->setColumnHidden(PlannedNColumn, ratios);
    m_inputView->setColumnHidden(RatioColumn, !ratios || within());
    m_sd->setEnabled(!m_perLevelSd->isChecked());
    m_total->setEnabled(ratios);
}

void PowerPanel::schedule()
{
    // In a shown window with this panel out of sight (a tab behind another), the work waits
    // for showEvent: an edit elsewhere costs nothing here.
    if (window()->isVisible() && !isVisible()) {
        m_stale = true;
        return;
    }
    if (m_scheduled)
        return;
    m_scheduled = true;
    QTimer::singleShot(0, this, &PowerPanel::recompute);
}

void PowerPanel::showEvent(QShowEvent *event)
{
    QWidget::showEvent(event);
    if (m_stale)
        schedule();
}

void PowerPanel::setColumnTexts(int column, const QStringList &texts)
{
    editPlan([&](PowerPlan &plan) {
        QString PowerPlanLevel::*member = typedIn(column);
        for (int r = 0; r < int(m_levels.size()) && r < texts.size(); ++r)
            if (column != ExpectedColumn || !(differences() && r == m_baseline->currentIndex()))
                plan.levels[m_levels[r]].*member = texts[r];
    });
}

void PowerPanel::setExpectedTexts(const QStringList &texts)
{
    setColumnTexts(ExpectedColumn, texts);
}

void PowerPanel::setLevelSdTexts(const QStringList &texts)
{
    m_perLevelSd->setChecked(true);
    setColumnTexts(SdColumn, texts);
}

void PowerPanel::setRatioTexts(const QStringList &texts)
{
    setSizeSource(SizeSource::RatiosAndTotal);
    setColumnTexts(RatioColumn, texts);
}

void PowerPanel::setUseDifferences(bool differences, int baseline)
{
    m_baseline->setCurrentIndex(baseline);
    m_expectedKind->setCurrentIndex(differences ? 1 : 0);
}

void PowerPanel::setSizeSource(SizeSource source)
{
    editPlan([&](PowerPlan &plan) { plan.sizes = source == SizeSource::PlannedN ? PowerPlan::Sizes::PlannedN : PowerPlan::Sizes::Ratios; });
}

QString PowerPanel::fieldMessage(const QString &field) const
{
    const QLabel *l = m_fieldNotes.value(field);
    return l && !l->isHidden() ? l->text() : QString();
}

Result<PowerSettings> PowerPanel::settings() const
{
    return settingsFromPlan(m_document->study().power, factor(),
                            mixed() ? std::optional(mixedLayout(m_document->design())) : std::nullopt);
}

// The matrix row only with "full matrix"; the common correlation is then not read.
void PowerPanel::updateCorrelationRows()
{
    m_correlations->setVisible(m_fullMatrix->isChecked());
    m_correlation->setEnabled(!m_fullMatrix->isChecked());
}

void PowerPanel::showMessages(const Problem &problem)
{
    for (QLabel *l : std::as_const(m_fieldNotes))
        l->hide();
    m_general->hide();
    if (problem.isEmpty())
        return;
    QLabel *target = m_fieldNotes.value(noteOf(problem.field), m_general);
    target->setText(look::mark(look::State::Problem) + u" "_s + problem.message);
    target->show();
}

void PowerPanel::recompute()
{
    m_scheduled = false;
    m_stale = false;
    m_report.reset();
    auto fail = [this](const Problem &problem) {
        showMessages(problem);
        m_results->setRows({});
        m_notes->clear();
        m_withinWhy->hide();
        m_chart->clear(tr("The power curves appear once every input is valid."));
    };
    const Result<ContrastRows> rows = contrastRowsOf(analysis());
    if (!rows)
        return fail(rows.problem());
    const Result<PowerSettings> s = settings();
    if (!s)
        return fail(s.problem());
    const Result<PowerReport> report = mixed() ? computeMixedPower(rows->rows, rows->names, *s, m_document->design())
                                               : computePower(rows->rows, rows->names, *s);
    if (!report)
        return fail(report.problem());
    showMessages({});
    showReport(*report, *rows, *s);
    m_report = *report;
}

void PowerPanel::showReport(const PowerReport &report, const ContrastRows &rows, const PowerSettings &settings)
{
    const int m = int(report.contrasts.size());
    auto powerCell = [&](double power) {
        const bool reached = power >= report.target;
        const look::State state = reached ? look::State::Good : look::State::Caution;
        TableCell c = cell(look::mark(state) + u" "_s + QString::number(power, 'f', 3));
        c.ink = look::ink(state);
        c.toolTip = reached ? tr("At or above the target power") : tr("Below the target power");
        return c;
    };
    long long curveUpTo = 10;
    TableRows table;
    table.reserve(size_t(m) + 1);
    for (int i = 0; i < m; ++i) {
        const ContrastPower &c = report.contrasts[size_t(i)];
        TableCell test = cell(c.part.isEmpty() ? c.name : u"%1 [%2]"_s.arg(c.name, c.part), false);
        test.toolTip = c.notes.join(u"\n"_s);
        TableCell versus = cell(c.fewerThanOmnibus ? look::mark(look::State::Good) + tr(" needs fewer") : QString(), false);
        if (c.fewerThanOmnibus)
            versus.ink = look::ink(look::State::Good);
        table.push_back({test, powerCell(c.power), cell(c.zeroEstimate ? tr("\u2014 (\u03c8 = 0)") : sizesText(c.required, report.within && report.groups.isEmpty())),
                         cell(c.required.reachable ? QString::number(c.required.total) : dash()), cell(number(c.estimate)),
                         cell(number(c.se)), cell(number(c.effectSize, 3)),
                         cell(c.welch ? QString::number(c.df, 'f', 1) : number(c.df, 6)), versus});
        if (c.required.reachable)
            curveUpTo = std::max(curveUpTo, *std::min_element(c.required.perLevel.begin(), c.required.perLevel.end()));
    }
    const OmnibusPower &o = report.omnibus;
    const bool isMixed = !report.groups.isEmpty();
    TableCell test = cell(isMixed         ? tr("All %1 within cells equal, over the groups (Hotelling T\u00b2)").arg(report.omnibus.df1 + 1)
                          : report.within ? tr("All %1 means equal (Hotelling T\u00b2)").arg(report.levelCount)
                                          : tr("All %1 means equal (F test)").arg(report.levelCount),
                          false);
    test.toolTip = o.notes.join(u"\n"_s);
    std::vector<TableCell> omnibus{test, powerCell(o.power), cell(sizesText(o.required, report.within && !isMixed)),
                                   cell(o.required.reachable ? QString::number(o.required.total) : dash()), cell(dash()), cell(dash()),
                                   cell(u"f = "_s + number(o.effectSize, 3)), cell(u"%1, %2"_s.arg(o.df1).arg(number(o.df2, 6))),
                                   cell({}, false)};
    for (TableCell &c : omnibus)
        c.italic = true;
    table.push_back(std::move(omnibus));
    // A mixed design: the data check's other multivariate tests (the first is the omnibus above).
    for (size_t t = 1; t < report.terms.size(); ++t) {
        const TermPower &term = report.terms[t];
        TableCell name = cell(tr("%1 (Wilks \u039b%2)").arg(term.name, term.exact ? QString() : tr(", approximate")), false);
        name.toolTip = (QStringList{term.hypothesis} + term.notes).join(u"\n"_s);
        std::vector<TableCell> row{name, powerCell(term.power),
                                   cell(term.noncentrality == 0.0 ? tr("\u2014 (true)") : sizesText(term.required, false)),
                                   cell(term.required.reachable ? QString::number(term.required.total) : dash()), cell(dash()), cell(dash()),
                                   cell(dash()), cell(u"%1, %2"_s.arg(term.df1).arg(number(term.df2, 6))), cell({}, false)};
        for (TableCell &c : row)
            c.italic = true;
        table.push_back(std::move(row));
    }
    m_results->setRows(std::move(table));
    if (o.required.reachable)
        curveUpTo = std::max(curveUpTo, *std::min_element(o.required.perLevel.begin(), o.required.perLevel.end()));

    QStringList notes = report.notes;
    notes << tr("Per-test alpha %1 (%2).").arg(number(report.perTestAlpha, 4), adjustmentTitle(report.adjustment));
    for (const ContrastPower &c : report.contrasts)
        for (const QString &n : c.notes)
            notes << c.name + u": "_s + n;
    for (const QString &n : o.notes)
        notes << (report.within ? tr("Hotelling test: ") : tr("F test: ")) + n;
    m_notes->setText(notes.join(u"\n"_s));
    const QString why = withinExplanation(report);
    m_withinWhy->setText(why);
    m_withinWhy->setVisible(!why.isEmpty());

    // Curves up to a little past the largest size needed among the tests.
    std::vector<SmallChart::Line> lines;
    const std::vector<long long> sizes = powerCurveSizes(std::min<long long>(curveUpTo + curveUpTo / 4 + 2, 100'000));
    for (int i = -1; i < m; ++i) {
        const Result<std::vector<double>> curve = isMixed ? mixedPowerCurve(rows.rows, i, settings, mixedLayout(m_document->design()), sizes)
                                                          : powerCurve(rows.rows, i, settings, sizes);
        if (!curve)
            continue;
        SmallChart::Line line;
        line.label = i < 0 ? (report.within ? tr("Hotelling (all equal)") : tr("F test (all equal)")) : report.contrasts[size_t(i)].name;
        line.color = i < 0 ? look::baseline() : SmallChart::seriesColor(i);
        line.dashed = i < 0;
        for (size_t j = 0; j < sizes.size(); ++j)
            line.points.emplace_back(double(sizes[j]), (*curve)[j]);
        lines.push_back(std::move(line));
    }
    m_chart->setLines(std::move(lines), std::pair{0.0, 1.0}, report.target, tr("target %1").arg(number(report.target, 3)));
}

} // namespace cb
