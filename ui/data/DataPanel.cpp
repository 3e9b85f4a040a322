#include "ui/data/DataPanel.h"

#include "core/data/DesignFit.h"
#include "ui/common/WrapLabel.h"

#include "core/base/NumberText.h"
#include "core/base/Weight.h"
#include "core/data/MixedFit.h"
#include "core/report/FitReport.h"
#include "core/report/ItemReport.h"

#include "ui/document/Document.h"
#include "ui/common/CellTable.h"
#include "ui/common/Look.h"
#include "ui/common/Prompter.h"
#include "ui/common/SmallChart.h"
#include "ui/data/ItemTable.h"

#include <QAction>
#include <QClipboard>
#include <QComboBox>
#include <QGuiApplication>
#include <QCoreApplication>
#include <QDir>
#include <QFileInfo>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QMenu>
#include <QProgressDialog>
#include <QPushButton>
#include <QSplitter>
#include <QRegularExpression>
#include <QTableView>
#include <QThread>
#include <QToolButton>
#include <QTimer>
#include <QVBoxLayout>

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString number(double v, int digits = 4)
{
    return std::isfinite(v) ? numberText(v, digits) : kMissingMark.toString();
}

TableCell cell(const QString &text, bool numeric = true)
{
    return textCell(text, numeric);
}

QTableView *tableView(CellTableModel *model, QWidget *parent)
{
    auto *view = new QTableView(parent);
    view->setModel(model);
    setUpResultTable(view);
    return view;
}

QString noMatch()
{
    return QCoreApplication::translate("cb::DataPanel", "(no match)");
}

QLabel *caption(const QString &text, QWidget *parent)
{
    auto *l = new QLabel(u"<b>%1</b>"_s.arg(text.toHtmlEscaped()), parent);
    return l;
}

// Whether every non-missing preview value in the column is a number.
bool numericColumn(const DataPreview &preview, int column)
{
    bool any = false;
    for (const QStringList &row : preview.rows) {
        const QByteArray text = row.value(column).toUtf8();
        const std::string_view view(text.constData(), size_t(text.size()));
        if (isMissingToken(view))
            continue;
        if (!parseNumberField(view))
            return false;
        any = true;
    }
    return any;
}

// Whether a numeric column looks like a row label rather than a measurement: a name such as
// "id", "plot_id", "row" or "subject", or whole numbers counting up by one (1, 2, 3, ...).
bool identifierColumn(const DataPreview &preview, int column)
{
    static const QRegularExpression named(u"^(id|.*[_ .-]id|.*ID|row|index|no|number|#|plot|subject|participant|case|obs|observation|record)$"_s,
                                          QRegularExpression::CaseInsensitiveOption);
    if (named.match(preview.columns.value(column).trimmed()).hasMatch())
        return true;
    std::optional<double> previous;
    int counted = 0;
    for (const QStringList &row : preview.rows) {
        const QByteArray text = row.value(column).toUtf8();
        const auto value = parseNumberField(std::string_view(text.constData(), size_t(text.size())));
        if (!value || *value != std::floor(*value) || (previous && *value != *previous + 1))
            return false;
        previous = value;
        ++counted;
    }
    return counted >= 3;
}

DatabaseReader &defaultDatabaseReader()
{
    static DatabaseReader reader;
    return reader;
}

} // namespace

void DataPanel::setDefaultDatabaseReader(DatabaseReader reader)
{
    defaultDatabaseReader() = std::move(reader);
}

void DataPanel::setDatabaseReader(DatabaseReader reader)
{
    m_databaseReader = std::move(reader);
    m_databaseAction->setEnabled(bool(m_databaseReader));
}

