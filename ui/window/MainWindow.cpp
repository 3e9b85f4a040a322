#include "ui/window/MainWindow.h"

#include "core/files/StudyFile.h"
#include "ui/coding/CodingPanel.h"
#include "ui/common/CachedText.h"
#include "ui/data/DataPanel.h"
#include "ui/design/DesignPanel.h"
#include "ui/window/Demos.h"
#include "ui/export/ExportDialog.h"
#include "ui/sheet/SheetWindow.h"
#include "ui/document/Document.h"
#include "ui/health/HealthPanel.h"
#include "ui/levels/LevelsPanel.h"
#include "ui/meaning/MeaningPanel.h"
#include "ui/power/PowerPanel.h"
#include "ui/common/Look.h"
#include "ui/common/Prompter.h"
#include "ui/common/Settings.h"
#include "core/base/Version.h"
#include "core/files/SchemeFile.h"
#include "ui/coding/WeightGridView.h"

#include <QApplication>
#include <QGuiApplication>
#include <QCloseEvent>
#include <QDir>
#include <QDockWidget>
#include <QFileInfo>
#include <QLabel>
#include <QLocale>
#include <QMenuBar>
#include <QMessageBox>
#include <QMimeData>
#include <QScreen>
#include <QScrollArea>
#include <QSettings>
#include <QStatusBar>
#include <QTimer>
#include <QToolBar>
#include <QUndoStack>
#include <QUrl>

#include <algorithm>
#include <cstdlib>
#include <utility>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// Below this width (a laptop's 1024-pixel screen) the factor's levels share the right-hand dock
// area with the coefficient cards, so the grid keeps room for its columns.
constexpr int kNarrowWidth = 1200;

// The bottom panels' share of the height: less on a low screen, where the grid needs the room.
int bottomDockHeight(int windowHeight)
{
    return std::clamp(windowHeight * 26 / 100, 170, 240);
}

// The height a raised work panel (Power, Check on data) gets: its inputs, results and cautions
// need more than the health summary, and the person is working there now.
int workDockHeight(int windowHeight)
{
    return std::clamp(windowHeight * 45 / 100, 240, 420);
}

const QString kGeometryKey = u"window/geometry"_s;
const QString kStateKey = u"window/state"_s;

// Panels below the grid sit in a scroll area: none can push the grid out of sight with its
// minimum size, and a panel whose labels change on every edit lays out only itself, not the
// whole window.
QScrollArea *scrolling(QWidget *panel, QWidget *parent)
{
    auto *scroll = new QScrollArea(parent);
    scroll->setWidget(panel);
    scroll->setWidgetResizable(true);
    scroll->setFrameShape(QFrame::NoFrame);
    return scroll;
}

} // namespace

MainWindow::MainWindow(const WindowOptions &options, QWidget *parent)
    : QMainWindow(parent)
    , m_options(options)
    , m_prompter(options.prompter ? options.prompter : &dialogPrompter())
    , m_document(new Document(this))
    , m_coding(new CodingPanel(m_document, this))
    , m_recent(options.settingsFile)
    , m_recovery(options.recoveryDirectory)
    , m_recoveryTimer(new QTimer(this))
{
    setObjectName(u"mainWindow"_s);
    setWindowIcon(QIcon(u":/contrast-bench.svg"_s));
    setCentralWidget(m_coding);
    setAcceptDrops(true);
    setDockNestingEnabled(true);
    buildDocks();
    buildMenus();
    m_power = new PowerPanel(m_document, this);
    addPanel(m_power, tr("Power"), u"powerDock"_s);
    auto *data = new DataPanel(m_document, this);
    data->setPrompter(m_prompter);
    addPanel(data, tr("Check on data"), u"dataDock"_s);
    buildStatusBar();
    useCachedText(this);
    followDocument();
    startRecovery();
    updateTitle();
    m_startState = saveState();
    fitToScreen();
    restoreLayout();
}

