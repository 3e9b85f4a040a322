#include "ui/power/PowerPanel.h"

#include "core/base/NumberText.h"
#include "ui/document/Document.h"
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
#include <QSignalBlocker>
#include <QTableWidget>
#include <QTimer>
#include <QVBoxLayout>

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString dash()
{
    return kMissingMark.toString();
}

QString number(double v, int digits = 4)
{
    return std::isfinite(v) ? numberText(v, digits) : dash();
}

QString sizesText(const SampleSize &size)
{
    if (!size.reachable || size.perLevel.empty())
        return dash();
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
    if (field == u"sd"_s || field == u"total"_s || field == u"alpha"_s || field == u"target"_s)
        return field;
    if (field == u"means"_s || field == u"sds"_s || field == u"n"_s || field == u"ratios"_s || field == u"levels"_s)
        return u"levels"_s;
    return {};
}

Result<double> parseScalar(const QLineEdit *edit, const QString &field)
{
    const QString text = edit->text().trimmed();
    if (text.isEmpty())
        return Result<double>::failure(u"%1: no value; type a number"_s.arg(field), field);
    const Result<Weight> w = parseWeight(text);
    if (!w)
        return Result<double>::failure(u"%1: %2"_s.arg(field, w.error()), field);
    return w->value();
}

QLabel *fieldNote(QWidget *parent)
{
    auto *l = new QLabel(parent);
    l->setWordWrap(true);
    l->setStyleSheet(u"QLabel { color: %1; }"_s.arg(look::ink(look::State::Problem).name()));
    l->hide();
    return l;
}

QTableWidgetItem *cell(const QString &text, bool number = true)
{
    auto *item = new QTableWidgetItem(text);
    item->setFlags(Qt::ItemIsEnabled | Qt::ItemIsSelectable);
    if (number)
        item->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
    return item;
}

} // namespace

