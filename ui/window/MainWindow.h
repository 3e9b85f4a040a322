#pragma once

#include "ui/document/RecentFiles.h"
#include "ui/document/RecoveryStore.h"
#include "core/report/StudySheet.h"

#include <QElapsedTimer>
#include <QMainWindow>

#include <memory>

class QDockWidget;
class QLabel;
class QMenu;
class QTimer;

namespace cb {

class CodingPanel;
class DesignPanel;
class Document;
class HealthPanel;
class LevelsPanel;
class MeaningPanel;
class PowerPanel;
class Prompter;

// What the window is given from outside; tests replace each part.
struct WindowOptions
{
    Prompter *prompter = nullptr;    // not owned; null means the real dialogs
    QString settingsFile;            // empty: the application's QSettings
    QString recoveryDirectory;       // empty: QStandardPaths::AppDataLocation
    // The recovery file is written this long after the last edit (typing resets the wait), and
    // at least every ten such delays while edits keep coming.
    int recoveryDelayMs = 1'000;
    bool useRecovery = true;         // off for screenshots
    bool rememberLayout = true;      // restore and keep the window's size and panels (off for screenshots)
};

// The workbench window: levels on the left, the coding grid in the middle,
// what each coefficient tests on the right, design health below. Other
// panels (power, data fit, export) are added with addPanel().
class MainWindow : public QMainWindow
{
    Q_OBJECT

public:
    explicit MainWindow(const WindowOptions &options = {}, QWidget *parent = nullptr);
    ~MainWindow() override;

    Document *document() const { return m_document; }
    CodingPanel *codingPanel() const { return m_coding; }
    MeaningPanel *meaningPanel() const { return m_meaning; }
    HealthPanel *healthPanel() const { return m_health; }
    LevelsPanel *levelsPanel() const { return m_levels; }
    DesignPanel *designPanel() const { return m_design; }
    QDockWidget *designDock() const { return m_designDock; }
    const RecoveryStore &recoveryStore() const { return m_recovery; }
    RecentFiles &recentFiles() { return m_recent; }
    // The single-shot timer that writes the recovery file after an edit.
    QTimer *recoveryTimer() const { return m_recoveryTimer; }

    // The text of Help > About, with the version from the project's CMake version.
    static QString aboutText();
    // Help > Guide to the window: what each panel shows and what the symbols mean.
    static QString guideText();

    // Adds a panel as a tab beside "Design health" (inside a scroll area) and returns its dock.
    QDockWidget *addPanel(QWidget *panel, const QString &title, const QString &objectName);

    // View > Reset layout: the panels where they start, at a size that fits the screen.
    void resetLayout();

    // File commands. Each asks about unsaved work first where that applies,
    // and reports failures through the prompter. They return whether they happened.
    bool newScheme();
    bool openFile(const QString &path);
    bool openDemo(const QString &name);
    bool save();
    bool saveAs();
    bool saveTo(const QString &path);
    // At start: offers to restore work left by a crash. Returns true when restored.
    bool offerRecovery();
    // Writes the recovery file when there is unsaved, unwritten work (the timer's step).
    bool writeRecovery();

protected:
    void closeEvent(QCloseEvent *event) override;
    void showEvent(QShowEvent *event) override;
    void dragEnterEvent(QDragEnterEvent *event) override;
    void dropEvent(QDropEvent *event) override;

private:
    bool maybeSave();
    bool load(const QString &path);
    // The constructor's steps.
    void buildDocks();
    void buildMenus();
    void buildStatusBar();
    void followDocument();
    void startRecovery();
    void restoreLayout();
    void rebuildRecentMenu();
    void updateTitle();
    void showMessage(const QString &text);
    void scheduleRecovery();
    void sizeDocks();
    void fitToScreen();

    WindowOptions m_options;
    Prompter *m_prompter;
    PowerPanel *m_power = nullptr;
    // The sheet's options: the document's, with the Power panel's settings when they are complete.
    SheetOptions sheetOptions() const;
    Document *m_document;
    CodingPanel *m_coding;
    MeaningPanel *m_meaning = nullptr;
    HealthPanel *m_health = nullptr;
    LevelsPanel *m_levels = nullptr;
    DesignPanel *m_design = nullptr;
    QDockWidget *m_designDock = nullptr;
    bool m_wasDesign = false;
    bool m_docksSized = false; // the side docks get their widths once, when first shown
    QByteArray m_startState;   // the panels as built, for Reset layout
    QDockWidget *m_healthDock = nullptr;
    // A raised work panel (Power, Check on data) gets room for its inputs and results: the
    // bottom panels grow to workDockHeight while it is in front, and go back to the height they
    // had when the health panel is raised again, unless the person resized them meanwhile.
    void workPanelRaised(QDockWidget *dock);
    void healthPanelRaised();
    void restoreGridHeight(int request, int corrections);
    // Which docks own the bottom-right corner: in a design the right-hand docks run the full
    // height, except while a work panel is in front, which then gets the width beside the factor
    // panel for its inputs, results and curves.
    void placeBottomRightCorner();
    bool m_workInFront = false;
    bool m_grownForWork = false;
    int m_gridHeightBeforeWork = 0; // the central grid's height before the panels grew
    int m_gridHeightAtWork = 0;     // and after
    int m_workRequest = 0;          // the height asked of resizeDocks
    QMenu *m_recentMenu = nullptr;
    QMenu *m_viewMenu = nullptr;
    QLabel *m_arithmetic = nullptr;
    RecentFiles m_recent;
    RecoveryStore m_recovery;
    QTimer *m_recoveryTimer;
    QElapsedTimer m_unwrittenSince; // invalid while the recovery file holds the latest edit
    quint64 m_recoveredRevision = 0;
};

} // namespace cb