void MainWindow::buildStatusBar()
{
    m_arithmetic = new QLabel(this);
    statusBar()->addPermanentWidget(m_arithmetic);
    connect(m_coding, &CodingPanel::message, this, &MainWindow::showMessage);
    connect(m_levels, &LevelsPanel::message, this, &MainWindow::showMessage);
    connect(m_design, &DesignPanel::message, this, &MainWindow::showMessage);
    auto showArithmetic = [this] {
        m_arithmetic->setText(m_document->analysis().exact ? tr("exact fractions") : tr("floating point"));
    };
    connect(m_document, &Document::changed, this, showArithmetic);
    showArithmetic();
}

// What the window itself shows of the document: the docks' titles and places for a design, the title bar.
void MainWindow::followDocument()
{
    connect(m_document, &Document::changed, this, [this] {
        if (m_document->isDesign() != m_wasDesign) {
            // A design needs room for its cell picture and findings: the right-hand docks then
            // run the full height of the window.
            placeBottomRightCorner();
            if (m_document->isDesign()) {
                m_designDock->raise();
                resizeDocks({m_designDock}, {470}, Qt::Horizontal);
            }
        }
        m_wasDesign = m_document->isDesign();
        // In a design the one-factor panels show the active factor on its own: their titles say so.
        const QString name = m_document->scheme().factor.name;
        m_healthDock->setWindowTitle(m_document->isDesign() ? tr("Health of the %1 coding on its own").arg(name) : tr("Design health"));
        if (auto *levels = findChild<QDockWidget *>(u"levelsDock"_s))
            levels->setWindowTitle(m_document->isDesign() ? tr("Factor %1 and its levels (\u270e in the design)").arg(name) : tr("Factor and levels"));
    });
    connect(m_coding, &CodingPanel::currentCoefficientChanged, m_meaning, &MeaningPanel::showCoefficient);
    connect(m_document, &Document::modifiedChanged, this, &MainWindow::updateTitle);
    connect(m_document, &Document::filePathChanged, this, &MainWindow::updateTitle);
}

// The recovery file follows the edits within about a second: a killed window loses at most
// the edit being typed. A saved document needs none.
void MainWindow::startRecovery()
{
    connect(m_document->undoStack(), &QUndoStack::cleanChanged, this, [this](bool clean) {
        if (clean && m_options.useRecovery)
            m_recovery.discard();
    });
    m_recoveryTimer->setSingleShot(true);
    m_recoveryTimer->setInterval(m_options.recoveryDelayMs);
    connect(m_recoveryTimer, &QTimer::timeout, this, &MainWindow::writeRecovery);
    connect(m_document, &Document::changed, this, &MainWindow::scheduleRecovery);
}

// The size and panels the window was left with, when it is to remember them.
void MainWindow::restoreLayout()
{
    if (!m_options.rememberLayout)
        return;
    const auto settings = openSettings(m_options.settingsFile);
    const QByteArray geometry = settings->value(kGeometryKey).toByteArray();
    // restoreGeometry keeps the window on a screen that is still there.
    if (!geometry.isEmpty() && restoreGeometry(geometry) && restoreState(settings->value(kStateKey).toByteArray()))
        m_docksSized = true; // the panels keep the widths they were left at
}

void MainWindow::fitToScreen()
{
    // The size the panels are laid out for, or less: within the screen's free area, frame included.
    QScreen *where = screen() ? screen() : QGuiApplication::primaryScreen();
    const QRect free = where ? where->availableGeometry() : QRect(0, 0, 1400, 900);
    const QSize frame(16, 48); // window frame and title bar, drawn outside the window's own size
    const QSize size = QSize(1400, 900).boundedTo(free.size() - frame);
    resize(size);
    move(free.topLeft() + QPoint((free.width() - size.width() - frame.width()) / 2, (free.height() - size.height() - frame.height()) / 2));
}

void MainWindow::resetLayout()
{
    restoreState(m_startState);
    for (QDockWidget *d : findChildren<QDockWidget *>())
        d->setFloating(false);
    fitToScreen();
    sizeDocks();
    if (m_options.rememberLayout) {
        const auto settings = openSettings(m_options.settingsFile);
        settings->remove(kGeometryKey);
        settings->remove(kStateKey);
    }
}