PowerPanel::PowerPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_inputs(new QTableWidget(0, InputColumnCount, this))
    , m_expectedKind(new QComboBox(this))
    , m_baseline(new QComboBox(this))
    , m_sd(new QLineEdit(u"1"_s, this))
    , m_perLevelSd(new QCheckBox(tr("per level (Welch df)"), this))
    , m_sizeSource(new QComboBox(this))
    , m_total(new QLineEdit(this))
    , m_alpha(new QLineEdit(u"0.05"_s, this))
    , m_sided(new QComboBox(this))
    , m_target(new QLineEdit(u"0.8"_s, this))
    , m_adjustment(new QComboBox(this))
    , m_general(fieldNote(this))
    , m_results(new QTableWidget(0, ResultColumnCount, this))
    , m_notes(look::note({}, this))
    , m_chart(new SmallChart(this))
{
    setObjectName(u"powerPanel"_s);
    m_inputs->setObjectName(u"powerInputs"_s);
    m_inputs->setHorizontalHeaderLabels({tr("Level"), tr("Expected mean"), tr("SD"), tr("Planned n"), tr("Ratio")});
    m_inputs->verticalHeader()->hide();
    m_inputs->verticalHeader()->setDefaultSectionSize(22);
    m_inputs->horizontalHeader()->setSectionResizeMode(QHeaderView::Stretch);
    m_expectedKind->addItems({tr("Means per level"), tr("Differences from a baseline")});
    m_sizeSource->addItems({tr("Planned n of the levels"), tr("Ratios with a total N")});
    m_sided->addItems({tr("Two-sided"), tr("One-sided (\u03c8 > 0 as written)")});
    for (Adjustment a : {Adjustment::None, Adjustment::Bonferroni, Adjustment::Sidak})
        m_adjustment->addItem(adjustmentTitle(a), QVariant::fromValue(int(a)));
    m_total->setPlaceholderText(tr("e.g. 120"));
    m_results->setObjectName(u"powerResults"_s);
    m_results->setHorizontalHeaderLabels({tr("Test"), tr("Estimate \u03c8"), tr("SE"), tr("Std. eff."), tr("df"),
                                          tr("Power at plan"), tr("n/level for target"), tr("Total N"),
                                          tr("vs F test")});
    m_results->verticalHeader()->hide();
    m_results->verticalHeader()->setDefaultSectionSize(22);
    m_results->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    m_results->horizontalHeader()->setStretchLastSection(true);
    m_results->horizontalHeader()->setMinimumSectionSize(48);
    m_results->setSelectionMode(QAbstractItemView::NoSelection);
    m_results->setWordWrap(false);
    m_chart->setObjectName(u"powerCurve"_s);
    m_chart->setAxisTitles(tr("size of the smallest group"), tr("power"));
    m_general->setObjectName(u"powerMessage"_s);

    // Inputs: the levels table, then the settings with a message line under each.
    auto *form = new QFormLayout;
    form->setFieldGrowthPolicy(QFormLayout::AllNonFixedFieldsGrow);
    auto addField = [&](const QString &label, QWidget *field, const QString &key) {
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
    };
    auto *expectedRow = new QWidget(this);
    auto *expectedLayout = new QHBoxLayout(expectedRow);
    expectedLayout->setContentsMargins(0, 0, 0, 0);
    expectedLayout->addWidget(m_expectedKind, 1);
    expectedLayout->addWidget(m_baseline, 1);
    addField(tr("Expected values:"), expectedRow, {});
    auto *sdRow = new QWidget(this);
    auto *sdLayout = new QHBoxLayout(sdRow);
    sdLayout->setContentsMargins(0, 0, 0, 0);
    sdLayout->addWidget(m_sd, 1);
    sdLayout->addWidget(m_perLevelSd);
    addField(tr("Common SD:"), sdRow, u"sd"_s);
    addField(tr("Group sizes:"), m_sizeSource, {});
    addField(tr("Total N:"), m_total, u"total"_s);
    addField(tr("Alpha (family):"), m_alpha, u"alpha"_s);
    addField(tr("Direction:"), m_sided, {});
    addField(tr("Target power:"), m_target, u"target"_s);
    addField(tr("Adjustment:"), m_adjustment, {});
    QLabel *levelsNote = fieldNote(this);
    levelsNote->setObjectName(u"levelsMessage"_s);
    m_fieldNotes.insert(u"levels"_s, levelsNote);

    auto *left = new QVBoxLayout;
    left->addWidget(m_inputs, 1);
    left->addWidget(levelsNote);
    left->addLayout(form);

    auto *cautionBox = look::note(u"<b>%1</b><ul style='margin-left:-20px'><li>%2</li></ul>"_s.arg(
                                      tr("Read with care"), powerCautions().join(u"</li><li>"_s)),
                                  this);
    cautionBox->setObjectName(u"powerCautions"_s);
    cautionBox->setTextFormat(Qt::RichText);
    auto *middle = new QVBoxLayout;
    middle->addWidget(m_general);
    middle->addWidget(m_results, 2);
    middle->addWidget(m_notes);
    middle->addWidget(cautionBox);

    auto *layout = new QHBoxLayout(this);
    layout->setContentsMargins(6, 4, 6, 4);
    layout->addLayout(left, 3);
    layout->addLayout(middle, 7);
    layout->addWidget(m_chart, 4);

    connect(m_inputs, &QTableWidget::itemChanged, this, [this] {
        if (!m_building)
            schedule();
    });
    for (QLineEdit *e : {m_sd, m_total, m_alpha, m_target})
        connect(e, &QLineEdit::textChanged, this, &PowerPanel::schedule);
    for (QComboBox *c : {m_sided, m_adjustment, m_baseline})
        connect(c, &QComboBox::currentIndexChanged, this, &PowerPanel::schedule);
    connect(m_expectedKind, &QComboBox::currentIndexChanged, this, [this] {
        rebuildInputRows();
        schedule();
    });
    connect(m_baseline, &QComboBox::currentIndexChanged, this, &PowerPanel::rebuildInputRows);
    connect(m_perLevelSd, &QCheckBox::toggled, this, [this] {
        updateColumnVisibility();
        schedule();
    });
    connect(m_sizeSource, &QComboBox::currentIndexChanged, this, [this] {
        m_sizeSourceChosen = true;
        rebuildInputRows();
        schedule();
    });
    connect(document, &Document::changed, this, &PowerPanel::followDocument);
    followDocument();
    recompute();
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

void PowerPanel::followDocument()
{
    const Factor &f = factor();
    if (!m_sizeSourceChosen) {
        const QSignalBlocker block(m_sizeSource);
        m_sizeSource->setCurrentIndex(f.hasPlannedN() ? 0 : 1);
    }
    if (f.levels != m_levels) {
        const QSignalBlocker block(m_baseline);
        const QString previous = m_baseline->currentText();
        m_baseline->clear();
        m_baseline->addItems(f.levels);
        m_baseline->setCurrentIndex(std::max(0, int(f.levels.indexOf(previous))));
    }
    rebuildInputRows();
    schedule();
}

// One row per level. Typed values stay with their level's name when levels are
// renamed elsewhere only if the name is kept; new levels start empty.
void PowerPanel::rebuildInputRows()
{
    const Factor &f = factor();
    QHash<QString, QStringList> kept;
    for (int r = 0; r < m_inputs->rowCount(); ++r) {
        QStringList values;
        for (int c = ExpectedColumn; c < InputColumnCount; ++c)
            values << (m_inputs->item(r, c) ? m_inputs->item(r, c)->text() : QString());
        kept.insert(m_levels.value(r), values);
    }
    m_building = true;
    m_levels = f.levels;
    m_inputs->setRowCount(int(f.levels.size()));
    const std::vector<Rational> sizes = f.sizes();
    const bool differences = m_expectedKind->currentIndex() == 1;
    for (int r = 0; r < int(f.levels.size()); ++r) {
        const QStringList values = kept.value(f.levels[r], QStringList{QString(), QString(), QString(), u"1"_s});
        m_inputs->setItem(r, LevelColumn, cell(f.levels[r], false));
        for (int c = ExpectedColumn; c < InputColumnCount; ++c) {
            auto *item = new QTableWidgetItem(values.value(c - ExpectedColumn));
            item->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
            m_inputs->setItem(r, c, item);
        }
        m_inputs->item(r, PlannedNColumn)->setFlags(Qt::ItemIsEnabled);
        m_inputs->item(r, PlannedNColumn)->setText(f.hasPlannedN() ? QString::fromStdString(sizes[size_t(r)].get_str()) : dash());
        m_inputs->item(r, PlannedNColumn)->setForeground(look::quietText());
        if (differences && r == m_baseline->currentIndex()) {
            QTableWidgetItem *base = m_inputs->item(r, ExpectedColumn);
            base->setFlags(Qt::ItemIsEnabled);
            base->setText(tr("0 (baseline)"));
            base->setForeground(look::quietText());
        } else if (m_inputs->item(r, ExpectedColumn)->text() == tr("0 (baseline)")) {
            m_inputs->item(r, ExpectedColumn)->setText({});
        }
    }
    m_inputs->setHorizontalHeaderItem(ExpectedColumn, new QTableWidgetItem(differences ? tr("Difference from %1").arg(m_baseline->currentText())
                                                                                       : tr("Expected mean")));
    m_baseline->setVisible(differences);
    updateColumnVisibility();
    m_building = false;
}

void PowerPanel::updateColumnVisibility()
{
    const bool ratios = m_sizeSource->currentIndex() == 1;
    m_inputs->setColumnHidden(SdColumn, !m_perLevelSd->isChecked());
    m_inputs->setColumnHidden(PlannedNColumn, ratios);
    m_inputs->setColumnHidden(RatioColumn, !ratios);
    m_sd->setEnabled(!m_perLevelSd->isChecked());
    m_total->setEnabled(ratios);
}

void PowerPanel::schedule()
{
    if (m_scheduled)
        return;
    m_scheduled = true;
    QTimer::singleShot(0, this, &PowerPanel::recompute);
}

QStringList PowerPanel::columnTexts(int column) const
{
    QStringList out;
    for (int r = 0; r < m_inputs->rowCount(); ++r)
        out << (m_inputs->item(r, column) ? m_inputs->item(r, column)->text().trimmed() : QString());
    return out;
}

void PowerPanel::setExpectedTexts(const QStringList &texts)
{
    for (int r = 0; r < m_inputs->rowCount() && r < texts.size(); ++r)
        if (m_inputs->item(r, ExpectedColumn)->flags() & Qt::ItemIsEditable)
            m_inputs->item(r, ExpectedColumn)->setText(texts[r]);
}

void PowerPanel::setLevelSdTexts(const QStringList &texts)
{
    m_perLevelSd->setChecked(true);
    for (int r = 0; r < m_inputs->rowCount() && r < texts.size(); ++r)
        m_inputs->item(r, SdColumn)->setText(texts[r]);
}

void PowerPanel::setRatioTexts(const QStringList &texts)
{
    setSizeSource(SizeSource::RatiosAndTotal);
    for (int r = 0; r < m_inputs->rowCount() && r < texts.size(); ++r)
        m_inputs->item(r, RatioColumn)->setText(texts[r]);
}

void PowerPanel::setUseDifferences(bool differences, int baseline)
{
    m_baseline->setCurrentIndex(baseline);
    m_expectedKind->setCurrentIndex(differences ? 1 : 0);
}

void PowerPanel::setSizeSource(SizeSource source)
{
    m_sizeSource->setCurrentIndex(source == SizeSource::PlannedN ? 0 : 1);
}

QString PowerPanel::fieldMessage(const QString &field) const
{
    const QLabel *l = m_fieldNotes.value(field);
    return l && !l->isHidden() ? l->text() : QString();
}

Result<PowerSettings> PowerPanel::settings() const
{
    using R = Result<PowerSettings>;
    PowerSettings s;
    const int k = int(m_levels.size());
    const bool differences = m_expectedKind->currentIndex() == 1;
    const int baseline = m_baseline->currentIndex();
    // One number per level from a column of the table; the message names the level.
    auto column = [&](int c, const QString &key, const QString &field, int skip) -> Result<std::vector<double>> {
        std::vector<double> out;
        const QStringList texts = columnTexts(c);
        for (int r = 0; r < k; ++r) {
            if (r == skip)
                continue;
            if (texts[r].isEmpty())
                return Result<std::vector<double>>::failure(u"%1, level \u2018%2\u2019: no value; type a number"_s.arg(field, m_levels[r]), key);
            const Result<Weight> w = parseWeight(texts[r]);
            if (!w)
                return Result<std::vector<double>>::failure(u"%1, level \u2018%2\u2019: %3"_s.arg(field, m_levels[r], w.error()), key);
            out.push_back(w->value());
        }
        return out;
    };
    auto expected = column(ExpectedColumn, u"means"_s, differences ? u"means (differences)"_s : u"means"_s, differences ? baseline : -1);
    if (!expected)
        return R::failure(expected.problem());
    s.means = differences ? meansFromDifferences(*expected, baseline) : *expected;
    if (m_perLevelSd->isChecked()) {
        auto sds = column(SdColumn, u"sds"_s, u"sds"_s, -1);
        if (!sds)
            return R::failure(sds.problem());
        s.sds = *sds;
    } else {
        auto sd = parseScalar(m_sd, u"sd"_s);
        if (!sd)
            return R::failure(sd.problem());
        s.sd = *sd;
    }
    if (m_sizeSource->currentIndex() == 0) {
        const Factor &f = factor();
        if (!f.hasPlannedN())
            return R::failure(u"n: the levels have no planned group sizes yet; enter them in the levels panel, "
                              u"or choose ratios with a total N"_s, u"n"_s);
        s.n = f.sizesAsDouble();
    } else {
        auto ratios = column(RatioColumn, u"ratios"_s, u"ratios"_s, -1);
        if (!ratios)
            return R::failure(ratios.problem());
        s.ratios = *ratios;
        auto total = parseScalar(m_total, u"total"_s);
        if (!total)
            return R::failure(total.problem());
        s.total = *total;
    }
    auto alpha = parseScalar(m_alpha, u"alpha"_s);
    if (!alpha)
        return R::failure(alpha.problem());
    s.alpha = *alpha;
    auto target = parseScalar(m_target, u"target"_s);
    if (!target)
        return R::failure(target.problem());
    s.target = *target;
    s.oneSided = m_sided->currentIndex() == 1;
    s.adjustment = Adjustment(m_adjustment->currentData().toInt());
    if (Problem problem = validatePowerSettings(s, k); !problem.isEmpty())
        return R::failure(std::move(problem));
    return s;
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
    m_report.reset();
    auto fail = [this](const Problem &problem) {
        showMessages(problem);
        m_results->setRowCount(0);
        m_notes->clear();
        m_chart->clear(tr("The power curves appear once every input is valid."));
    };
    const Result<ContrastRows> rows = contrastRowsOf(analysis());
    if (!rows)
        return fail(rows.problem());
    const Result<PowerSettings> s = settings();
    if (!s)
        return fail(s.problem());
    const Result<PowerReport> report = computePower(rows->rows, rows->names, *s);
    if (!report)
        return fail(report.problem());
    showMessages({});
    showReport(*report, *rows, *s);
    m_report = *report;
}

void PowerPanel::showReport(const PowerReport &report, const ContrastRows &rows, const PowerSettings &settings)
{
    const int m = int(report.contrasts.size());
    m_results->setRowCount(m + 1);
    auto powerCell = [&](double power) {
        const bool reached = power >= report.target;
        const look::State state = reached ? look::State::Good : look::State::Caution;
        QTableWidgetItem *item = cell(look::mark(state) + u" "_s + QString::number(power, 'f', 3));
        item->setForeground(look::ink(state));
        item->setToolTip(reached ? tr("At or above the target power") : tr("Below the target power"));
        return item;
    };
    long long curveUpTo = 10;
    std::vector<SmallChart::Line> lines;
    for (int i = 0; i < m; ++i) {
        const ContrastPower &c = report.contrasts[size_t(i)];
        m_results->setItem(i, TestColumn, cell(c.name, false));
        m_results->item(i, TestColumn)->setToolTip(c.notes.join(u"\n"_s));
        m_results->setItem(i, EstimateColumn, cell(number(c.estimate)));
        m_results->setItem(i, SeColumn, cell(number(c.se)));
        m_results->setItem(i, EffectColumn, cell(number(c.effectSize, 3)));
        m_results->setItem(i, DfColumn, cell(c.welch ? QString::number(c.df, 'f', 1) : number(c.df, 6)));
        m_results->setItem(i, PowerColumn, powerCell(c.power));
        m_results->setItem(i, NeededColumn, cell(c.zeroEstimate ? tr("\u2014 (\u03c8 = 0)") : sizesText(c.required)));
        m_results->setItem(i, NeededTotalColumn, cell(c.required.reachable ? QString::number(c.required.total) : dash()));
        m_results->setItem(i, VersusOmnibusColumn,
                           cell(c.fewerThanOmnibus ? look::mark(look::State::Good) + tr(" needs fewer") : QString(), false));
        if (c.fewerThanOmnibus)
            m_results->item(i, VersusOmnibusColumn)->setForeground(look::ink(look::State::Good));
        if (c.required.reachable)
            curveUpTo = std::max(curveUpTo, *std::min_element(c.required.perLevel.begin(), c.required.perLevel.end()));
    }
    const OmnibusPower &o = report.omnibus;
    m_results->setItem(m, TestColumn, cell(tr("All %1 means equal (F test)").arg(report.levelCount), false));
    m_results->item(m, TestColumn)->setToolTip(o.notes.join(u"\n"_s));
    m_results->setItem(m, EstimateColumn, cell(dash()));
    m_results->setItem(m, SeColumn, cell(dash()));
    m_results->setItem(m, EffectColumn, cell(u"f = "_s + number(o.effectSize, 3)));
    m_results->setItem(m, DfColumn, cell(u"%1, %2"_s.arg(o.df1).arg(number(o.df2, 6))));
    m_results->setItem(m, PowerColumn, powerCell(o.power));
    m_results->setItem(m, NeededColumn, cell(sizesText(o.required)));
    m_results->setItem(m, NeededTotalColumn, cell(o.required.reachable ? QString::number(o.required.total) : dash()));
    m_results->setItem(m, VersusOmnibusColumn, cell({}, false));
    for (int c = 0; c < ResultColumnCount; ++c) {
        QFont f = m_results->item(m, c)->font();
        f.setItalic(true);
        m_results->item(m, c)->setFont(f);
    }
    if (o.required.reachable)
        curveUpTo = std::max(curveUpTo, *std::min_element(o.required.perLevel.begin(), o.required.perLevel.end()));

    QStringList notes = report.notes;
    notes << tr("Per-test alpha %1 (%2).").arg(number(report.perTestAlpha, 4), adjustmentTitle(report.adjustment));
    for (const ContrastPower &c : report.contrasts)
        for (const QString &n : c.notes)
            notes << c.name + u": "_s + n;
    for (const QString &n : o.notes)
        notes << tr("F test: ") + n;
    m_notes->setText(notes.join(u"\n"_s));

    // Curves up to a little past the largest size needed among the tests.
    const std::vector<long long> sizes = powerCurveSizes(std::min<long long>(curveUpTo + curveUpTo / 4 + 2, 100'000));
    for (int i = -1; i < m; ++i) {
        const Result<std::vector<double>> curve = powerCurve(rows.rows, i, settings, sizes);
        if (!curve)
            continue;
        SmallChart::Line line;
        line.label = i < 0 ? tr("F test (all equal)") : report.contrasts[size_t(i)].name;
        line.color = i < 0 ? look::baseline() : SmallChart::seriesColor(i);
        line.dashed = i < 0;
        for (size_t j = 0; j < sizes.size(); ++j)
            line.points.emplace_back(double(sizes[j]), (*curve)[j]);
        lines.push_back(std::move(line));
    }
    m_chart->setLines(std::move(lines), std::pair{0.0, 1.0}, report.target, tr("target %1").arg(number(report.target, 3)));
}

} // namespace cb
