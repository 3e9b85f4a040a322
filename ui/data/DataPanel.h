#pragma once

#include "core/data/DataFit.h"
#include "core/data/ItemFit.h"
#include "core/data/SummaryQuery.h"
#include "ui/common/Prompter.h"

#include <QWidget>

#include <atomic>
#include <memory>
#include <optional>

class QAction;
class QComboBox;
class QFormLayout;
class QLabel;
class QLayout;
class QLineEdit;
class QProgressDialog;
class QPushButton;
class QTableView;
class QThread;

namespace cb {

class CellTableModel;
class Document;
class Prompter;
class SmallChart;

// The data check: a long-format CSV/TSV file read in the background
// (readLevelData), its levels matched to the scheme's, and the scheme fitted
// (fitScheme). With a design open, the data name one column per factor and the
// design's coding over the cells is fitted (a row's cell is its values joined, "grass·early"). Shows the coefficients beside the hypotheses they test, the
// level means with intervals, the overall fit and the rows that were left out.
class DataPanel : public QWidget
{
    Q_OBJECT

public:
    // Columns of the coefficient table: the estimate, its interval and p first, so they are in view on a
    // laptop screen; the hypothesis in words last, where it takes the remaining width.
    enum CoefficientColumn {
        NameColumn, EstimateColumn, CiColumn, PColumn, PAdjustedColumn, SeColumn, TColumn, FromMeansColumn,
        HypothesisColumn, CoefficientColumnCount
    };
    enum MappingColumn { DataLevelColumn, RowsColumn, SchemeLevelColumn, MappingColumnCount };

    explicit DataPanel(Document *document, QWidget *parent = nullptr);
    ~DataPanel() override;

    // Previews the file and proposes columns. Returns false (and shows core's message) when it cannot be read.
    bool openFile(const QString &path);
    // Chooses the columns by header name (weight empty: none).
    void setColumns(const QString &factor, const QString &response, const QString &weight = {});
    // Reads the whole file in the background, then fits; finished() follows.
    void readAndFit();
    // Maps a data level to a scheme level (empty: not matched) and fits again.
    void mapLevel(const QString &dataLevel, const QString &schemeLevel);
    void setAdjustment(Adjustment adjust);

    const std::optional<DataSummary> &data() const { return m_data; }
    const std::optional<FitResult> &fit() const { return m_fit; }
    // The message shown when reading or fitting failed; empty otherwise.
    QString message() const;
    // Levels found on one side only, as shown ("In the data only: …").
    QString unmatchedText() const;
    QString problemsText() const;
    QString summaryText() const;
    QTableView *coefficientTable() const { return m_coefficientView; }
    QTableView *mappingTable() const { return m_mappingView; }
    QTableView *previewTable() const { return m_previewView; }
    QComboBox *responseBox() const { return m_response; }
    QComboBox *participantBox() const { return m_participant; }
    QComboBox *itemBox() const { return m_item; }
    // With an item column: the by-item analysis and min F' (core's fitItems), and its table.
    const std::optional<ItemAnalysis> &itemAnalysis() const { return m_items; }
    QTableView *itemTable() const { return m_itemView; }
    SmallChart *meansChart() const { return m_chart; }

    // Who answers "which data file?" (the window's prompter; the real dialog by default).
    void setPrompter(Prompter *prompter) { m_prompter = prompter; }

    // Data in a database: the program hands in the reader (app/gui/main.cpp gives every panel
    // app/database's; a test may give one panel its own). Without one, "Read from a database…"
    // (in the menu of "Open data…") is disabled.
    static void setDefaultDatabaseReader(DatabaseReader reader);
    void setDatabaseReader(DatabaseReader reader);
    // Asks (through the prompter) for the table and columns, writes the summary query and puts
    // it on the clipboard; false when cancelled or refused (the message is shown).
    bool copySummaryQuery();
    // Asks for the database, the table and the columns, reads the summary in the background and
    // fits it as a summary table; finished() follows (also after a failure).
    void readFromDatabase();

    static QStringList coefficientHeaders(const QString &interval);

signals:
    // A read (and fit) ended, with or without success.
    void finished();

private:
    // The constructor's steps.
    void buildTables();
    QLayout *buildFileColumn();
    QLayout *buildResultColumn();
    void connectInputs();

    // Runs job in the background behind a progress dialog; readFinished() takes its result.
    // measured: the job reports bytes of the open file (otherwise the dialog only shows it is busy).
    void startRead(std::function<Result<DataSummary>()> job, const QString &what, bool measured);
    void readFinished();
    // The question for the summary query, filled in with what the panel knows.
    SummaryQuestion summaryQuestion(bool withDatabase) const;
    Result<SummaryQuerySpec> specFromAnswer(const SummaryQuestion &answer) const;
    // The level table from the data's levels, the scheme's and the choices made.
    void rebuildMapping();
    void levelChosen(int row, int choice);
    void refit();
    void showFit(const FitResult &fit);
    void showMessage(const QString &message);
    void updateUnmatched();
    // The one-factor scheme, or with a design open the design's coding over its cells.
    const Scheme &fitTarget() const;
    QStringList targetLevels() const; // the levels, or every cell of a design
    // One column chooser per factor of the open design (the first alone for one factor).
    void updateFactorRows();
    LevelMapping currentMapping() const;

    Document *m_document;
    Prompter *m_prompter;
    QString m_path;
    char m_delimiter = ',';
    bool m_hasHeader = true;
    qint64 m_fileSize = -1;
    QLabel *m_fileLabel;
    CellTableModel *m_preview;
    QTableView *m_previewView;
    QComboBox *m_factor;
    // The second and third factors' columns (design only), with the form that shows them.
    QComboBox *m_moreFactors[2];
    QFormLayout *m_columnsForm = nullptr;
    QStringList m_factorNames; // the design's factor names the choosers were last set up for
    QComboBox *m_response; // the numeric columns only
    QComboBox *m_weight;
    QComboBox *m_participant; // "(none)" first, then the columns
    QComboBox *m_item;        // beside it: "(none)" first, then the columns
    QPushButton *m_readButton;
    QPushButton *m_copyQueryButton;
    QAction *m_databaseAction; // in the "Open data…" button's menu
    DatabaseReader m_databaseReader;
    SummaryQuestion m_lastSummaryQuestion; // the previous answers, offered again
    QComboBox *m_adjust;
    QLineEdit *m_alpha;
    CellTableModel *m_mapping;
    QTableView *m_mappingView;
    // Data level -> the scheme level chosen for it ("" for no match); a level not listed
    // stands for the scheme level of its own name.
    LevelMapping m_chosen;
    QLabel *m_unmatched;
    QLabel *m_message;
    QLabel *m_summary;
    CellTableModel *m_coefficients;
    QTableView *m_coefficientView;
    CellTableModel *m_itemRows;  // the by-item table, shown with an item column
    QTableView *m_itemView;
    SmallChart *m_chart;
    QLabel *m_problems;

    // The background read.
    QThread *m_thread = nullptr;
    QProgressDialog *m_progress = nullptr;
    std::shared_ptr<std::atomic<qint64>> m_bytesRead;
    std::shared_ptr<std::atomic<bool>> m_cancel;
    std::shared_ptr<std::optional<Result<DataSummary>>> m_readResult;

    std::optional<DataSummary> m_data;
    std::optional<FitResult> m_fit;
    std::optional<ItemAnalysis> m_items;
};

} // namespace cb