QString MainWindow::aboutText()
{
    return tr("<b>Contrast Bench %1</b><p>A workbench for designing contrast codings of categorical predictors: "
              "type a coding and read, in exact fractions, what each coefficient tests.</p>")
        .arg(QString::fromUtf16(cb::kVersion));
}

QString MainWindow::guideText()
{
    return tr("<h3>The panels</h3>"
              "<p><b>Coding grid</b> (middle): one row per level, one column per coefficient. Type weights (\u201c1/3\u201d, "
              "\u201c\u22121\u201d), paste blocks from a spreadsheet, double-click a column\u2019s title to name it. "
              "<i>Start from</i> gives a standard coding. Below the levels, three rows check each column:</p>"
              "<ul><li><b>\u03a3 sums to</b>: the column\u2019s sum as typed (0 means it is a contrast);</li>"
              "<li><b>\u22a5 not orthogonal to</b>: the columns it is not orthogonal to;</li>"
              "<li><b>VIF</b>: how much the other columns inflate its variance.</li></ul>"
              "<p><i>Hypotheses \u2192 coding</i> (Ctrl+2) goes the other way: type the comparisons, read the coding.</p>"
              "<p><b>Factor and levels</b> (left): the factor\u2019s name, its levels in order (Ctrl+Up/Down moves one), "
              "the planned n of each and, for trends, their positions.</p>"
              "<p><b>What each coefficient tests</b> (right): one card per coefficient, in symbols and in words, with bars "
              "for the weight it puts on each level\u2019s mean. <b>Design</b> (beside it) adds factors, their terms and cells.</p>"
              "<p><b>Design health</b>, <b>Power</b> and <b>Check on data</b> (below): rank, condition number, VIF and what to "
              "look at; the power of each test for the planned n; the coding fitted to a CSV file.</p>"
              "<h3>The symbols</h3>"
              "<ul><li><b>%1</b> fine: nothing to flag;</li>"
              "<li><b>%2</b> caution: worth a look (a threshold of common practice is reached);</li>"
              "<li><b>%3</b> problem: the check fails (a column that is not a contrast, a pair that is not orthogonal, "
              "a coefficient that cannot be estimated);</li>"
              "<li><b>\u25b2</b> / <b>\u25bc</b> in the bars and cell pictures: the level or cell is counted in above "
              "(positive weight) or below (negative weight) the line.</li></ul>"
              "<p>View \u25b8 Reset layout puts the panels back where they started.</p>")
        .arg(look::mark(look::State::Good), look::mark(look::State::Caution), look::mark(look::State::Problem));
}

MainWindow::~MainWindow()
{
    // The document is destroyed with the other children, after this object's members:
    // its last signals (the undo stack clearing itself) must not reach them.
    m_document->undoStack()->disconnect(this);
    m_document->disconnect(this);
}

void MainWindow::buildDocks()
{
    auto dock = [this](QWidget *w, const QString &title, const QString &name, Qt::DockWidgetArea area) {
        auto *d = new QDockWidget(title, this);
        d->setObjectName(name);
        d->setWidget(w);
        d->setFeatures(QDockWidget::DockWidgetMovable | QDockWidget::DockWidgetFloatable | QDockWidget::DockWidgetClosable);
        addDockWidget(area, d);
        return d;
    };
    m_levels = new LevelsPanel(m_document, this);
    m_meaning = new MeaningPanel(m_document, this);
    m_health = new HealthPanel(m_document, this);
    m_design = new DesignPanel(m_document, this);
    setCorner(Qt::BottomLeftCorner, Qt::LeftDockWidgetArea);
    setCorner(Qt::BottomRightCorner, Qt::BottomDockWidgetArea);
    dock(m_levels, tr("Factor and levels"), u"levelsDock"_s, Qt::LeftDockWidgetArea);
    auto *meaning = dock(m_meaning, tr("What each coefficient tests"), u"meaningDock"_s, Qt::RightDockWidgetArea);
    m_healthDock = dock(scrolling(m_health, this), tr("Design health"), u"healthDock"_s, Qt::BottomDockWidgetArea);
    resizeDocks({m_healthDock}, {bottomDockHeight(height())}, Qt::Vertical);
    connect(m_healthDock, &QDockWidget::visibilityChanged, this, [this](bool visible) {
        if (visible)
            healthPanelRaised();
    });
    // The design view: a tab beside the coefficient cards, brought forward when the study becomes a
    // design. The side docks' widths are set when the window is first shown (showEvent): before
    // that, a tabbed dock area does not keep them.
    m_designDock = dock(scrolling(m_design, this), tr("Design"), u"designDock"_s, Qt::RightDockWidgetArea);
    tabifyDockWidget(meaning, m_designDock);
    meaning->raise();
}

