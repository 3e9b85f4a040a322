#pragma once

#include "core/analysis/Analysis.h"
#include "core/model/Factor.h"
#include "core/model/PowerPlan.h"
#include "core/power/Power.h"

#include <QHash>

#include <functional>
#include <QWidget>

class QLayout;

#include <optional>

class QCheckBox;
class QFormLayout;
class QHBoxLayout;
class QComboBox;
class QLabel;
class QLineEdit;
class QPlainTextEdit;
class QTableView;

namespace cb {

class CellTableModel;
class Document;
class SmallChart;

// Power and sample size for the planned contrasts of the open scheme (for a
// design: of each design column over the cell means). The analyst types the
// expected mean (or difference from a baseline) of each level or cell and the spread; every number shown comes from core's computePower and
// powerCurve, recomputed on every edit of the inputs or of the scheme.
class PowerPanel : public QWidget
{
    Q_OBJECT

public:
    // Columns of the per-level input table.
    enum InputColumn { LevelColumn, ExpectedColumn, SdColumn, PlannedNColumn, RatioColumn, InputColumnCount };
    // Columns of the result table.
    // Columns of the result table: what the analyst came for (power, the n needed) first, so it is in
    // view on a laptop screen; the estimate and its parts after.
    enum ResultColumn {
        TestColumn, PowerColumn, NeededColumn, NeededTotalColumn, EstimateColumn, SeColumn, EffectColumn, DfColumn,
        VersusOmnibusColumn, ResultColumnCount
    };
    enum class SizeSource { PlannedN, RatiosAndTotal };

    explicit PowerPanel(Document *document, QWidget *parent = nullptr);

    // Inputs, for tests and scripted use: one text per level, in level order.
    void setExpectedTexts(const QStringList &texts);
    void setLevelSdTexts(const QStringList &texts); // switches to per-level SDs
    void setRatioTexts(const QStringList &texts);
    void setUseDifferences(bool differences, int baseline = 0);
    void setSizeSource(SizeSource source);

    QLineEdit *sdEdit() const { return m_sd; }
    QLineEdit *totalEdit() const { return m_total; }
    QLineEdit *correlationEdit() const { return m_correlation; }
    // Within participants: "full matrix" instead of one common correlation, and the matrix typed or
    // pasted (one row per line, values separated by commas, semicolons, tabs or spaces).
    QCheckBox *fullMatrixBox() const { return m_fullMatrix; }
    QPlainTextEdit *correlationsEdit() const { return m_correlations; }
    QWidget *correlationColumn() const { return m_correlationColumn; }
    QLineEdit *alphaEdit() const { return m_alpha; }
    QLineEdit *targetEdit() const { return m_target; }
    QComboBox *adjustmentBox() const { return m_adjustment; }
    QComboBox *sidedBox() const { return m_sided; }
    QTableView *inputTable() const { return m_inputView; }
    QTableView *resultTable() const { return m_resultView; }
    SmallChart *chart() const { return m_chart; }

    // The message shown next to an input ("sd", "total", "alpha", "target", "levels"), empty when none.
    QString fieldMessage(const QString &field) const;
    // The settings read from the inputs, or the first message about them.
    Result<PowerSettings> settings() const;
    // The last report shown; empty while the inputs are incomplete or invalid.
    const std::optional<PowerReport> &report() const { return m_report; }

public slots:
    // Recomputes now (edits schedule this on the next turn of the event loop, or, while the
    // window is shown with this panel out of sight, for when it is shown).
    void recompute();

protected:
    void showEvent(QShowEvent *event) override;

private:
    // The constructor's steps.
    void buildTables();
    QLayout *buildInputForm();
    QWidget *buildCorrelationColumn();
    QLabel *addFormField(QFormLayout *form, const QString &text, QWidget *field, const QString &key);
    QWidget *sideBySide(QWidget *a, QWidget *b, int bStretch);
    void updateCorrelationRows();
    QLayout *buildResultColumn();
    void connectInputs();

    void followDocument();
    const Factor &factor() const;     // the scheme's factor, or the design's cells
    const Analysis &analysis() const; // the scheme's analysis, or the design's over the cells
    bool within() const;              // the factor is measured within participants (or the design has such a factor)
    bool mixed() const;               // a design with a factor measured within participants (core/power/MixedPower.h)
    bool differences() const;
    void showInputs();
    void inputEdited(int row, int column, const QString &text);
    void setLevelText(const QString &level, int column, const QString &text);
    // One edit of the study's power plan (an undo step; edits with the same key fold into one).
    void editPlan(const std::function<void(PowerPlan &)> &change, const QString &key = {});
    void showPlan();
    void updateColumnVisibility();
    void schedule();
    void showMessages(const Problem &problem);
    void showReport(const PowerReport &report, const ContrastRows &rows, const PowerSettings &settings);
    void setColumnTexts(int column, const QStringList &texts);

    Document *m_document;
    CellTableModel *m_inputs;
    QTableView *m_inputView;
    QComboBox *m_expectedKind;
    QComboBox *m_baseline;
    QLineEdit *m_sd;
    QCheckBox *m_perLevelSd;
    QComboBox *m_sizeSource;
    QLineEdit *m_total;               // total N, or within participants the number of participants
    QLineEdit *m_correlation;         // within participants: one common correlation
    QCheckBox *m_fullMatrix;          // within participants: the full matrix instead
    QPlainTextEdit *m_correlations;   // the full matrix, k x k
    QWidget *m_correlationColumn = nullptr; // shown within participants only, beside the inputs
    QHBoxLayout *m_columns = nullptr; // inputs, correlations, results, curves
    QFormLayout *m_form = nullptr;
    QLabel *m_sizeSourceLabel = nullptr;
    QLabel *m_totalLabel = nullptr;
    QLabel *m_cautions = nullptr;
    QLabel *m_withinWhy = nullptr;    // why within needs fewer participants (withinExplanation)
    QLineEdit *m_alpha;
    QComboBox *m_sided;
    QLineEdit *m_target;
    QComboBox *m_adjustment;
    QHash<QString, QLabel *> m_fieldNotes; // "sd", "total", "alpha", "target", "levels"
    QLabel *m_general;
    CellTableModel *m_results;
    QTableView *m_resultView;
    QLabel *m_notes;
    SmallChart *m_chart;
    QStringList m_levels;
    bool m_scheduled = false;
    bool m_stale = false; // a computation waits until the panel is shown
    bool m_showingPlan = false; // the widgets are being set from the plan: their signals are no edits
    std::optional<PowerReport> m_report;
};

} // namespace cb