DataPanel::DataPanel(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_prompter(&dialogPrompter())
    , m_fileLabel(look::note(tr("No data file yet. Open a long-format file: one row per observation, a column naming "
                                "the level and a numeric response."), this))
    , m_preview(new CellTableModel({}, this))
    , m_previewView(tableView(m_preview, this))
    , m_factor(new QComboBox(this))
    , m_moreFactors{new QComboBox(this), new QComboBox(this)}
    , m_response(new QComboBox(this))
    , m_weight(new QComboBox(this))
    , m_participant(new QComboBox(this))
    , m_item(new QComboBox(this))
    , m_readButton(new QPushButton(tr("Read and fit"), this))
    , m_copyQueryButton(new QPushButton(tr("Copy summary query"), this))
    , m_databaseAction(new QAction(tr("Read from a database\u2026"), this))
    , m_databaseReader(defaultDatabaseReader())
    , m_adjust(new QComboBox(this))
    , m_alpha(new QLineEdit(u"0.05"_s, this))
    , m_mapping(new CellTableModel({tr("Level in the data"), tr("Rows"), tr("Scheme level")}, this))
    , m_mappingView(tableView(m_mapping, this))
    , m_unmatched(new WrapLabel(this))
    , m_message(new WrapLabel(this))
    , m_summary(new WrapLabel(this))
    , m_coefficients(new CellTableModel(coefficientHeaders(tr("Confidence interval")), this))
    , m_coefficientView(tableView(m_coefficients, this))
    , m_itemRows(new CellTableModel(itemTableHeaders(), this))
    , m_itemView(tableView(m_itemRows, this))
    , m_chart(new SmallChart(this))
    , m_problems(look::note({}, this))
{
    setObjectName(u"dataPanel"_s);
    buildTables();
    // Left: the file and its columns. Middle: levels and results. Right: the means.
    auto *layout = new QHBoxLayout(this);
    layout->setContentsMargins(6, 4, 6, 4);
    layout->addLayout(buildFileColumn(), 4);
    layout->addLayout(buildResultColumn(), 8);
    layout->addWidget(m_chart, 3);
    connectInputs();
    updateFactorRows();
}

// The coefficient table's titles, in CoefficientColumn order; the interval's title says its level.
QStringList DataPanel::coefficientHeaders(const QString &interval)
{
    return {tr("Coefficient"), tr("Estimate"), interval, tr("p"), tr("Adjusted p"), tr("SE"), tr("t"), tr("From means"), tr("Tests")};
}

void DataPanel::buildTables()
{
    m_previewView->setObjectName(u"dataPreview"_s);
    m_previewView->setMaximumHeight(150);
    m_mappingView->setObjectName(u"levelMapping"_s);
    m_mappingView->horizontalHeader()->setSectionResizeMode(QHeaderView::Stretch);
    showChoices(m_mappingView, SchemeLevelColumn);
    m_coefficientView->setObjectName(u"fitCoefficients"_s);
    m_coefficientView->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    m_coefficientView->horizontalHeader()->setStretchLastSection(true);
    m_coefficientView->setTextElideMode(Qt::ElideMiddle);
    m_coefficients->setHeaderToolTip(
        FromMeansColumn,
        tr("The coefficient's hypothesis row applied to the observed level means; it equals the estimate unless the "
           "coding leaves out comparisons and the group sizes are unequal."));
    m_coefficientView->setSelectionMode(QAbstractItemView::NoSelection);
    m_chart->setObjectName(u"levelMeans"_s);
    m_chart->clear(tr("Level means with their confidence intervals appear here after a fit."));
}

// The file, its preview, the column choosers and the level matching.
QLayout *DataPanel::buildFileColumn()
{
    m_readButton->setEnabled(false);
    for (Adjustment a : {Adjustment::Holm, Adjustment::Bonferroni, Adjustment::Sidak, Adjustment::None})
        m_adjust->addItem(adjustmentTitle(a), QVariant::fromValue(int(a)));
    // "Open data…" opens a file; its menu also offers data that live in a database, where the
    // engine summarises the table per level and the summary is fitted.
    auto *open = new QToolButton(this);
    open->setObjectName(u"openData"_s);
    open->setPopupMode(QToolButton::MenuButtonPopup);
    auto *openFileAction = new QAction(tr("Open data\u2026"), this);
    connect(openFileAction, &QAction::triggered, this, [this] {
        const QString path = m_prompter->askOpenPath(this, {tr("Open a data file"), QFileInfo(m_path).absolutePath(),
                                                            tr("Delimited text (*.csv *.tsv *.txt *.dat);;All files (*)"), {}});
        if (!path.isEmpty())
            openFile(path);
    });
    open->setDefaultAction(openFileAction);
    auto *openMenu = new QMenu(open);
    openMenu->addAction(openFileAction);
    m_databaseAction->setObjectName(u"readDatabase"_s);
    m_databaseAction->setToolTip(tr("Let a database (SQLite, PostgreSQL, or any ODBC source) summarise a table per "
                                    "level, read-only, and fit the summary."));
    m_databaseAction->setEnabled(bool(m_databaseReader));
    connect(m_databaseAction, &QAction::triggered, this, &DataPanel::readFromDatabase);
    openMenu->addAction(m_databaseAction);
    open->setMenu(openMenu);
    m_copyQueryButton->setObjectName(u"copySummaryQuery"_s);
    m_copyQueryButton->setToolTip(tr("Copy the SQL that summarises a table per level (count, mean, variance), to run in "
                                     "any engine; fit its answer as a summary table."));
    connect(m_copyQueryButton, &QPushButton::clicked, this, &DataPanel::copySummaryQuery);
    auto *fileRow = new QHBoxLayout;
    fileRow->addWidget(open);
    fileRow->addWidget(m_readButton);
    fileRow->addWidget(m_copyQueryButton);
    fileRow->addStretch(1);
    auto *columns = new QFormLayout;
    m_columnsForm = columns;
    columns->addRow(tr("Level column:"), m_factor);
    for (QComboBox *more : m_moreFactors)
        columns->addRow(new QLabel(this), more); // named and shown for a design (updateFactorRows)
    columns->addRow(tr("Response:"), m_response);
    columns->addRow(tr("Case weight:"), m_weight);
    m_participant->setObjectName(u"participantColumn"_s);
    m_participant->setToolTip(tr("For a factor measured within participants: the column naming whose each row is. The "
                                 "check is then by participant: each contrast on the participants' own contrast scores."));
    m_item->setObjectName(u"itemColumn"_s);
    m_item->setToolTip(tr("With a participant column: the column naming each row's item (sentence, word, picture). The "
                          "by-item analysis then sits beside the by-participant one, with Clark's (1973) min F\u2032."));
    auto *units = new QHBoxLayout;
    units->addWidget(m_participant, 1);
    units->addWidget(new QLabel(tr("Item:"), this));
    units->addWidget(m_item, 1);
    columns->addRow(tr("Participant:"), units);
    columns->addRow(tr("Adjust p for:"), m_adjust);
    columns->addRow(tr("Alpha (CI):"), m_alpha);
    auto *left = new QVBoxLayout;
    left->addLayout(fileRow);
    left->addWidget(m_fileLabel);
    left->addWidget(m_previewView, 1);
    left->addLayout(columns);
    left->addWidget(caption(tr("Matching levels"), this));
    left->addWidget(m_mappingView, 1);
    left->addWidget(m_unmatched);
    return left;
}

// The messages, the fit's summary, its coefficients and what was left out.
QLayout *DataPanel::buildResultColumn()
{
    for (QLabel *l : {m_unmatched, m_message, m_summary})
        l->setTextInteractionFlags(Qt::TextSelectableByMouse);
    m_message->setObjectName(u"dataMessage"_s);
    m_message->setStyleSheet(u"QLabel { color: %1; }"_s.arg(look::ink(look::State::Problem).name()));
    m_message->hide();
    m_unmatched->setStyleSheet(u"QLabel { color: %1; }"_s.arg(look::ink(look::State::Caution).name()));
    m_summary->setTextFormat(Qt::RichText);
    m_problems->setObjectName(u"dataProblems"_s);
    auto *middle = new QVBoxLayout;
    middle->addWidget(m_message);
    middle->addWidget(m_summary);
    middle->addWidget(m_coefficientView, 2);
    m_itemView->setObjectName(u"itemCoefficients"_s);
    m_itemView->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    m_itemView->setSelectionMode(QAbstractItemView::NoSelection);
    m_itemView->hide();
    middle->addWidget(m_itemView, 2);
    middle->addWidget(m_problems);
    middle->addWidget(look::note(tr("Adjusted p-values are for the family of coefficients (the intercept is not counted). "
                                    "Comparisons chosen after looking at the data are post hoc, not planned: "
                                    "their p-values here are not valid as planned tests."),
                                 this));
    return middle;
}

void DataPanel::connectInputs()
{
    connect(m_readButton, &QPushButton::clicked, this, &DataPanel::readAndFit);
    connect(m_adjust, &QComboBox::currentIndexChanged, this, &DataPanel::refit);
    connect(m_alpha, &QLineEdit::textChanged, this, &DataPanel::refit);
    connect(m_mapping, &CellTableModel::edited, this, [this](int row, int, const QVariant &choice) { levelChosen(row, choice.toInt()); });
    connect(m_document, &Document::changed, this, [this] {
        updateFactorRows();
        rebuildMapping();
    });
}

const Scheme &DataPanel::fitTarget() const
{
    return m_document->isDesign() ? m_document->designAnalysis().cellScheme : m_document->scheme();
}

QStringList DataPanel::targetLevels() const
{
    // Every cell of a design: the data decide which are empty (fitDesign).
    return m_document->isDesign() ? m_document->design().cellNames() : m_document->scheme().factor.levels;
}

void DataPanel::updateFactorRows()
{
    QStringList names;
    if (m_document->isDesign())
        for (const Scheme &f : m_document->design().factors)
            names << f.factor.name;
    const bool changed = names != m_factorNames;
    m_factorNames = names;
    auto *firstLabel = qobject_cast<QLabel *>(m_columnsForm->labelForField(m_factor));
    if (firstLabel)
        firstLabel->setText(names.isEmpty() ? tr("Level column:") : tr("Column of %1:").arg(names[0]));
    for (int i = 0; i < 2; ++i) {
        const bool shown = i + 1 < names.size();
        m_columnsForm->setRowVisible(m_moreFactors[i], shown);
        if (auto *label = qobject_cast<QLabel *>(m_columnsForm->labelForField(m_moreFactors[i])))
            label->setText(shown ? tr("Column of %1:").arg(names[i + 1]) : QString());
    }
    // A new design's factors take the data columns named like them, when there are such.
    if (changed)
        for (qsizetype i = 0; i < names.size() && i < 3; ++i) {
            QComboBox *box = i == 0 ? m_factor : m_moreFactors[i - 1];
            const int match = box->findText(names[i], Qt::MatchFixedString);
            if (match >= 0)
                box->setCurrentIndex(match);
        }
}

DataPanel::~DataPanel()
{
    if (m_thread) {
        m_cancel->store(true);
        m_thread->disconnect(this);
        m_thread->wait();
        delete m_thread;
    }
}

bool DataPanel::openFile(const QString &path)
{
    const Result<DataPreview> preview = previewData(path, 20);
    if (!preview) {
        showMessage(preview.error());
        return false;
    }
    m_path = path;
    m_delimiter = preview->delimiter;
    m_hasHeader = preview->hasHeader;
    m_fileSize = preview->fileSize;
    m_data.reset();
    m_fit.reset();
    m_fileLabel->setText(tr("%1 \u2014 %2-separated, %3").arg(QDir::toNativeSeparators(path), delimiterName(preview->delimiter),
                                                              preview->hasHeader ? tr("first row is a header") : tr("no header row")));
    m_preview->setRows({});
    m_preview->setHeaders(preview->columns);
    TableRows previewRows;
    for (const QStringList &row : preview->rows) {
        previewRows.emplace_back();
        for (int c = 0; c < int(preview->columns.size()); ++c)
            previewRows.back().push_back(cell(row.value(c), false));
    }
    m_preview->setRows(std::move(previewRows));

    // The response is offered among the numeric columns only, a measurement before a row label.
    int factor = -1;
    QStringList numericNames;
    QString response;
    for (int c = 0; c < int(preview->columns.size()); ++c) {
        if (!numericColumn(*preview, c)) {
            if (factor < 0)
                factor = c;
            continue;
        }
        numericNames << preview->columns[c];
        if (response.isEmpty() && !identifierColumn(*preview, c))
            response = preview->columns[c];
    }
    if (response.isEmpty())
        response = numericNames.value(0);
    m_factor->clear();
    m_response->clear();
    m_weight->clear();
    m_participant->clear();
    m_participant->addItem(tr("(none: separate groups)"));
    m_participant->addItems(preview->columns);
    m_item->clear();
    m_item->addItem(tr("(none)"));
    m_item->addItems(preview->columns);
    m_factor->addItems(preview->columns);
    for (QComboBox *more : m_moreFactors) {
        more->clear();
        more->addItems(preview->columns);
    }
    m_response->addItems(numericNames);
    m_weight->addItem(tr("(none: every row counts once)"));
    m_weight->addItems(preview->columns);
    m_factor->setCurrentIndex(std::max(factor, 0));
    for (int i = 0; i < 2; ++i)
        m_moreFactors[i]->setCurrentIndex(std::min(std::max(factor, 0) + i + 1, int(preview->columns.size()) - 1));
    m_response->setCurrentIndex(int(numericNames.indexOf(response)));
    m_factorNames.clear(); // propose the columns named like the design's factors again
    updateFactorRows();
    m_readButton->setEnabled(true);
    showMessage({});
    return true;
}

void DataPanel::setColumns(const QString &factor, const QString &response, const QString &weight)
{
    m_factor->setCurrentText(factor);
    m_response->setCurrentText(response);
    if (weight.isEmpty())
        m_weight->setCurrentIndex(0);
    else
        m_weight->setCurrentText(weight);
}

void DataPanel::readAndFit()
{
    if (m_thread || m_path.isEmpty())
        return;
    DataReadOptions options;
    options.factorColumn = m_factor->currentText();
    for (int i = 0; i + 1 < int(m_factorNames.size()) && i < 2; ++i)
        options.moreFactorColumns << m_moreFactors[i]->currentText();
    options.responseColumn = m_response->currentText();
    options.weightColumn = m_weight->currentIndex() > 0 ? m_weight->currentText() : QString();
    options.participantColumn = m_participant->currentIndex() > 0 ? m_participant->currentText() : QString();
    options.itemColumn = m_item->currentIndex() > 0 ? m_item->currentText() : QString();
    options.delimiter = m_delimiter;
    options.header = m_hasHeader ? HeaderMode::Present : HeaderMode::Absent;
    m_bytesRead = std::make_shared<std::atomic<qint64>>(0);
    m_cancel = std::make_shared<std::atomic<bool>>(false);
    m_readResult = std::make_shared<std::optional<Result<DataSummary>>>();
    options.progress = [bytes = m_bytesRead, cancel = m_cancel](qint64 read) {
        bytes->store(read);
        return !cancel->load();
    };
    startRead([path = m_path, options] { return readLevelData(path, options); },
              tr("Reading %1\u2026").arg(QFileInfo(m_path).fileName()), true);
}

void DataPanel::startRead(std::function<Result<DataSummary>()> job, const QString &what, bool measured)
{
    if (!m_cancel)
        m_cancel = std::make_shared<std::atomic<bool>>(false);
    if (!m_bytesRead)
        m_bytesRead = std::make_shared<std::atomic<qint64>>(0);
    m_readResult = std::make_shared<std::optional<Result<DataSummary>>>();
    m_readButton->setEnabled(false);
    m_databaseAction->setEnabled(false);
    m_thread = QThread::create([job = std::move(job), out = m_readResult] { out->emplace(job()); });
    connect(m_thread, &QThread::finished, this, &DataPanel::readFinished);

    // Large files show their progress and can be cancelled; the window stays responsive.
    m_progress = new QProgressDialog(what, tr("Cancel"), 0, measured ? 1000 : 0, this);
    if (!measured)
        m_progress->setCancelButton(nullptr); // a query runs to its end in the engine
    m_progress->setWindowModality(Qt::WindowModal);
    m_progress->setMinimumDuration(500);
    m_progress->setAutoClose(false);
    m_progress->setAutoReset(false);
    connect(m_progress, &QProgressDialog::canceled, this, [cancel = m_cancel] { cancel->store(true); });
    auto *poll = new QTimer(m_progress);
    connect(poll, &QTimer::timeout, m_progress, [this] {
        if (m_fileSize > 0 && m_progress->maximum() > 0)
            m_progress->setValue(int(1000.0 * double(m_bytesRead->load()) / double(m_fileSize)));
    });
    poll->start(100);
    m_thread->start();
}

SummaryQuestion DataPanel::summaryQuestion(bool withDatabase) const
{
    SummaryQuestion q = m_lastSummaryQuestion;
    q.title = withDatabase ? tr("Read from a database") : tr("Copy summary query");
    q.withDatabase = withDatabase;
    QStringList names;
    if (m_document->isDesign())
        for (const Scheme &f : m_document->design().factors)
            names << f.factor.name;
    q.factorLabels.clear();
    if (names.isEmpty())
        q.factorLabels << tr("Level column");
    else
        for (const QString &n : names)
            q.factorLabels << tr("Column of %1").arg(n);
    // The columns chosen for the open file, else the previous answers, else the factors' names.
    QStringList columns;
    if (!m_path.isEmpty()) {
        columns << m_factor->currentText();
        for (int i = 0; i + 1 < int(names.size()) && i < 2; ++i)
            columns << m_moreFactors[i]->currentText();
        q.response = m_response->currentText();
        q.weight = m_weight->currentIndex() > 0 ? m_weight->currentText() : QString();
        q.participant = m_participant->currentIndex() > 0 ? m_participant->currentText() : QString();
        q.item = m_item->currentIndex() > 0 ? m_item->currentText() : QString();
    } else if (q.factorColumns.size() == q.factorLabels.size()) {
        columns = q.factorColumns;
    } else {
        columns = names.isEmpty() ? QStringList{m_document->scheme().factor.name} : names;
    }
    q.factorColumns = columns;
    return q;
}

Result<SummaryQuerySpec> DataPanel::specFromAnswer(const SummaryQuestion &answer) const
{
    SummaryQuerySpec spec;
    spec.table = answer.table;
    spec.factorColumns = answer.factorColumns;
    spec.responseColumn = answer.response;
    spec.weightColumn = answer.weight.trimmed();
    spec.participantColumn = answer.participant.trimmed();
    spec.itemColumn = answer.withDatabase ? answer.item.trimmed() : QString();
    if (!spec.itemColumn.isEmpty() && spec.participantColumn.isEmpty())
        return Result<SummaryQuerySpec>::failure(tr("Item column: the by-item analysis needs a participant column beside it."), u"item"_s);
    if (auto query = summaryQuery(spec); !query)
        return Result<SummaryQuerySpec>::failure(query.error(), query.field());
    return spec;
}

bool DataPanel::copySummaryQuery()
{
    SummaryQuestion q = summaryQuestion(false);
    if (!m_prompter->askSummaryQuery(this, q))
        return false;
    m_lastSummaryQuestion = q;
    auto spec = specFromAnswer(q);
    if (!spec) {
        showMessage(spec.error());
        return false;
    }
    const auto query = summaryQuery(*spec);
    QGuiApplication::clipboard()->setText(query->sql + u";\n"_s);
    showMessage({});
    m_fileLabel->setText(tr("The summary query for table %1 is on the clipboard (%2). Run it in the database, save "
                            "its answer as CSV and open that file, or read it here with \u201cRead from a database\u201d.")
                             .arg(quoted(spec->table), query->formNote));
    return true;
}

void DataPanel::readFromDatabase()
{
    if (m_thread || !m_databaseReader)
        return;
    SummaryQuestion q = summaryQuestion(true);
    if (!m_prompter->askSummaryQuery(this, q))
        return;
    m_lastSummaryQuestion = q;
    auto spec = specFromAnswer(q);
    if (!spec) {
        showMessage(spec.error());
        emit finished();
        return;
    }
    m_cancel = std::make_shared<std::atomic<bool>>(false);
    const QString note = summaryQuery(*spec)->formNote;
    m_fileLabel->setText(spec->participantColumn.isEmpty()
                             ? tr("%1, table %2: summarised per level by the database (%3).").arg(q.url, quoted(spec->table), note)
                         : spec->itemColumn.isEmpty()
                             ? tr("%1, table %2: each participant's cell means (column %3) from the database, checked by "
                                  "participant (%4).").arg(q.url, quoted(spec->table), quoted(spec->participantColumn), note)
                             : tr("%1, table %2: each participant's cell means (column %3) and, in a second query, each item's "
                                  "(column %4) from the database, checked by participant and by item (%5).")
                                   .arg(q.url, quoted(spec->table), quoted(spec->participantColumn), quoted(spec->itemColumn), note));
    startRead([reader = m_databaseReader, url = q.url, s = *spec] { return reader(url, s); },
              tr("Asking the database for the summary of %1\u2026").arg(quoted(spec->table)), false);
}

void DataPanel::readFinished()
{
    m_thread->deleteLater();
    m_thread = nullptr;
    m_progress->deleteLater();
    m_progress = nullptr;
    m_readButton->setEnabled(!m_path.isEmpty());
    m_databaseAction->setEnabled(bool(m_databaseReader));
    Result<DataSummary> result = m_readResult->value();
    if (!result) {
        m_data.reset();
        m_fit.reset();
        showMessage(result.error());
        emit finished();
        return;
    }
    m_data = result.take();
    rebuildMapping();
    emit finished();
}

// One row per level found in the data, with the scheme level it stands for: the one chosen,
// else the one of its own name, else none.
void DataPanel::rebuildMapping()
{
    if (!m_data)
        return;
    const QStringList scheme = targetLevels();
    const bool design = m_document->isDesign();
    m_mapping->setHeaders({design ? tr("Cell in the data") : tr("Level in the data"), tr("Rows"), design ? tr("Design cell") : tr("Scheme level")});
    const QStringList choices = QStringList{noMatch()} + scheme;
    LevelMapping chosen;
    TableRows rows;
    for (const LevelStats &level : m_data->levels) {
        QString target = m_chosen.value(level.name, level.name);
        if (!scheme.contains(target))
            target.clear();
        if (target != level.name)
            chosen.insert(level.name, target);
        TableCell choice = cell(target.isEmpty() ? noMatch() : target, false);
        choice.choices = choices;
        rows.push_back({cell(level.name, false), cell(QString::number(level.stats.rows)), choice});
    }
    m_chosen = chosen;
    m_mapping->setRows(std::move(rows));
    refit();
}

void DataPanel::levelChosen(int row, int choice)
{
    if (!m_data || row < 0 || row >= int(m_data->levels.size()))
        return;
    const QStringList scheme = targetLevels();
    m_chosen.insert(m_data->levels[size_t(row)].name, choice > 0 ? scheme.value(choice - 1) : QString());
    rebuildMapping();
}

LevelMapping DataPanel::currentMapping() const
{
    return m_chosen;
}

void DataPanel::mapLevel(const QString &dataLevel, const QString &schemeLevel)
{
    if (!m_data)
        return;
    for (size_t r = 0; r < m_data->levels.size(); ++r)
        if (m_data->levels[r].name == dataLevel)
            levelChosen(int(r), int(targetLevels().indexOf(schemeLevel)) + 1);
}

void DataPanel::setAdjustment(Adjustment adjust)
{
    m_adjust->setCurrentIndex(m_adjust->findData(QVariant::fromValue(int(adjust))));
}

void DataPanel::updateUnmatched()
{
    const QStringList scheme = targetLevels();
    const LevelMapping mapping = currentMapping();
    QStringList dataOnly, covered;
    for (const LevelStats &l : m_data->levels) {
        const QString target = mapping.contains(l.name) ? mapping.value(l.name) : l.name;
        if (target.isEmpty() || !scheme.contains(target))
            dataOnly << l.name;
        else
            covered << target;
    }
    QStringList schemeOnly;
    for (const QString &s : scheme)
        if (!covered.contains(s))
            schemeOnly << s;
    QStringList lines;
    if (!dataOnly.isEmpty())
        lines << tr("%1 In the data only: %2. Choose the scheme level each stands for.").arg(look::mark(look::State::Caution), dataOnly.join(u", "_s));
    if (!schemeOnly.isEmpty())
        lines << tr("%1 In the scheme without data: %2.").arg(look::mark(look::State::Caution), schemeOnly.join(u", "_s));
    m_unmatched->setText(lines.join(u"\n"_s));
    m_unmatched->setVisible(!lines.isEmpty());
}

void DataPanel::refit()
{
    if (!m_data)
        return;
    updateUnmatched();
    m_fit.reset();
    m_items.reset();
    m_itemView->hide();
    LevelMapping mapping = currentMapping();
    for (auto it = mapping.begin(); it != mapping.end();)
        it = it.value().isEmpty() ? mapping.erase(it) : std::next(it);
    FitOptions options;
    options.adjust = Adjustment(m_adjust->currentData().toInt());
    const Result<Weight> alpha = parseWeight(m_alpha->text().trimmed());
    if (!alpha || !(alpha->value() > 0.0 && alpha->value() < 1.0)) {
        showMessage(tr("alpha: '%1' is not a number between 0 and 1 (both excluded)").arg(m_alpha->text()));
        return;
    }
    options.alpha = alpha->value();
    // A design is fitted over the cells that have data, or refused with the reason (fitDesign);
    // with a participant column, by participant (a mixed design, core/data/MixedFit.h).
    const auto overCells = [&]() -> Result<FitResult> {
        auto designFit = fitDesign(m_document->design(), *m_data, options, mapping);
        return designFit ? Result<FitResult>(std::move(designFit->fit)) : Result<FitResult>::failure(designFit.error());
    };
    const auto byParticipantOverCells = [&]() -> Result<FitResult> {
        auto mixed = fitMixedParticipants(m_document->design(), *m_data, options, mapping);
        return mixed ? Result<FitResult>(std::move(mixed->overall)) : Result<FitResult>::failure(mixed.error());
    };
    Result<FitResult> fit = m_data->participantIndex >= 0 && m_document->isDesign() ? byParticipantOverCells()
        : m_document->isDesign()        ? overCells()
        : m_data->participantIndex >= 0 ? fitParticipants(fitTarget(), *m_data, options, mapping)
                                        : fitScheme(fitTarget(), *m_data, options, mapping);
    if (!fit) {
        showMessage(fit.error());
        m_coefficients->setRows({});
        m_summary->clear();
        m_chart->clear(tr("No fit: see the message."));
        return;
    }
    showMessage({});
    m_fit = fit.take();
    m_items.reset();
    if (m_data->itemIndex >= 0) {
        auto items = m_document->isDesign() ? fitItems(m_document->design(), *m_data, *m_fit, options, mapping)
                                            : fitItems(fitTarget(), *m_data, *m_fit, options, mapping);
        if (items)
            m_items = items.take();
        else
            showMessage(items.error());
    }
    showFit(*m_fit);
}

void DataPanel::showFit(const FitResult &fit)
{
    const QString level = QString::number((1.0 - fit.alpha) * 100.0, 'g', 4);
    m_coefficients->setHeaders(coefficientHeaders(tr("%1% interval").arg(level)));
    TableRows rows;
    for (int i = 0; i < int(fit.coefficients.size()); ++i) {
        const FitCoefficient &c = fit.coefficients[size_t(i)];
        TableCell hypothesis = cell(c.hypothesis, false);
        hypothesis.toolTip = c.hypothesis;
        TableCell means = cell(number(c.hypothesisEstimate));
        if (std::isfinite(c.hypothesisEstimate) && !c.agrees) {
            means.text = look::mark(look::State::Caution) + u" "_s + means.text;
            means.ink = look::ink(look::State::Caution);
            means.toolTip = tr("The estimate is not this hypothesis applied to the observed means: with these group sizes "
                               "the coefficient tests something else.");
        }
        rows.push_back({cell(coefficientLabel(fit.intercept, i, c.name), false), cell(number(c.estimate)),
                        cell(u"%1 to %2"_s.arg(number(c.ciLow), number(c.ciHigh))), cell(pValueText(c.p)),
                        cell(c.inFamily ? pValueText(c.pAdjusted) : tr("not in family")), cell(number(c.se)),
                        cell(number(c.t, 3)), means, hypothesis});
    }
    m_coefficients->setRows(std::move(rows));

    QStringList lines;
    for (const QString &caution : fit.cautions) // first, before the figures they qualify
        lines << look::markedLine(look::State::Caution, caution);
    for (const QString &line : fitSummaryLines(fit, m_document->isDesign()))
        lines << line.toHtmlEscaped();
    if (!fit.hypothesesAgree)
        lines << look::markedLine(look::State::Caution,
                                  tr("Some coefficients do not estimate the scheme\u2019s hypotheses at these group sizes (marked below)."));
    if (m_items)
        for (const QString &line : itemSummaryLines(*m_items))
            lines << line.toHtmlEscaped();
    m_itemRows->setRows(m_items ? itemTableRows(*m_items) : TableRows{});
    m_itemView->setVisible(m_items.has_value());
    if (m_items)
        lines << look::markedLine(look::State::Caution, itemScopeSentence());
    else if (fit.byParticipant)
        lines << look::markedLine(look::State::Caution, tr("This is the by-participant analysis: each contrast on the participants' own "
                                                           "contrast scores. It is not a mixed-effects model with participants (and items) "
                                                           "as random effects; fit that with the exported coding in a statistics package."));
    m_summary->setText(lines.join(u"<br>"_s));

    // Means with intervals: core's fit of the cell-means coding (one coefficient per level, pooled SD).
    const int k = int(fit.levels.size());
    const Eigen::MatrixXd identity = Eigen::MatrixXd::Identity(k, k);
    const Result<FitResult> cells = fitLevels(MatchedLevels{fit.levels, fit.levelStats, {}}, identity, identity, fit.levels,
                                              false, FitOptions{fit.alpha, Adjustment::None});
    if (cells) {
        std::vector<SmallChart::Interval> intervals;
        for (const FitCoefficient &c : cells->coefficients)
            intervals.push_back({c.name, c.estimate, c.ciLow, c.ciHigh});
        m_chart->setAxisTitles(tr("%1 means, %2% intervals (pooled SD)").arg(m_document->isDesign() ? tr("cell") : tr("level"), level),
                               m_response->currentText());
        m_chart->setIntervals(std::move(intervals));
    } else {
        m_chart->clear(cells.error());
    }

    QStringList problems;
    if (m_data->skippedRows > 0) {
        problems << tr("%1 of %2 rows left out:").arg(m_data->skippedRows).arg(m_data->records);
        for (const RowProblem &r : m_data->skipped)
            problems << tr("  line %1: %2").arg(r.line).arg(r.message);
        if (m_data->skippedRows > qint64(m_data->skipped.size()))
            problems << tr("  and %1 more").arg(m_data->skippedRows - qint64(m_data->skipped.size()));
    }
    problems << fit.notes;
    if (m_items)
        problems << m_items->byItem.notes;
    m_problems->setText(problems.join(u"\n"_s));
    m_problems->setVisible(!problems.isEmpty());
}

void DataPanel::showMessage(const QString &message)
{
    m_message->setText(message.isEmpty() ? QString() : look::mark(look::State::Problem) + u" "_s + message);
    m_message->setVisible(!message.isEmpty());
}

QString DataPanel::message() const
{
    return m_message->isHidden() ? QString() : m_message->text();
}

QString DataPanel::unmatchedText() const
{
    return m_unmatched->isHidden() ? QString() : m_unmatched->text();
}

QString DataPanel::problemsText() const
{
    return m_problems->text();
}

QString DataPanel::summaryText() const
{
    return m_summary->text();
}

} // namespace cb