QDockWidget *MainWindow::addPanel(QWidget *panel, const QString &title, const QString &objectName)
{
    auto *d = new QDockWidget(title, this);
    d->setObjectName(objectName);
    d->setWidget(scrolling(panel, this));
    addDockWidget(Qt::BottomDockWidgetArea, d);
    tabifyDockWidget(m_healthDock, d);
    m_healthDock->raise();
    resizeDocks({m_healthDock}, {bottomDockHeight(height())}, Qt::Vertical);
    connect(d, &QDockWidget::visibilityChanged, this, [this, d](bool visible) {
        if (visible)
            workPanelRaised(d);
    });
    if (m_viewMenu)
        m_viewMenu->addAction(d->toggleViewAction());
    return d;
}

void MainWindow::workPanelRaised(QDockWidget *dock)
{
    if (dock->isFloating() || dockWidgetArea(dock) != Qt::BottomDockWidgetArea || !isVisible())
        return;
    m_workInFront = true;
    placeBottomRightCorner();
    const int target = workDockHeight(height());
    if (dock->height() >= target)
        return;
    if (!m_grownForWork)
        m_gridHeightBeforeWork = centralWidget()->height();
    m_grownForWork = true;
    resizeDocks({dock}, {target}, Qt::Vertical);
    // Where the layout settles (a tabbed dock is shorter than the size asked for, by its tabs,
    // and the grid keeps its minimum), once it has.
    QTimer::singleShot(0, this, [this, target] {
        m_workRequest = target;
        m_gridHeightAtWork = centralWidget()->height();
    });
}

void MainWindow::healthPanelRaised()
{
    m_workInFront = false;
    placeBottomRightCorner();
    if (!std::exchange(m_grownForWork, false) || m_workRequest == 0 || m_healthDock->isFloating())
        return;
    // Only the room this window took is given back: a height the person dragged to stays. The
    // grid's height falls by what the request rises, so this request gives the grid its height back.
    if (std::abs(centralWidget()->height() - m_gridHeightAtWork) > 2)
        return;
    restoreGridHeight(m_workRequest + m_gridHeightAtWork - m_gridHeightBeforeWork, 2);
}

void MainWindow::placeBottomRightCorner()
{
    const bool rightDocks = m_document->isDesign() && !m_workInFront;
    setCorner(Qt::BottomRightCorner, rightDocks ? Qt::RightDockWidgetArea : Qt::BottomDockWidgetArea);
}

// Asks the bottom panels for request, then, once laid out, corrects by what the grid still lacks:
// the request and the grid's height move together only where neither is at a limit, and the tabs
// of the panel in front differ a little in height.
void MainWindow::restoreGridHeight(int request, int corrections)
{
    resizeDocks({m_healthDock}, {request}, Qt::Vertical);
    if (corrections == 0)
        return;
    QTimer::singleShot(0, this, [this, request, corrections] {
        if (const int off = m_gridHeightBeforeWork - centralWidget()->height(); off != 0)
            restoreGridHeight(request - off, corrections - 1);
    });
}

SheetOptions MainWindow::sheetOptions() const
{
    SheetOptions o = documentSheetOptions(*m_document);
    if (m_power->report())
        if (auto s = m_power->settings())
            o.power = s.take();
    return o;
}

void MainWindow::buildMenus()
{
    QMenu *file = menuBar()->addMenu(tr("&File"));
    QAction *newAction = file->addAction(tr("&New scheme"), this, [this] { newScheme(); });
    newAction->setShortcut(QKeySequence::New);
    QAction *openAction = file->addAction(tr("&Open\u2026"), this, [this] {
        if (!maybeSave())
            return;
        const QString start = m_document->filePath().isEmpty() ? QString() : QFileInfo(m_document->filePath()).absolutePath();
        const QString path = m_prompter->askOpenPath(this, studyToOpen(start));
        if (!path.isEmpty())
            load(path);
    });
    openAction->setShortcut(QKeySequence::Open);
    m_recentMenu = file->addMenu(tr("Open &recent"));
    connect(m_recentMenu, &QMenu::aboutToShow, this, &MainWindow::rebuildRecentMenu);
    QMenu *demos = file->addMenu(tr("&Demo studies"));
    for (const DemoStudy &d : demoStudies())
        demos->addAction(d.title, this, [this, name = d.name] { openDemo(name); });
    file->addSeparator();
    QAction *saveAction = file->addAction(tr("&Save"), this, [this] { save(); });
    saveAction->setShortcut(QKeySequence::Save);
    QAction *saveAsAction = file->addAction(tr("Save &as\u2026"), this, [this] { saveAs(); });
    saveAsAction->setShortcut(QKeySequence::SaveAs);
    file->addAction(tr("&Export\u2026"), this, [this] {
        auto *dialog = new ExportDialog(m_document, this);
        dialog->setPrompter(m_prompter);
        dialog->setAttribute(Qt::WA_DeleteOnClose);
        dialog->open();
    })->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_E));
    QMenu *sheet = file->addMenu(tr("Study &sheet"));
    sheet->setObjectName(u"studySheetMenu"_s);
    sheet->addAction(tr("Save as &HTML\u2026"), this, [this] { saveSheetAs(this, *m_document, *m_prompter, sheetOptions(), false); });
    sheet->addAction(tr("Save as &PDF\u2026"), this, [this] { saveSheetAs(this, *m_document, *m_prompter, sheetOptions(), true); });
    sheet->addAction(tr("&Print\u2026"), this, [this] { previewSheet(this, *m_document, sheetOptions()); })->setShortcut(QKeySequence::Print);
    file->addSeparator();
    QAction *quit = file->addAction(tr("&Quit"), this, &QWidget::close);
    quit->setShortcut(QKeySequence::Quit);

    QMenu *edit = menuBar()->addMenu(tr("&Edit"));
    // Undo and redo name the step; a name with "&" in it shows the "&" (no mnemonic is made of it).
    QUndoStack *stack = m_document->undoStack();
    auto historyAction = [this, stack](const QString &verb, auto canChanged, auto textChanged, auto run) {
        auto *a = new QAction(verb, this);
        a->setEnabled(false);
        connect(stack, canChanged, a, &QAction::setEnabled);
        connect(stack, textChanged, a, [a, verb](const QString &step) {
            a->setText(step.isEmpty() ? verb : tr("%1 %2").arg(verb, QString(step).replace(u"&"_s, u"&&"_s)));
        });
        connect(a, &QAction::triggered, stack, run);
        return a;
    };
    QAction *undo = historyAction(tr("&Undo"), &QUndoStack::canUndoChanged, &QUndoStack::undoTextChanged, &QUndoStack::undo);
    QAction *redo = historyAction(tr("&Redo"), &QUndoStack::canRedoChanged, &QUndoStack::redoTextChanged, &QUndoStack::redo);
    undo->setObjectName(u"undoAction"_s);
    redo->setObjectName(u"redoAction"_s);
    undo->setShortcuts(QKeySequence::Undo);
    // Ctrl+Y as well as the platform's own redo keys (Ctrl+Shift+Z here).
    QList<QKeySequence> redoKeys = QKeySequence::keyBindings(QKeySequence::Redo);
    for (const QKeySequence &k : {QKeySequence(Qt::CTRL | Qt::Key_Y), QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_Z)})
        if (!redoKeys.contains(k))
            redoKeys << k;
    redo->setShortcuts(redoKeys);
    edit->addAction(undo);
    edit->addAction(redo);
    edit->addSeparator();
    auto gridAction = [this, edit](const QString &text, const QKeySequence &keys, void (*run)(WeightGridView *)) {
        QAction *a = edit->addAction(text, this, [this, run] {
            auto *focused = qobject_cast<WeightGridView *>(QApplication::focusWidget());
            run(focused ? focused : m_coding->activeView());
        });
        a->setShortcut(keys);
        a->setShortcutContext(Qt::WidgetWithChildrenShortcut);
        m_coding->addAction(a);
        return a;
    };
    gridAction(tr("&Copy cells"), QKeySequence::Copy, [](WeightGridView *v) { v->copy(); });
    gridAction(tr("&Paste cells"), QKeySequence::Paste, [](WeightGridView *v) { v->paste(); });
    gridAction(tr("C&lear cells to 0 (Del)"), {}, [](WeightGridView *v) { v->clearSelectedCells(); });
    edit->addSeparator();
    edit->addAction(tr("Add a &level"), m_levels, &LevelsPanel::addLevel);
    edit->addAction(tr("Remove the level"), m_levels, &LevelsPanel::removeLevel);
    edit->addAction(tr("Add a coding c&olumn"), m_coding, &CodingPanel::addColumn);
    edit->addAction(tr("Remove the coding column"), m_coding, &CodingPanel::removeColumn);

    m_viewMenu = menuBar()->addMenu(tr("&View"));
    QAction *forward = m_viewMenu->addAction(tr("Coding \u2192 hypotheses"), this, [this] { m_coding->showDirection(CodingPanel::CodingDirection); });
    forward->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_1));
    QAction *backward = m_viewMenu->addAction(tr("Hypotheses \u2192 coding"), this, [this] { m_coding->showDirection(CodingPanel::HypothesisDirection); });
    backward->setShortcut(QKeySequence(Qt::CTRL | Qt::Key_2));
    QAction *reset = m_viewMenu->addAction(tr("Reset &layout"), this, &MainWindow::resetLayout);
    reset->setObjectName(u"resetLayoutAction"_s);
    m_viewMenu->addAction(tr("Co&mpare with another coding\u2026"), this, [this] {
        auto *dialog = new CompareDialog(m_document, m_prompter, this);
        dialog->setObjectName(u"compareDialog"_s);
        dialog->setAttribute(Qt::WA_DeleteOnClose);
        dialog->open();
    });
    m_viewMenu->addSeparator();
    const QList<QDockWidget *> docks = findChildren<QDockWidget *>();
    for (QDockWidget *d : docks)
        m_viewMenu->addAction(d->toggleViewAction());

    QMenu *help = menuBar()->addMenu(tr("&Help"));
    QAction *guide = help->addAction(tr("&Guide to the window"), this, [this] {
        QMessageBox box(QMessageBox::NoIcon, tr("Guide to the window"), guideText(), QMessageBox::Close, this);
        box.setTextFormat(Qt::RichText);
        box.exec();
    });
    guide->setObjectName(u"guideAction"_s);
    guide->setShortcut(QKeySequence::HelpContents);
    help->addAction(tr("&About Contrast Bench"), this, [this] {
        QMessageBox::about(this, tr("About Contrast Bench"), aboutText());
    });

    QToolBar *bar = addToolBar(tr("Main"));
    bar->setObjectName(u"mainToolBar"_s);
    bar->setMovable(false);
    bar->setToolButtonStyle(Qt::ToolButtonTextOnly);
    bar->addAction(newAction);
    bar->addAction(openAction);
    bar->addAction(saveAction);
    bar->addSeparator();
    bar->addAction(undo);
    bar->addAction(redo);
}

void MainWindow::rebuildRecentMenu()
{
    m_recentMenu->clear();
    const QStringList paths = m_recent.paths();
    for (const QString &p : paths)
        m_recentMenu->addAction(QFileInfo(p).fileName() + u"   \u2014 "_s + QFileInfo(p).absolutePath(), this, [this, p] { openFile(p); });
    if (paths.isEmpty())
        m_recentMenu->addAction(tr("(none yet)"))->setEnabled(false);
    else {
        m_recentMenu->addSeparator();
        m_recentMenu->addAction(tr("Forget these files"), this, [this] { m_recent.clear(); });
    }
}

void MainWindow::updateTitle()
{
    setWindowTitle(tr("%1[*] \u2014 Contrast Bench").arg(m_document->displayName()));
    setWindowModified(m_document->isModified());
}

void MainWindow::showMessage(const QString &text)
{
    statusBar()->showMessage(text, 10'000);
}

bool MainWindow::maybeSave()
{
    if (!m_document->isModified())
        return true;
    switch (m_prompter->askSaveChanges(this, m_document->displayName())) {
    case Prompter::SaveChoice::Save: return save();
    case Prompter::SaveChoice::Discard: return true;
    case Prompter::SaveChoice::Cancel: break;
    }
    return false;
}

bool MainWindow::newScheme()
{
    if (!maybeSave())
        return false;
    m_document->reset(Document::starterScheme(), {});
    const Scheme &s = m_document->scheme();
    showMessage(tr("New scheme: factor \u2018%1\u2019 with %2 levels, %3 coding. Rename the levels, type weights or start from "
                   "another coding.")
                    .arg(s.factor.name)
                    .arg(s.levelCount())
                    .arg(schemeTitle(s.kind).toLower()));
    return true;
}

bool MainWindow::openFile(const QString &path)
{
    return maybeSave() && load(path);
}

bool MainWindow::load(const QString &path)
{
    auto study = loadStudy(path);
    if (!study) {
        m_prompter->tell(this, tr("Cannot open the scheme"), study.error());
        if (!QFileInfo::exists(path))
            m_recent.remove(path);
        return false;
    }
    m_document->reset(study.take(), QFileInfo(path).absoluteFilePath());
    m_recent.add(path);
    showMessage(tr("Opened %1").arg(QDir::toNativeSeparators(path)));
    return true;
}

bool MainWindow::openDemo(const QString &name)
{
    if (!maybeSave())
        return false;
    auto study = loadDemoStudy(name);
    if (!study) {
        m_prompter->tell(this, tr("Cannot open the demo"), study.error());
        return false;
    }
    // A demo opens as a new, unnamed scheme, so saving never writes into the program's resources.
    m_document->reset(study.take(), {}, tr("%1 demo").arg(name));
    showMessage(tr("Demo study \u2018%1\u2019 opened. Save it under a name of your own to keep changes.").arg(name));
    return true;
}

bool MainWindow::save()
{
    if (m_document->filePath().isEmpty())
        return saveAs();
    return saveTo(m_document->filePath());
}

bool MainWindow::saveAs()
{
    QString name = m_document->isDesign() ? u"design"_s : m_document->scheme().factor.name;
    if (name.isEmpty())
        name = u"scheme"_s;
    const QString suggestion = m_document->filePath().isEmpty() ? name + u".cbstudy"_s : m_document->filePath();
    const QString path = m_prompter->askSavePath(this, studyToSave(suggestion));
    return !path.isEmpty() && saveTo(path);
}

bool MainWindow::saveTo(const QString &path)
{
    if (const QString error = saveStudy(m_document->study(), path); !error.isEmpty()) {
        // The work stays open; a copy goes to the recovery file now rather than after the usual delay.
        writeRecovery();
        const bool kept = m_options.useRecovery && m_document->isModified() && m_document->revision() == m_recoveredRevision
                          && m_recovery.exists();
        m_prompter->tell(this, tr("Cannot save the scheme"),
                         kept ? tr("%1\n\nThe changes are still open here, and a copy is kept in the recovery file.").arg(error)
                              : error);
        return false;
    }
    m_document->markSaved(QFileInfo(path).absoluteFilePath());
    m_recent.add(path);
    showMessage(tr("Saved %1").arg(QDir::toNativeSeparators(path)));
    return true;
}

void MainWindow::scheduleRecovery()
{
    if (!m_options.useRecovery)
        return;
    if (!m_unwrittenSince.isValid())
        m_unwrittenSince.start();
    // Each edit restarts the wait, unless the oldest unwritten edit has waited long enough.
    if (!m_recoveryTimer->isActive() || m_unwrittenSince.elapsed() < 10 * qint64(m_options.recoveryDelayMs))
        m_recoveryTimer->start();
}

bool MainWindow::writeRecovery()
{
    m_unwrittenSince.invalidate();
    m_recoveryTimer->stop();
    if (!m_options.useRecovery || !m_document->isModified() || m_document->revision() == m_recoveredRevision)
        return false;
    if (const QString error = m_recovery.save(m_document->study(), m_document->filePath()); !error.isEmpty()) {
        showMessage(tr("Could not write the recovery file: %1").arg(error));
        return false;
    }
    m_recoveredRevision = m_document->revision();
    return true;
}

bool MainWindow::offerRecovery()
{
    if (!m_options.useRecovery || !m_recovery.exists())
        return false;
    auto recovered = m_recovery.load();
    if (!recovered) {
        const QString aside = m_recovery.setAside();
        if (aside.isEmpty())
            m_recovery.discard();
        m_prompter->tell(this, tr("Unsaved work could not be restored"),
                         tr("The recovery file could not be read: %1\n\n%2")
                             .arg(recovered.error(), aside.isEmpty() ? tr("It was removed.") : tr("It was moved to %1.").arg(aside)));
        return false;
    }
    const QString what = recovered->originalPath.isEmpty() ? tr("a new, unnamed scheme")
                                                            : QDir::toNativeSeparators(recovered->originalPath);
    const QString when = recovered->savedAt.isValid() ? QLocale().toString(recovered->savedAt.toLocalTime(), QLocale::ShortFormat) : tr("an unknown time");
    const bool restore = m_prompter->askRestoreRecovery(
        this, tr("Contrast Bench was closed without saving changes to %1 (last kept at %2). Restore them?").arg(what, when));
    if (!restore) {
        m_recovery.discard();
        return false;
    }
    m_document->restore(recovered->study, recovered->originalPath);
    showMessage(tr("Restored unsaved work. Save it to keep it."));
    return true;
}

void MainWindow::showEvent(QShowEvent *event)
{
    QMainWindow::showEvent(event);
    if (m_docksSized)
        return;
    m_docksSized = true;
    sizeDocks();
}

void MainWindow::sizeDocks()
{
    // The grid comes first: the side and bottom panels take what is left of its room.
    auto *levels = findChild<QDockWidget *>(u"levelsDock"_s);
    auto *meaning = findChild<QDockWidget *>(u"meaningDock"_s);
    if (levels && meaning) {
        const bool narrow = width() < kNarrowWidth;
        if (narrow && dockWidgetArea(levels) == Qt::LeftDockWidgetArea && !levels->isFloating()) {
            tabifyDockWidget(meaning, levels);
            meaning->raise();
        }
        QDockWidget *right = m_document->isDesign() ? m_designDock : meaning;
        const int rightWidth = m_document->isDesign() ? 470 : narrow ? 330 : 360;
        if (dockWidgetArea(levels) == Qt::LeftDockWidgetArea)
            resizeDocks({levels, right}, {270, rightWidth}, Qt::Horizontal);
        else
            resizeDocks({right}, {rightWidth}, Qt::Horizontal);
    }
    resizeDocks({m_healthDock}, {bottomDockHeight(height())}, Qt::Vertical);
}

void MainWindow::closeEvent(QCloseEvent *event)
{
    if (!maybeSave()) {
        event->ignore();
        return;
    }
    if (m_options.useRecovery)
        m_recovery.discard();
    if (m_options.rememberLayout) {
        const auto settings = openSettings(m_options.settingsFile);
        settings->setValue(kGeometryKey, saveGeometry());
        settings->setValue(kStateKey, saveState());
    }
    event->accept();
}

void MainWindow::dragEnterEvent(QDragEnterEvent *event)
{
    const QList<QUrl> urls = event->mimeData()->urls();
    if (!urls.isEmpty() && urls.first().isLocalFile())
        event->acceptProposedAction();
}

void MainWindow::dropEvent(QDropEvent *event)
{
    const QList<QUrl> urls = event->mimeData()->urls();
    if (urls.isEmpty() || !urls.first().isLocalFile())
        return;
    event->acceptProposedAction();
    // Open after the drop has finished, so a question dialog does not run inside the drag.
    const QString path = urls.first().toLocalFile();
    QTimer::singleShot(0, this, [this, path] { openFile(path); });
}

} // namespace cb
