// (Include order: core headers first, then Qt.)
#include "core/expr/expr.h"

#include "app/window/main_window.h"
#include "app/window/method_names.h"

#include "app/window/derivatives_pane.h"
#include "app/window/file_dialogs.h"
#include "app/window/icons.h"
#include "app/window/findings_controller.h"
#include "app/window/findings_panel.h"
#include "app/window/lineup_editor.h"
#include "app/window/objective_editor.h"
#include "app/window/fit_statistics_panel.h"
#include "app/window/survey_controller.h"
#include "app/window/recovery.h"
#include "app/window/study_edit.h"
#include "app/window/report_writer.h"
#include "core/solve/solver.h"
#include "core/study/provenance.h"
#include "widgets/curvature_view.h"
#include "widgets/landscape_view.h"
#include "widgets/local_model_view.h"
#include "widgets/progress_view.h"
#include "widgets/run_summary.h"
#include "widgets/slice_view.h"
#include "widgets/basins_view.h"
#include "widgets/steps_table.h"
#include "widgets/theme.h"

#include <QAction>
#include <QApplication>
#include <QKeyEvent>
#include <QCheckBox>
#include <QCloseEvent>
#include <QComboBox>
#include <QCoreApplication>
#include <QDialog>
#include <QDialogButtonBox>
#include <QDir>
#include <QDateTime>
#include <QDockWidget>
#include <QElapsedTimer>
#include <QFile>
#include <QFileDialog>
#include <QFileInfo>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QLabel>
#include <QLineEdit>
#include <QLocale>
#include <QMenuBar>
#include <QMessageBox>
#include <QProgressBar>
#include <QPushButton>
#include <QSaveFile>
#include <QScreen>
#include <QScrollArea>
#include <QSettings>
#include <QSpinBox>
#include <QStatusBar>
#include <QTextBrowser>
#include <QUndoStack>
#include <QThread>
#include <QToolBar>
#include <QToolButton>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

namespace sw::window {

namespace {

constexpr int kMaxRecentFiles = 8;
// How often unsaved work is written aside (recovery.h): at most this much is lost in a crash.
constexpr int kDefaultAutosaveMs = 30000;

QString settingsGroup() { return QStringLiteral("window"); }

// A small formula study so the window opens on something meaningful without a file.
study::Study defaultStudy(const Preferences& preferences) {
    study::Study s;
    s.maxIterations = preferences.maxIterations;
    s.view.logColour = preferences.logColour;
    s.view.contourCount = preferences.contourLevels;
    s.view.gridCells = preferences.gridCells;
    s.title = "Untitled";
    s.formula = "(x - 1)^2 + 8*(y - x^2)^2";
    s.variables = {{"x", -1.0, -2.0, 2.0}, {"y", 1.5, -1.0, 3.0}};
    const char* ids[] = {"gradient-descent", "newton", "bfgs", "trust-region-dogleg"};
    int i = 0;
    for (const char* id : ids) {
        if (!solve::findMethod(id)) continue;
        study::MethodEntry e;
        e.method = id;
        e.label = methodDisplayName(id).toStdString();  // as people say it; the id stays in `method`
        e.colour = widgets::lineupColour(i).name().toStdString();
        e.marker = widgets::markerName(widgets::lineupMarker(i)).toStdString();
        s.methods.push_back(e);
        ++i;
    }
    return s;
}

QString humanNumber(double v) { return QString::number(v, 'g', 4); }

// The icon each toolbar action draws (see icons.h).
const std::map<QString, QString>& actionIcons() {
    static const std::map<QString, QString> icons = {
        {"new", "new"},           {"open", "open"},   {"save", "save"},   {"run-all", "run-all"},
        {"step-all", "step-all"}, {"play", "play"},   {"reset", "reset"}, {"cancel", "cancel"},
        {"export-view", "export-view"}};
    return icons;
}

}  // namespace

MainWindow::MainWindow(QWidget* parent) : QMainWindow(parent) {
    setObjectName("SaddlewiseMainWindow");
    jobs_ = new JobRunner(this);
    undo_ = new QUndoStack(this);
    qApp->installEventFilter(this);
    // Editors report one user action in several signals (text, then the table, the axes):
    // recording after the event makes it one step.
    pendingEdit_.setSingleShot(true);
    pendingEdit_.setInterval(0);
    connect(&pendingEdit_, &QTimer::timeout, this, &MainWindow::recordEdit);
    connect(undo_, &QUndoStack::indexChanged, this, [this] {
        if (!showingStep_) return;
        showingStep_ = false;
        setModified(!undo_->isClean() || recovered_);  // undo back to the saved study: not modified
    });
    autosave_.setInterval(kDefaultAutosaveMs);
    connect(&autosave_, &QTimer::timeout, this, &MainWindow::writeRecovery);
    reportWriter_ = new ReportWriter(jobs_, this);
    createViews();
    createActions();
    createDocks();
    createMenus();
    createToolBars();
    createStatusBar();
    fitStatistics_ = new FitStatisticsPanel(this, jobs_);
    defaultLayout_ = saveState();

    connect(jobs_, &JobRunner::runsReady, this, &MainWindow::showRuns);
    connect(jobs_, &JobRunner::fieldReady, this,
            [this](std::shared_ptr<const widgets::FieldSnapshot> f, quint64) { showField(std::move(f)); });
    connect(jobs_, &JobRunner::progress, this, &MainWindow::onJobProgress);
    connect(jobs_, &JobRunner::jobStarted, this, &MainWindow::onJobStateChanged);
    connect(jobs_, &JobRunner::jobEnded, this, &MainWindow::onJobStateChanged);
    findingsController_ = new FindingsController(this, findingsPanel_);

    animation_.setInterval(200);
    connect(&animation_, &QTimer::timeout, this, &MainWindow::animationTick);
    heldResample_.setSingleShot(true);
    heldResample_.setInterval(60);
    connect(&heldResample_, &QTimer::timeout, this, &MainWindow::requestField);
    lazyViews_.setSingleShot(true);
    lazyViews_.setInterval(40);
    connect(&lazyViews_, &QTimer::timeout, this, &MainWindow::updateOtherViews);

    readSettings();
    newStudy();
}

MainWindow::~MainWindow() { jobs_->cancelAll(); }  // recovery_ removes this window's file

// ---------------------------------------------------------------- views and docks

void MainWindow::createViews() {
    landscape_ = new widgets::LandscapeView(this);
    localModel_ = new widgets::LocalModelView(this);
    curvature_ = new widgets::CurvatureView(this);
    progress_ = new widgets::ProgressView(this);
    slice_ = new widgets::SliceView(this);
    steps_ = new widgets::StepsTable(this);
    runSummary_ = new widgets::RunSummary(this);
    derivatives_ = new DerivativesPane(this);
    objectiveEditor_ = new ObjectiveEditor(this);
    lineupEditor_ = new LineupEditor(this);
    findingsPanel_ = new FindingsPanel(this);

    for (widgets::PlotView* view : {static_cast<widgets::PlotView*>(landscape_), static_cast<widgets::PlotView*>(localModel_),
                                    static_cast<widgets::PlotView*>(curvature_), static_cast<widgets::PlotView*>(progress_),
                                    static_cast<widgets::PlotView*>(slice_)})
        connect(view, &widgets::PlotView::selectionRequested, this, &MainWindow::setSelection);
    connect(steps_, &widgets::StepsTable::selectionRequested, this, &MainWindow::setSelection);
    connect(runSummary_, &widgets::RunSummary::selectionRequested, this, &MainWindow::setSelection);
    connect(landscape_, &widgets::LandscapeView::startMoved, this, &MainWindow::moveStart);
    connect(landscape_, &widgets::LandscapeView::startPlaced, this, &MainWindow::moveStart);
    connect(landscape_, &widgets::LandscapeView::viewBoxChanged, this, &MainWindow::setViewBox);
    connect(landscape_, &widgets::LandscapeView::startDragFinished, this, [this] { studyEdited(); });  // one step per drag
    connect(landscape_, &widgets::LandscapeView::logColourChanged, this, [this](bool on) {
        if (study_.view.logColour == on) return;
        study_.view.logColour = on;
        studyEdited();
    });
    connect(objectiveEditor_, &ObjectiveEditor::changed, this, [this] {
        if (!loading_) studyEdited(true);  // any edit, even one that does not parse yet; typing merges
    });
    connect(objectiveEditor_, &ObjectiveEditor::edited, this, &MainWindow::rebuildObjective);
    connect(objectiveEditor_, &ObjectiveEditor::plotAxesChanged, this, &MainWindow::onPlotAxesChanged);
    connect(objectiveEditor_, &ObjectiveEditor::heldValuesEdited, this, &MainWindow::onHeldValuesEdited);
    connect(lineupEditor_, &LineupEditor::edited, this, &MainWindow::onLineupEdited);

    surveys_ = new SurveyController(jobs_, landscape_, this);
    connect(surveys_, &SurveyController::startRequested, this, &MainWindow::moveStart);
    connect(surveys_, &SurveyController::surveysEdited, this, [this](const study::SurveySettings& s) {
        study_.surveys = s.critical || s.basins ? std::optional<study::SurveySettings>(s) : std::nullopt;
        studyEdited();
    });
}

QDockWidget* MainWindow::addViewDock(const QString& name, const QString& title, QWidget* content, const QString& tip,
                                     bool scrolls) {
    auto* dock = new QDockWidget(title, this);
    dock->setObjectName(name);
    if (scrolls) {
        // An editor keeps its controls at their natural size and scrolls when the panel is
        // shorter; without this a short panel either grows the window past the screen or
        // squeezes the controls over each other.
        auto* area = new QScrollArea(dock);
        area->setObjectName(name + QStringLiteral("-scroll"));
        area->setWidget(content);
        area->setWidgetResizable(true);
        area->setFrameShape(QFrame::NoFrame);
        area->setHorizontalScrollBarPolicy(Qt::ScrollBarAsNeeded);  // a safety net: nothing is ever cut off
        area->setMinimumSize(220, 120);
        dock->setWidget(area);
    } else {
        dock->setWidget(content);
    }
    dock->setToolTip(tip);
    dock->toggleViewAction()->setToolTip(tr("Show or hide the %1 panel").arg(title));
    docks_[name] = dock;
    dockOrder_ << name;
    return dock;
}

QDockWidget* MainWindow::dock(const QString& name) const {
    const auto it = docks_.find(name);
    return it == docks_.end() ? nullptr : it->second;
}

// Every dock is made here; placeDocks() says where each one goes by default.
void MainWindow::createDocks() {
    setDockNestingEnabled(true);
    setDockOptions(QMainWindow::AnimatedDocks | QMainWindow::AllowNestedDocks | QMainWindow::AllowTabbedDocks);
    addViewDock("objective", tr("Objective"), objectiveEditor_,
                tr("The function to minimise or the model to fit, and its variables"), true);
    addViewDock("lineup", tr("Methods"), lineupEditor_, tr("The methods run side by side"), true);
    addViewDock("landscape", tr("Landscape"), landscape_,
                tr("The objective over two variables, with every method's path; drag the start"));
    addViewDock("local-model", tr("Local model"), localModel_,
                tr("The quadratic model at the selected iterate over the true contours"));
    addViewDock("curvature", tr("Curvature"), curvature_, tr("Hessian eigenvalues and condition number along each path"));
    addViewDock("progress", tr("Progress"), progress_, tr("Distance to the best value and gradient length per iteration"));
    addViewDock("slice", tr("Slice"), slice_, tr("The objective along the selected step, with the line-search trials"));
    addViewDock("summary", tr("Summary"), runSummary_,
                tr("Every method's run side by side: how it ended and why, where, in how many steps"));
    addViewDock("steps", tr("Steps"), steps_, tr("Every iterate of every method as a table"));
    addViewDock("derivatives", tr("Derivatives"), derivatives_, tr("The exact gradient and Hessian as formulas"));
    addViewDock("findings", tr("Findings"), findingsPanel_,
                tr("Why each run stalled, ended on a saddle or crawls, and the remedies tried"));
    addViewDock("critical-points", tr("Critical points"), surveys_->criticalPanel(),
                tr("Every minimum, saddle and maximum in the plotted box"));
    addViewDock("basins", tr("Basins"), surveys_->basinsPanel(),
                tr("Where each method's runs end, from every cell of a grid, side by side"));
    setCentralWidget(nullptr);  // no central widget: every view is a dock the user may move, stack or float
    placeDocks();
}

// The default arrangement: editors on the left, the landscape taking most of the middle with
// the tables under it, the local model over the tabbed line plots on the right.
void MainWindow::placeDocks() {
    auto at = [this](const char* name) { return docks_.at(QString::fromLatin1(name)); };
    addDockWidget(Qt::LeftDockWidgetArea, at("objective"));
    splitDockWidget(at("objective"), at("lineup"), Qt::Vertical);
    addDockWidget(Qt::RightDockWidgetArea, at("landscape"));
    splitDockWidget(at("landscape"), at("local-model"), Qt::Horizontal);
    splitDockWidget(at("landscape"), at("summary"), Qt::Vertical);
    tabifyDockWidget(at("summary"), at("steps"));
    tabifyDockWidget(at("steps"), at("derivatives"));
    tabifyDockWidget(at("derivatives"), at("findings"));
    tabifyDockWidget(at("findings"), at("critical-points"));
    tabifyDockWidget(at("landscape"), at("basins"));  // the maps need the landscape's room, over the same plane
    at("landscape")->raise();
    splitDockWidget(at("local-model"), at("progress"), Qt::Vertical);
    tabifyDockWidget(at("progress"), at("curvature"));
    tabifyDockWidget(at("curvature"), at("slice"));
    at("progress")->raise();
    at("summary")->raise();
}

// Proportions of the default layout for the window's current size.
void MainWindow::fitToScreen() {
    const QSize size = this->size();
    const int w = std::max(800, size.width()), h = std::max(500, size.height());
    const int left = std::clamp(w / 4, 330, 420);
    const int right = std::clamp(w * 3 / 10, 300, 560);
    resizeDocks({docks_.at("objective"), docks_.at("landscape"), docks_.at("local-model")},
                {left, w - left - right, right}, Qt::Horizontal);
    resizeDocks({docks_.at("landscape"), docks_.at("summary")}, {h * 62 / 100, h * 38 / 100}, Qt::Vertical);
    resizeDocks({docks_.at("objective"), docks_.at("lineup")}, {h * 56 / 100, h * 44 / 100}, Qt::Vertical);
    resizeDocks({docks_.at("local-model"), docks_.at("progress")}, {h * 50 / 100, h * 50 / 100}, Qt::Vertical);
}

void MainWindow::setInitialSize(const QSize& size) {
    resize(size);
    fitToScreen();
}

// ---------------------------------------------------------------- actions

QAction* MainWindow::action(const QString& name) const {
    auto it = actions_.find(name);
    return it == actions_.end() ? nullptr : it->second;
}

void MainWindow::createActions() {
    auto make = [this](const QString& name, const QString& text, const QString& tip, const QKeySequence& key) {
        auto* a = new QAction(text, this);
        a->setObjectName(name);
        a->setStatusTip(tip);
        a->setToolTip(key.isEmpty() ? tip : QStringLiteral("%1 (%2)").arg(tip, key.toString(QKeySequence::NativeText)));
        if (!key.isEmpty()) a->setShortcut(key);
        actions_[name] = a;
        return a;
    };
    connect(make("new", tr("&New"), tr("Start a new study with a small example formula"), QKeySequence::New),
            &QAction::triggered, this, [this] {
                if (maybeSave()) newStudy();
            });
    connect(make("open", tr("&Open…"), tr("Open a study file"), QKeySequence::Open), &QAction::triggered, this,
            &MainWindow::openDialog);
    connect(make("save", tr("&Save"), tr("Save the study"), QKeySequence::Save), &QAction::triggered, this,
            &MainWindow::save);
    connect(make("save-as", tr("Save &As…"), tr("Save the study under a new name"), QKeySequence::SaveAs),
            &QAction::triggered, this, &MainWindow::saveAsDialog);
    connect(make("quit", tr("&Quit"), tr("Close the window"), QKeySequence::Quit), &QAction::triggered, this,
            &QWidget::close);

    QAction* undoAction = make("undo", tr("&Undo"), tr("Undo the last edit of the study"), QKeySequence::Undo);
    QAction* redoAction = make("redo", tr("&Redo"), tr("Redo the edit just undone"), QKeySequence::Redo);
    connect(undoAction, &QAction::triggered, this, &MainWindow::undo);
    connect(redoAction, &QAction::triggered, this, &MainWindow::redo);
    undoAction->setEnabled(false);
    redoAction->setEnabled(false);
    connect(undo_, &QUndoStack::canUndoChanged, undoAction, &QAction::setEnabled);
    connect(undo_, &QUndoStack::canRedoChanged, redoAction, &QAction::setEnabled);
    // The step's name goes in the tip, so menus and the shortcut list keep a short entry.
    connect(undo_, &QUndoStack::undoTextChanged, undoAction, [undoAction](const QString& text) {
        undoAction->setStatusTip(text.isEmpty() ? tr("Undo the last edit of the study") : tr("Undo the %1").arg(text));
        undoAction->setToolTip(QStringLiteral("%1 (%2)").arg(undoAction->statusTip(),
                                                             undoAction->shortcut().toString(QKeySequence::NativeText)));
    });
    connect(undo_, &QUndoStack::redoTextChanged, redoAction, [redoAction](const QString& text) {
        redoAction->setStatusTip(text.isEmpty() ? tr("Redo the edit just undone") : tr("Redo the %1").arg(text));
        redoAction->setToolTip(QStringLiteral("%1 (%2)").arg(redoAction->statusTip(),
                                                             redoAction->shortcut().toString(QKeySequence::NativeText)));
    });

    connect(make("run-all", tr("&Run all"), tr("Run every enabled method to the end"), QKeySequence(Qt::CTRL | Qt::Key_R)),
            &QAction::triggered, this, &MainWindow::runAll);
    connect(make("step-all", tr("&Step all"), tr("Advance every method by one iteration"), QKeySequence(Qt::Key_F10)),
            &QAction::triggered, this, &MainWindow::stepAll);
    QAction* play = make("play", tr("&Play"), tr("Animate: step every method at the chosen speed"), QKeySequence(Qt::Key_F5));
    play->setCheckable(true);
    connect(play, &QAction::toggled, this, &MainWindow::setPlaying);
    connect(make("reset", tr("R&eset"), tr("Back to the start: every method at its first iterate"),
                 QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_R)),
            &QAction::triggered, this, &MainWindow::resetRuns);
    connect(make("cancel", tr("&Cancel jobs"), tr("Stop the running computations"), QKeySequence(Qt::Key_Escape)),
            &QAction::triggered, this, &MainWindow::cancelJobs);

    connect(make("export-view", tr("&Export view…"), tr("Save a view as PNG, SVG or PDF at a chosen size"),
                 QKeySequence(Qt::CTRL | Qt::Key_E)),
            &QAction::triggered, this, &MainWindow::exportViewDialog);
    connect(make("export-steps", tr("Export steps as &CSV…"), tr("Save every method's iterations as a CSV table"),
                 QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_E)),
            &QAction::triggered, this, &MainWindow::exportStepsDialog);
    connect(make("write-report", tr("Write &report…"),
                 tr("Write the review report of this study (HTML or PDF): objective, data, methods, plots, end "
                    "points, statistics and how to regenerate it"),
                 QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_P)),
            &QAction::triggered, this, &MainWindow::writeReportDialog);
    connect(make("preferences", tr("&Preferences…"),
                 tr("Animation speed, appearance, landscape and export defaults"), QKeySequence::Preferences),
            &QAction::triggered, this, &MainWindow::showPreferences);
    connect(make("reset-layout", tr("Reset &layout"), tr("Put every panel back where it started"), QKeySequence()),
            &QAction::triggered, this, &MainWindow::resetLayout);
    connect(make("formula-help", tr("&Formula syntax"), tr("What a formula may contain"), QKeySequence::HelpContents),
            &QAction::triggered, this, [this] { showHelpText(tr("Formula syntax"), formulaSyntaxText()); });
    connect(make("shortcuts", tr("&Keyboard shortcuts"), tr("Every action's key"), QKeySequence()),
            &QAction::triggered, this, [this] { showHelpText(tr("Keyboard shortcuts"), shortcutsText()); });
    connect(make("about", tr("&About Saddlewise"), tr("What this program is for"), QKeySequence()),
            &QAction::triggered, this, &MainWindow::about);
    refreshIcons();
}

void MainWindow::refreshIcons() {
    for (const auto& [name, icon] : actionIcons())
        if (QAction* a = action(name)) a->setIcon(toolIcon(icon, palette()));
    if (QAction* p = action("play")) p->setIcon(toolIcon(p->isChecked() ? "pause" : "play", palette()));
}

void MainWindow::changeEvent(QEvent* event) {
    if (event->type() == QEvent::PaletteChange || event->type() == QEvent::ApplicationPaletteChange) refreshIcons();
    QMainWindow::changeEvent(event);
}

void MainWindow::createMenus() {
    QMenu* file = menuBar()->addMenu(tr("&File"));
    file->addAction(action("new"));
    file->addAction(action("open"));
    recentMenu_ = file->addMenu(tr("Open &recent"));
    recentMenu_->setToolTipsVisible(true);
    samplesMenu_ = file->addMenu(tr("Sa&mples"));
    samplesMenu_->setToolTipsVisible(true);
    file->addAction(action("save"));
    file->addAction(action("save-as"));
    file->addSeparator();
    file->addAction(action("export-view"));
    file->addAction(action("export-steps"));
    file->addAction(action("write-report"));
    file->addSeparator();
    file->addAction(action("preferences"));
    file->addSeparator();
    file->addAction(action("quit"));

    QMenu* edit = menuBar()->addMenu(tr("&Edit"));
    edit->addAction(action("undo"));
    edit->addAction(action("redo"));

    QMenu* run = menuBar()->addMenu(tr("&Run"));
    for (const char* name : {"run-all", "step-all", "play", "reset", "cancel"}) run->addAction(action(name));

    viewMenu_ = menuBar()->addMenu(tr("&View"));
    for (const QString& name : dockOrder_) viewMenu_->addAction(docks_.at(name)->toggleViewAction());
    viewMenu_->addSeparator();
    viewMenu_->addAction(action("reset-layout"));

    QMenu* help = menuBar()->addMenu(tr("&Help"));
    help->addAction(action("formula-help"));
    help->addAction(action("shortcuts"));
    help->addSeparator();
    help->addAction(action("about"));
    for (QMenu* m : {file, edit, run, viewMenu_, help}) m->setToolTipsVisible(true);
    updateSamplesMenu();
}

void MainWindow::createToolBars() {
    QToolBar* bar = addToolBar(tr("Run"));
    bar->setObjectName("run-toolbar");
    bar->setToolTip(tr("Running the methods"));
    bar->setToolButtonStyle(Qt::ToolButtonTextBesideIcon);
    bar->addAction(action("open"));
    bar->addAction(action("save"));
    bar->addSeparator();
    for (const char* name : {"run-all", "step-all", "play", "reset"}) bar->addAction(action(name));
    auto* speedLabel = new QLabel(tr(" Speed "), bar);
    speed_ = new QSpinBox(bar);
    speed_->setRange(1, 60);
    speed_->setValue(5);
    speed_->setSuffix(tr(" steps/s"));
    speed_->setToolTip(tr("How many iterations per second the animation shows"));
    speedLabel->setToolTip(speed_->toolTip());
    connect(speed_, &QSpinBox::valueChanged, this, [this](int perSecond) {
        animation_.setInterval(1000 / perSecond);
        preferences_.animationSpeed = perSecond;
    });
    bar->addWidget(speedLabel);
    bar->addWidget(speed_);
    bar->addSeparator();
    bar->addAction(action("export-view"));
}

void MainWindow::createStatusBar() {
    statusSummary_ = new QLabel(this);
    statusSummary_->setToolTip(tr("Summary of the last run"));
    statusSummary_->setMinimumWidth(100);
    statusSummary_->setSizePolicy(QSizePolicy::Ignored, QSizePolicy::Preferred);  // a long summary never widens the window
    statusProgress_ = new QProgressBar(this);
    statusProgress_->setRange(0, 100);
    statusProgress_->setMaximumWidth(160);
    statusProgress_->setToolTip(tr("Progress of the running computation"));
    statusProgress_->setVisible(false);
    statusCancel_ = new QToolButton(this);
    statusCancel_->setDefaultAction(action("cancel"));
    statusCancel_->setVisible(false);
    statusBar()->addWidget(statusSummary_, 1);
    statusBar()->addPermanentWidget(statusProgress_);
    statusBar()->addPermanentWidget(statusCancel_);
}

// ---------------------------------------------------------------- settings

void MainWindow::readSettings() {
    QSettings settings;
    settings.beginGroup(settingsGroup());
    const QRect available = screen() ? screen()->availableGeometry() : QRect(0, 0, 1280, 800);
    const QByteArray geometry = settings.value("geometry").toByteArray();
    // A saved size is used only when it fits the screen it opens on (another monitor, a
    // smaller resolution, or a size saved by an older version that let the window grow).
    bool restored = false;
    if (!geometry.isEmpty() && restoreGeometry(geometry)) {
        restored = available.contains(frameGeometry()) || isMaximized();
        if (!restored) setWindowState(Qt::WindowNoState);
    }
    if (!restored) {
        const QSize wanted(std::min(1500, available.width() - 40), std::min(940, available.height() - 40));
        resize(wanted.expandedTo(QSize(640, 480)).boundedTo(available.size()));
        move(available.topLeft() + QPoint((available.width() - width()) / 2, (available.height() - height()) / 2));
    }
    fitToScreen();
    const QByteArray state = settings.value("layout").toByteArray();
    if (restored && !state.isEmpty()) restoreState(state);
    // Before preferences existed the animation speed was kept with the window.
    const QVariant oldSpeed = settings.value("animation-speed");
    settings.endGroup();
    Preferences loaded = Preferences::load(settings);
    if (!settings.contains("preferences/animation-speed") && oldSpeed.isValid())
        loaded.animationSpeed = std::clamp(oldSpeed.toInt(), 1, 60);
    applyPreferences(loaded, false);
    updateRecentMenu();
}

void MainWindow::writeSettings() {
    QSettings settings;
    settings.beginGroup(settingsGroup());
    settings.setValue("geometry", saveGeometry());
    settings.setValue("layout", saveState());
    settings.endGroup();
    preferences_.save(settings);
}

void MainWindow::setPreferences(const Preferences& preferences) {
    applyPreferences(preferences, true);
    QSettings settings;
    preferences_.save(settings);
}

// changeStudy: the landscape settings also go into the open study (a change made in the
// dialog); at start-up they only seed new studies.
void MainWindow::applyPreferences(const Preferences& wanted, bool changeStudy) {
    Preferences p = wanted;
    if (!p.isValid()) p = Preferences{};
    const Preferences before = preferences_;
    preferences_ = p;
    if (speed_->value() != p.animationSpeed) speed_->setValue(p.animationSpeed);  // also sets the interval
    if (!paletteApplied_ ? p.palette != PaletteChoice::System : p.palette != before.palette) {
        applyPalette(p.palette);
        paletteApplied_ = true;
    }
    if (!changeStudy) return;
    const bool landscapeChanged = p.logColour != before.logColour || p.contourLevels != before.contourLevels ||
                                  p.gridCells != before.gridCells;
    if (!landscapeChanged) return;
    study::ViewSettings view = study_.view;
    if (p.logColour != before.logColour) view.logColour = p.logColour;
    if (p.contourLevels != before.contourLevels) view.contourCount = p.contourLevels;
    if (p.gridCells != before.gridCells) view.gridCells = p.gridCells;
    if (view == study_.view) return;
    const bool logChanged = view.logColour != study_.view.logColour;
    study_.view = view;
    studyEdited();
    if (logChanged) landscape_->setLogColour(view.logColour);  // redraws the shown field at once
    requestField();
}

PreferencesDialog* MainWindow::showPreferences() {
    // A closed dialog may still be waiting for its deferred delete: only a visible one counts.
    for (auto* open : findChildren<PreferencesDialog*>(QString(), Qt::FindDirectChildrenOnly)) {
        if (!open->isVisible()) continue;
        open->raise();
        open->activateWindow();
        return open;
    }
    auto* dialog = new PreferencesDialog(preferences_, this);
    dialog->setAttribute(Qt::WA_DeleteOnClose);
    connect(dialog, &PreferencesDialog::preferencesChanged, this, &MainWindow::setPreferences);
    dialog->show();
    return dialog;
}

void MainWindow::setQuestion(Question question) { question_ = std::move(question); }

void MainWindow::resetLayout() {
    for (auto& [name, dock] : docks_) {
        dock->setFloating(false);
        dock->show();
    }
    restoreState(defaultLayout_);
    fitToScreen();
}

void MainWindow::addRecentFile(const QString& path) {
    QSettings settings;
    QStringList files = settings.value("recent-files").toStringList();
    const QString absolute = QFileInfo(path).absoluteFilePath();
    files.removeAll(absolute);
    files.prepend(absolute);
    while (files.size() > kMaxRecentFiles) files.removeLast();
    settings.setValue("recent-files", files);
    updateRecentMenu();
}

void MainWindow::updateRecentMenu() {
    recentMenu_->clear();
    const QStringList files = QSettings().value("recent-files").toStringList();
    for (const QString& file : files) {
        QAction* a = recentMenu_->addAction(QFileInfo(file).fileName());
        a->setToolTip(file);
        a->setStatusTip(file);
        connect(a, &QAction::triggered, this, [this, file] {
            if (!maybeSave()) return;
            QString error;
            if (!openStudy(file, &error)) QMessageBox::warning(this, tr("Cannot open study"), error);
        });
    }
    recentMenu_->setEnabled(!files.isEmpty());
}

QStringList MainWindow::sampleFiles() {
    QStringList dirs;
    const QString env = qEnvironmentVariable("SADDLEWISE_SAMPLES");
    if (!env.isEmpty()) dirs << env;
    dirs << QCoreApplication::applicationDirPath() + "/../share/saddlewise/samples";
#ifdef SW_SAMPLES_DIR
    dirs << QStringLiteral(SW_SAMPLES_DIR);
#endif
    QStringList files;
    for (const QString& dir : dirs) {
        const QFileInfoList found = QDir(dir).entryInfoList({"*.json"}, QDir::Files, QDir::Name);
        for (const QFileInfo& f : found) files << f.absoluteFilePath();
        if (!files.isEmpty()) break;  // the first folder with samples wins
    }
    return files;
}

void MainWindow::updateSamplesMenu() {
    samplesMenu_->clear();
    for (const QString& file : sampleFiles()) {
        QString title = QFileInfo(file).completeBaseName();
        QString tip = file;
        try {
            const study::Study s = study::loadFileAsTyped(file.toStdString());
            if (!s.title.empty()) title = QString::fromStdString(s.title);
            if (!s.notes.empty()) tip = QString::fromStdString(s.notes);
        } catch (const std::exception&) {
            // Listed anyway: opening it shows the problem with its place.
        }
        QAction* a = samplesMenu_->addAction(title);
        a->setToolTip(tip);
        a->setStatusTip(tr("Opens a copy of %1; saving asks for a new name").arg(QFileInfo(file).fileName()));
        connect(a, &QAction::triggered, this, [this, file] {
            if (!maybeSave()) return;
            QString error;
            if (!openStudy(file, &error, true)) QMessageBox::warning(this, tr("Cannot open sample"), error);
        });
    }
    if (samplesMenu_->isEmpty()) samplesMenu_->addAction(tr("(no samples found)"))->setEnabled(false);
}

// ---------------------------------------------------------------- document

void MainWindow::newStudy() {
    jobs_->cancelAll();
    setPlaying(false);
    study_ = defaultStudy(preferences_);
    studyPath_.clear();
    copiedFrom_.clear();
    recovered_ = false;
    undo_->clear();
    baseDirectory_.clear();  // a table chosen now is kept by its full path until the study is saved
    presentStudy();
}

// Everything the previous study left on the views goes: runs, field, selection, readouts.
void MainWindow::clearViews() {
    snapshot_.reset();
    field_.reset();
    selection_ = {};
    summary_.clear();
    statusSummary_->clear();
    lazyViews_.stop();
    heldResample_.stop();
    landscape_->clear();
    for (widgets::PlotView* view : {static_cast<widgets::PlotView*>(localModel_), static_cast<widgets::PlotView*>(curvature_),
                                    static_cast<widgets::PlotView*>(progress_), static_cast<widgets::PlotView*>(slice_)}) {
        view->setSelection({});
        view->setSnapshot(nullptr);
    }
    steps_->setSnapshot(nullptr);
    runSummary_->setSnapshot(nullptr);
    derivatives_->clear();
}

// Shows study_ in the editors and views and starts from a clean slate (no selection, no
// remembered view box, unmodified); newStudy and openStudy set study_ and its place first.
void MainWindow::presentStudy(bool modified) {
    pendingEdit_.stop();  // an edit of the study being replaced is not recorded
    loading_ = true;
    clearViews();
    objectiveEditor_->setStudy(study_, baseDirectory_);
    lineupEditor_->setEntries(study_.methods);
    landscape_->setLogColour(study_.view.logColour);
    surveys_->studyOpened(study_);
    loading_ = false;
    hasViewBox_ = false;
    objective_.reset();
    modified_ = modified;  // the run below writes a recovery file only for a study that is unsaved
    rebuildObjective();
    shownText_ = onScreenText();
    setModified(modified);
}

bool MainWindow::openStudy(const QString& path, QString* error, bool asCopy) {
    study::Study loaded;
    try {
        loaded = study::loadFileAsTyped(path.toStdString());
    } catch (const study::StudyError& e) {
        if (error) *error = QStringLiteral("%1: %2: %3").arg(path, QString::fromStdString(e.place()), QString::fromStdString(e.problem()));
        return false;
    } catch (const std::exception& e) {
        if (error) *error = QStringLiteral("%1: %2").arg(path, QString::fromUtf8(e.what()));
        return false;
    }
    jobs_->cancelAll();
    setPlaying(false);
    study_ = loaded;
    recovered_ = false;
    undo_->clear();
    // A copy keeps the file's folder for its data path until it is saved somewhere else.
    studyPath_ = asCopy ? QString() : QFileInfo(path).absoluteFilePath();
    copiedFrom_ = asCopy ? QFileInfo(path).fileName() : QString();
    baseDirectory_ = QFileInfo(path).absolutePath();
    presentStudy();
    if (!asCopy) addRecentFile(studyPath_);
    return true;
}

study::Study MainWindow::onScreenStudy() const {
    study::Study shown = study_;  // title, notes, stopping rules, view settings
    objectiveEditor_->apply(shown);
    shown.methods = lineupEditor_->entries();
    return shown;
}

bool MainWindow::saveStudy(const QString& path, QString* error) {
    if (pendingEdit_.isActive()) recordEdit();  // the step before the save belongs before the clean state
    study::Study toSave = onScreenStudy();
    const QString folder = QFileInfo(path).absolutePath();
    // A data file is referenced relative to the study: re-base it when saving elsewhere.
    if (toSave.fit && !toSave.fit->dataPath.empty()) {
        const QString absolute = QDir(baseDirectory_).absoluteFilePath(QString::fromStdString(toSave.fit->dataPath));
        toSave.fit->dataPath = QDir(folder).relativeFilePath(absolute).toStdString();
    }
    std::string text;
    try {
        text = study::toJson(toSave);
    } catch (const std::exception& e) {
        if (error) *error = QString::fromUtf8(e.what());
        return false;
    }
    QSaveFile file(path);
    if (!file.open(QIODevice::WriteOnly) || file.write(text.data(), static_cast<qint64>(text.size())) < 0 ||
        !file.commit()) {
        if (error) *error = tr("Cannot write %1: %2").arg(path, file.errorString());
        return false;
    }
    // The study that runs moves with the file (its data path re-based the same way).
    if (study_.fit && toSave.fit) study_.fit->dataPath = toSave.fit->dataPath;
    studyPath_ = QFileInfo(path).absoluteFilePath();
    copiedFrom_.clear();
    baseDirectory_ = folder;
    objectiveEditor_->setBaseDirectory(folder);
    recovered_ = false;
    shownText_ = onScreenText();  // the data path may have been re-based
    undo_->setClean();
    setModified(false);
    addRecentFile(studyPath_);
    rememberFolder(path);
    return true;
}

void MainWindow::openDialog() {
    if (!maybeSave()) return;
    const QString path =
        QFileDialog::getOpenFileName(this, tr("Open study"), lastUsedFolder(), tr("Saddlewise studies (*.json);;All files (*)"));
    if (path.isEmpty()) return;
    rememberFolder(path);
    QString error;
    if (!openStudy(path, &error)) QMessageBox::warning(this, tr("Cannot open study"), error);
}

bool MainWindow::save() {
    if (studyPath_.isEmpty()) return saveAsDialog();
    QString error;
    if (!saveStudy(studyPath_, &error)) {
        QMessageBox::warning(this, tr("Cannot save study"), error);
        return false;
    }
    statusBar()->showMessage(tr("Saved %1").arg(studyPath_), 4000);
    return true;
}

bool MainWindow::saveAsDialog() {
    const QString name = !studyPath_.isEmpty() ? QFileInfo(studyPath_).fileName()
                         : !copiedFrom_.isEmpty() ? copiedFrom_
                                                  : QStringLiteral("study.json");
    QString path = QFileDialog::getSaveFileName(this, tr("Save study"), suggestedPath(name), tr("Saddlewise studies (*.json)"));
    if (path.isEmpty()) return false;
    if (QFileInfo(path).suffix().isEmpty()) path += ".json";
    QString error;
    if (!saveStudy(path, &error)) {
        QMessageBox::warning(this, tr("Cannot save study"), error);
        return false;
    }
    return true;
}

bool MainWindow::maybeSave() {
    if (!modified_) return true;
    const QString title = tr("Unsaved changes");
    const QString name = studyPath_.isEmpty() ? tr("The new study") : QFileInfo(studyPath_).fileName();
    const QString text = tr("%1 has changes that are not saved. Save them before going on?").arg(name);
    const auto buttons = QMessageBox::Save | QMessageBox::Discard | QMessageBox::Cancel;
    const auto answer = question_ ? question_(this, title, text, buttons)
                                  : QMessageBox::warning(this, title, text, buttons, QMessageBox::Save);
    if (answer == QMessageBox::Save) return save();
    return answer == QMessageBox::Discard;
}

void MainWindow::closeEvent(QCloseEvent* event) {
    if (maybeSave()) {
        writeSettings();
        jobs_->cancelAll();
        if (recovery_) recovery_->remove();  // a clean exit leaves nothing to recover
        event->accept();
    } else {
        event->ignore();
    }
}

void MainWindow::setModified(bool modified) {
    modified_ = modified;
    if (modified) {
        if (!autosave_.isActive()) autosave_.start();  // not restarted per edit: typing never postpones it
    } else {
        // Saved, discarded or new: nothing left to recover.
        autosave_.stop();
        if (recovery_) recovery_->remove();
        writtenRecovery_.clear();
    }
    updateTitle();
}

void MainWindow::updateTitle() {
    QString name = studyPath_.isEmpty() ? tr("Untitled") : QFileInfo(studyPath_).fileName();
    if (studyPath_.isEmpty() && !copiedFrom_.isEmpty()) name = tr("Untitled (copy of %1)").arg(copiedFrom_);
    if (recovered_) name = tr("%1 (recovered)").arg(name);
    setWindowTitle(QStringLiteral("%1%2 — Saddlewise").arg(name, modified_ ? "*" : ""));
}

// ---------------------------------------------------------------- undo

bool MainWindow::eventFilter(QObject* watched, QEvent* event) {
    const QEvent::Type type = event->type();
    if (type != QEvent::ShortcutOverride && type != QEvent::KeyPress) return QMainWindow::eventFilter(watched, event);
    auto* widget = qobject_cast<QWidget*>(watched);
    if (!widget || widget->window() != this) return QMainWindow::eventFilter(watched, event);
    auto* key = static_cast<QKeyEvent*>(event);
    const bool isUndo = key->matches(QKeySequence::Undo), isRedo = key->matches(QKeySequence::Redo);
    if (!isUndo && !isRedo) return QMainWindow::eventFilter(watched, event);
    if (type == QEvent::ShortcutOverride) {
        // Claim the key so it arrives as a key press (below) whatever the menu action's state:
        // an edit still waiting to be recorded must be undoable too.
        event->accept();
        return true;
    }
    if (isUndo) undo();
    else redo();
    return true;
}

std::string MainWindow::onScreenText() const {
    try {
        return study::toJson(onScreenStudy());
    } catch (const std::exception&) {
        return {};  // nothing the writer refuses is on screen; if it were, no step is recorded
    }
}

void MainWindow::studyEdited(bool mayMerge) {
    setModified(true);
    if (loading_) return;
    pendingMayMerge_ = pendingEdit_.isActive() ? pendingMayMerge_ && mayMerge : mayMerge;
    pendingEdit_.start();
}

void MainWindow::recordEdit() {
    pendingEdit_.stop();
    if (loading_) return;
    std::string now = onScreenText();
    if (now.empty() || now == shownText_) return;
    std::string before = std::move(shownText_);
    shownText_ = now;
    // push() merges a run of typing into the step on top (StudyEdit::mergeWith).
    undo_->push(new StudyEdit(std::move(before), std::move(now), baseDirectory_, pendingMayMerge_,
                              [this](const std::string& text, const QString& base) { showStudyText(text, base); }));
    pendingMayMerge_ = true;
}

// Undo and redo show a recorded study the way Open shows a file (the views start again from
// it), keeping the study's place, the lineup's current entry and the modified state the stack
// says.
void MainWindow::showStudyText(const std::string& text, const QString& recordedBase) {
    study::Study shown;
    try {
        shown = study::fromJsonAsTyped(text, baseDirectory_.toStdString());
    } catch (const std::exception& e) {
        // Only texts the writer made are recorded; a failure here is a bug, said plainly.
        statusBar()->showMessage(tr("Cannot show that step: %1").arg(QString::fromUtf8(e.what())), 8000);
        return;
    }
    if (recordedBase != baseDirectory_)  // saved elsewhere since: the data path names the same file
        study::rebaseDataPath(shown, recordedBase.toStdString(), baseDirectory_.toStdString());
    const int entry = lineupEditor_->currentEntry();
    jobs_->cancelAll();
    setPlaying(false);
    study_ = shown;
    // The stack moves its index after the step has been shown: the modified flag follows then
    // (the indexChanged connection in the constructor).
    showingStep_ = true;
    presentStudy(true);
    if (entry >= 0 && entry < static_cast<int>(study_.methods.size())) lineupEditor_->setCurrentEntry(entry);
}

void MainWindow::undo() {
    if (pendingEdit_.isActive()) recordEdit();  // the edit just typed is the one to undo
    undo_->undo();
}

void MainWindow::redo() {
    if (pendingEdit_.isActive()) recordEdit();  // a new edit ends the redo history
    undo_->redo();
}

// ---------------------------------------------------------------- recovery

void MainWindow::setAutosaveInterval(int milliseconds) { autosave_.setInterval(std::max(10, milliseconds)); }

int MainWindow::autosaveInterval() const { return autosave_.interval(); }

QString MainWindow::recoveryFile() const { return recovery_ ? recovery_->filePath() : QString(); }

bool MainWindow::writeRecovery() {
    if (!modified_) return false;
    if (pendingEdit_.isActive()) recordEdit();
    const std::string text = onScreenText();
    if (text.empty()) return false;
    RecoveredStudy content;
    content.studyText = QString::fromStdString(text);
    content.studyPath = studyPath_;
    content.baseDirectory = baseDirectory_;
    content.copiedFrom = copiedFrom_;
    const QString key = content.studyText + '\n' + studyPath_ + '\n' + baseDirectory_ + '\n' + copiedFrom_;
    if (recovery_ && key == writtenRecovery_ && recovery_->exists()) return true;  // nothing new since
    if (!recovery_) recovery_ = std::make_unique<RecoverySlot>();
    content.savedAt = QDateTime::currentDateTimeUtc();
    QString error;
    if (!recovery_->write(content, &error)) {
        // The work itself is fine; say once per failure why it is not being kept aside.
        statusBar()->showMessage(tr("Unsaved work could not be kept aside: %1").arg(error), 8000);
        writtenRecovery_.clear();
        return false;
    }
    writtenRecovery_ = key;
    return true;
}

bool MainWindow::offerRecovery() {
    std::vector<OrphanedRecovery> orphans = RecoverySlot::claimOrphans();
    for (const OrphanedRecovery& orphan : orphans) {
        QString error;
        const std::optional<RecoveredStudy> found = RecoverySlot::read(orphan.file, &error);
        study::Study restored;
        if (found) {
            try {
                restored = study::fromJsonAsTyped(found->studyText.toStdString(), found->baseDirectory.toStdString());
            } catch (const std::exception& e) {
                error = tr("%1: study: %2").arg(orphan.file, QString::fromUtf8(e.what()));
            }
        }
        if (!error.isEmpty()) {
            // Set aside rather than deleted: the user may still want to look at it.
            const QString aside = orphan.file + QStringLiteral(".unreadable");
            QFile::remove(aside);
            QFile::rename(orphan.file, aside);
            statusBar()->showMessage(tr("A recovery file could not be read (%1); it was set aside as %2")
                                         .arg(error, QFileInfo(aside).fileName()),
                                     12000);
            continue;
        }
        const QString name = !found->studyPath.isEmpty() ? QFileInfo(found->studyPath).fileName()
                             : !found->copiedFrom.isEmpty() ? tr("an untitled copy of %1").arg(found->copiedFrom)
                                                            : tr("an untitled study");
        const QString when = found->savedAt.isValid() ? QLocale().toString(found->savedAt.toLocalTime(), QLocale::ShortFormat)
                                                      : QLocale().toString(orphan.modified, QLocale::ShortFormat);
        const QString title = tr("Recover unsaved work");
        const QString text = tr("Saddlewise did not close normally. Unsaved changes to %1 were kept (last kept %2).\n\n"
                                "Restore them? No discards them; Cancel keeps them for the next start.")
                                 .arg(name, when);
        // Cancel is there so that Escape or closing the question never throws the work away.
        const auto buttons = QMessageBox::Yes | QMessageBox::No | QMessageBox::Cancel;
        const auto answer =
            question_ ? question_(this, title, text, buttons) : QMessageBox::question(this, title, text, buttons, QMessageBox::Yes);
        if (answer == QMessageBox::No) {
            QFile::remove(orphan.file);
            continue;
        }
        if (answer != QMessageBox::Yes) return false;  // Cancel: offered again next time
        if (!maybeSave()) return false;
        jobs_->cancelAll();
        setPlaying(false);
        study_ = restored;
        studyPath_ = found->studyPath;
        baseDirectory_ = found->baseDirectory;
        copiedFrom_ = found->copiedFrom;
        recovered_ = true;
        undo_->clear();
        undo_->resetClean();  // unsaved until saved, whatever is undone
        presentStudy(true);
        // This window keeps it aside now; the old file goes once the new one is written.
        writeRecovery();
        QFile::remove(orphan.file);
        return true;
    }
    return false;
}

// ---------------------------------------------------------------- help

QString MainWindow::aboutText() {
    // The job paragraph of README.md (tests/gui/window_test.cpp keeps the two the same).
    return tr("Saddlewise is a desktop workbench for people who fit and tune models by numerical optimization — a "
              "statistician whose nonlinear regression stalls, an engineer estimating parameters from test data, an ML "
              "practitioner debugging a loss on a small problem — and who must find out why a fit zig-zags, stalls or "
              "ends somewhere suspicious (a saddle, a long ill-conditioned valley, bad scaling, an indefinite Hessian "
              "that sends Newton uphill), choose the method and settings that work, and show the evidence in a review. "
              "You type an objective (a formula, or a model formula fitted to a CSV table), Saddlewise derives its "
              "exact gradient and Hessian symbolically, runs several methods side by side from the starts you choose, "
              "and shows the landscape, the iterate paths, the local quadratic model and the Hessian's eigenvalues at "
              "any iterate; plots, numbers and step tables export, and a headless command line serves scripts and CI.");
}

QString MainWindow::formulaSyntaxText() {
    return tr(
        "<h3>Formulas</h3>"
        "<p>A formula is written in your own names: the variables (or, in a fit, the parameters and the table's "
        "columns). Names are letters, digits and _, not starting with a digit.</p>"
        "<table cellspacing=4>"
        "<tr><td><code>+ - * /</code></td><td>arithmetic</td></tr>"
        "<tr><td><code>^</code></td><td>power, right to left (<code>2^3^2</code> is 2^9); a leading minus binds "
        "weaker: <code>-x^2</code> is −(x²)</td></tr>"
        "<tr><td><code>( )</code></td><td>grouping</td></tr>"
        "<tr><td><code>&lt; &lt;= &gt; &gt;= == !=</code></td><td>comparisons, 1 or 0</td></tr>"
        "<tr><td><code>&amp;&amp; ||</code></td><td>and, or (non-zero is true)</td></tr>"
        "<tr><td><code>c ? a : b</code></td><td>a where c is non-zero, else b</td></tr>"
        "<tr><td><code>sin cos tan asin acos atan sinh cosh tanh asinh acosh atanh</code></td><td>trigonometric and "
        "hyperbolic</td></tr>"
        "<tr><td><code>exp log ln log10 log2 sqrt abs sign</code></td><td><code>log</code> and <code>ln</code> are both "
        "the natural logarithm</td></tr>"
        "<tr><td><code>atan2(y, x)</code></td><td>angle of the point (x, y)</td></tr>"
        "<tr><td><code>min(a, b, …) max(a, b, …)</code></td><td>two or more arguments</td></tr>"
        "<tr><td><code>pi e</code></td><td>constants (a variable of the same name wins)</td></tr>"
        "<tr><td><code>2.5e-3</code></td><td>numbers use a decimal point, never a comma</td></tr>"
        "</table>"
        "<p>Derivatives are exact: <code>abs</code> has slope sign(u) (0 at 0), <code>sign</code> and comparisons "
        "have slope 0, <code>c ? a : b</code> takes the slope of the branch taken, <code>min</code>/<code>max</code> "
        "the slope of the argument chosen.</p>"
        "<p>A formula may be up to %1 characters long and nest %2 levels of parentheses. Mistakes are marked where "
        "they are as you type; a name that is not declared can be added as a variable in one click.</p>"
        "<h3>Fits</h3>"
        "<p>The model is a formula in the table's columns and the parameters; the response is the column it should "
        "reproduce. The loss adds up the residuals r = response − model: least squares ½Σr², weighted ½Σwr², Huber "
        "and Cauchy (robust, with a scale), logistic regression (the model is the log-odds, the response 0 or 1), "
        "Poisson counts (the model is the log of the mean).</p>")
        .arg(expr::kMaxFormulaLength)
        .arg(expr::kMaxNestingDepth);
}

QString MainWindow::shortcutsText() const {
    QString rows;
    for (const QString& name : {QStringLiteral("new"), QStringLiteral("open"), QStringLiteral("save"),
                                QStringLiteral("save-as"), QStringLiteral("undo"), QStringLiteral("redo"),
                                QStringLiteral("run-all"), QStringLiteral("step-all"),
                                QStringLiteral("play"), QStringLiteral("reset"), QStringLiteral("cancel"),
                                QStringLiteral("export-view"), QStringLiteral("export-steps"),
                                QStringLiteral("preferences"), QStringLiteral("formula-help"), QStringLiteral("quit")}) {
        const QAction* a = action(name);
        if (!a || a->shortcut().isEmpty()) continue;
        QString text = a->text();
        text.remove('&');
        text.remove(QStringLiteral("…"));
        rows += QStringLiteral("<tr><td><b>%1</b></td><td>%2</td><td>%3</td></tr>")
                    .arg(a->shortcut().toString(QKeySequence::NativeText).toHtmlEscaped(), text.toHtmlEscaped(),
                         a->statusTip().toHtmlEscaped());
    }
    return tr("<h3>Keyboard shortcuts</h3><table cellspacing=6>%1</table>"
              "<p>On the landscape: drag the start marker (⊕) to move every method's start, click an iterate to "
              "select it, click elsewhere to start from there; the wheel zooms and a drag pans. Legends sit under "
              "their plots; a shortened name shows in full as a tooltip.</p>")
        .arg(rows);
}

void MainWindow::showHelpText(const QString& title, const QString& html) {
    auto* dialog = new QDialog(this);
    dialog->setAttribute(Qt::WA_DeleteOnClose);
    dialog->setWindowTitle(title);
    auto* text = new QTextBrowser(dialog);
    text->setHtml(html);
    text->setOpenExternalLinks(false);
    text->setToolTip(title);
    auto* buttons = new QDialogButtonBox(QDialogButtonBox::Close, dialog);
    connect(buttons, &QDialogButtonBox::rejected, dialog, &QDialog::reject);
    auto* layout = new QVBoxLayout(dialog);
    layout->addWidget(text);
    layout->addWidget(buttons);
    const QRect available = screen() ? screen()->availableGeometry() : QRect(0, 0, 1280, 800);
    dialog->resize(std::min(680, available.width() - 80), std::min(620, available.height() - 80));
    dialog->show();
}

void MainWindow::about() {
    QMessageBox::about(this, tr("About Saddlewise"),
                       tr("<b>Saddlewise</b> %1<p>%2</p><p><i>%3</i></p>")
                           .arg(QCoreApplication::applicationVersion(), aboutText().toHtmlEscaped(),
                                QString::fromStdString(study::cautionLine()).toHtmlEscaped()));
}

// ---------------------------------------------------------------- objective, lineup, runs

void MainWindow::showBuildProblem(const std::exception& problem) {
    if (const auto* formula = dynamic_cast<const expr::FormulaError*>(&problem)) {
        QStringList names;
        for (const std::string& name : formula->unknownNames()) names << QString::fromStdString(name);
        objectiveEditor_->showFormulaError(QString::fromStdString(formula->reason()), formula->position(), names);
    } else if (const auto* place = dynamic_cast<const study::StudyError*>(&problem)) {
        objectiveEditor_->showProblem(
            QStringLiteral("%1: %2").arg(QString::fromStdString(place->place()), QString::fromStdString(place->problem())),
            QString::fromStdString(place->place()));
    } else {
        objectiveEditor_->showProblem(QString::fromUtf8(problem.what()));
    }
}

void MainWindow::rebuildObjective() {
    if (loading_) return;
    study::Study candidate = onScreenStudy();
    if (candidate.fit && candidate.fit->dataPath.empty()) {
        objectiveEditor_->showProblem(tr("Choose the table to fit (Choose… beside Table)."));
        return;
    }
    std::shared_ptr<const Objective> built;
    try {
        study::checkVariables(candidate);
        objectiveEditor_->parseActiveFormula(candidate);
        built = study::makeObjective(candidate, baseDirectory_.toStdString());
    } catch (const std::exception& e) {
        showBuildProblem(e);
        return;  // the last good objective and its results stay on screen
    }
    if (!built) {
        objectiveEditor_->showProblem(tr("This objective cannot be built"));
        return;
    }
    objectiveEditor_->clearProblem();
    const bool sameRanges = objective_ && study_.variables.size() == candidate.variables.size() &&
                            std::equal(study_.variables.begin(), study_.variables.end(), candidate.variables.begin(),
                                       [](const study::Variable& a, const study::Variable& b) {
                                           return a.lower == b.lower && a.upper == b.upper;
                                       });
    if (!sameRanges) hasViewBox_ = false;
    study_ = candidate;
    objective_ = built;
    derivatives_->showDerivatives(study_, objectiveEditor_->columnNames());
    restart();
    surveys_->studyChanged(study_, objective_);
}

void MainWindow::onLineupEdited() {
    if (loading_) return;
    study_.methods = lineupEditor_->entries();
    studyEdited();
    if (objective_) {
        jobs_->endStepSession();
        runAll();
        surveys_->studyChanged(study_, objective_);
    }
}

void MainWindow::onPlotAxesChanged() {
    if (loading_) return;
    const study::Study shown = onScreenStudy();
    study_.view.plotX = shown.view.plotX;
    study_.view.plotY = shown.view.plotY;
    hasViewBox_ = false;
    studyEdited();
    if (snapshot_) {
        auto copy = std::make_shared<widgets::Snapshot>(*snapshot_);
        copy->plotX = study_.view.plotX;
        copy->plotY = study_.view.plotY;
        pushSnapshot(copy);
    }
    requestField();
    if (objective_) surveys_->studyChanged(study_, objective_);
}

void MainWindow::onHeldValuesEdited() {
    if (snapshot_) {
        auto copy = std::make_shared<widgets::Snapshot>(*snapshot_);
        copy->held = heldVector();
        pushSnapshot(copy);
    }
    requestField();
}

void MainWindow::restart() {
    if (!objective_) return;
    setPlaying(false);
    requestField();
    runAll();
}

Vector MainWindow::start() const {
    Vector x(static_cast<Eigen::Index>(study_.variables.size()));
    for (std::size_t i = 0; i < study_.variables.size(); ++i) x(static_cast<Eigen::Index>(i)) = study_.variables[i].start;
    return x;
}

RunRequest MainWindow::runRequest() const {
    RunRequest request;
    request.objective = objective_;
    request.start = start();
    request.rules = study_.stoppingRules();  // every stopping rule of the study, as the run verb uses them
    int index = 0;
    for (const auto& e : study_.methods) {
        const int slot = index++;
        if (!e.enabled) continue;
        RunEntry entry;
        entry.label = e.label;
        entry.methodId = e.method;
        entry.options = e.options;
        entry.colour = QColor(QString::fromStdString(e.colour));
        if (!entry.colour.isValid()) entry.colour = widgets::lineupColour(slot);
        bool ok = false;
        entry.marker = widgets::markerFromName(QString::fromStdString(e.marker), &ok);
        if (const auto* info = solve::findMethod(e.method))
            entry.usesTrustRegion = info->family == "trust-region" || e.method == "levenberg-marquardt";
        request.entries.push_back(entry);
    }
    return request;
}

void MainWindow::runAll() {
    if (!objective_) return;
    setPlaying(false);
    jobs_->runAll(runRequest());
    if (modified_ && !loading_) writeRecovery();  // a run may be what crashes
}

void MainWindow::stepAll() {
    if (!objective_) return;
    if (!jobs_->hasStepSession())
        jobs_->beginSteps(runRequest());
    else
        jobs_->stepAll();
}

void MainWindow::setPlaying(bool on) {
    if (QAction* play = action("play")) {
        const QSignalBlocker block(play);
        play->setChecked(on);
        play->setText(on ? tr("&Pause") : tr("&Play"));
        play->setIcon(toolIcon(on ? "pause" : "play", palette()));
    }
    if (on == animation_.isActive()) return;
    if (on) {
        if (!objective_) return;
        if (!jobs_->hasStepSession() || jobs_->stepSessionFinished()) jobs_->beginSteps(runRequest());
        animation_.start(1000 / std::max(1, speed_->value()));
    } else {
        animation_.stop();
    }
}

void MainWindow::animationTick() {
    if (!jobs_->hasStepSession()) {
        setPlaying(false);
        return;
    }
    if (jobs_->stepSessionFinished()) {
        setPlaying(false);
        return;
    }
    jobs_->stepAll();  // skipped while the previous step is still busy
}

void MainWindow::resetRuns() {
    if (!objective_) return;
    setPlaying(false);
    jobs_->beginSteps(runRequest());
}

void MainWindow::cancelJobs() {
    setPlaying(false);
    jobs_->cancelAll();
}

void MainWindow::moveStart(const Vector& point) {
    if (!objective_) return;
    const int n = static_cast<int>(study_.variables.size());
    Vector x = start();
    if (point.size() == n) {
        x = point;
    } else if (point.size() == 2) {
        x(study_.view.plotX) = point(0);
        x(study_.view.plotY) = point(1);
    } else {
        return;
    }
    for (int i = 0; i < n; ++i) study_.variables[static_cast<std::size_t>(i)].start = x(i);
    objectiveEditor_->setStart(x);
    landscape_->setStart(x);
    if (landscape_->draggingStart())
        setModified(true);  // recorded once, when the drag ends
    else
        studyEdited();
    const bool wasStepping = jobs_->hasStepSession() && !animation_.isActive();
    if (animation_.isActive()) {
        jobs_->beginSteps(runRequest());
    } else if (wasStepping && snapshot_ && !snapshot_->tracks.empty() && snapshot_->tracks[0].run &&
               !snapshot_->tracks[0].run->finished()) {
        jobs_->beginSteps(runRequest());
    } else {
        jobs_->runAll(runRequest());
    }
    if (study_.variables.size() > 2) heldResample_.start();
}

void MainWindow::setViewBox(const analyze::Box& box) {
    viewBox_ = box;
    hasViewBox_ = true;
    requestField();
}

analyze::Box MainWindow::homeBox() const {
    analyze::Box box;
    const auto& vars = study_.variables;
    const int x = study_.view.plotX, y = study_.view.plotY;
    if (x < static_cast<int>(vars.size()) && y < static_cast<int>(vars.size())) {
        box.xMin = vars[static_cast<std::size_t>(x)].lower;
        box.xMax = vars[static_cast<std::size_t>(x)].upper;
        box.yMin = vars[static_cast<std::size_t>(y)].lower;
        box.yMax = vars[static_cast<std::size_t>(y)].upper;
    }
    return box;
}

Vector MainWindow::heldVector() const {
    const int n = static_cast<int>(study_.variables.size());
    Vector held = start();
    if (snapshot_ && selection_.valid() && selection_.track < static_cast<int>(snapshot_->tracks.size())) {
        const auto& run = snapshot_->tracks[static_cast<std::size_t>(selection_.track)].run;
        if (run && selection_.iteration < static_cast<int>(run->trace.size())) {
            const Vector& x = run->trace[static_cast<std::size_t>(selection_.iteration)].x;
            if (x.size() == n) held = x;
        }
    }
    // Values typed for the variables that are not plotted replace the iterate's.
    if (n > 2 && !objectiveEditor_->heldFollowsSelection()) {
        const Vector typed = objectiveEditor_->typedHeldValues();
        for (int i = 0; i < n && i < typed.size(); ++i)
            if (i != study_.view.plotX && i != study_.view.plotY && std::isfinite(typed(i))) held(i) = typed(i);
    }
    return held;
}

void MainWindow::requestField() {
    if (!objective_) return;
    const int n = objective_->dimension();
    if (n < 1) return;
    FieldRequest request;
    request.objective = objective_;
    request.held = heldVector();
    request.xVariable = std::clamp(study_.view.plotX, 0, n - 1);
    request.yVariable = std::clamp(study_.view.plotY, 0, n - 1);
    if (!hasViewBox_) {
        viewBox_ = homeBox();
        hasViewBox_ = true;
        landscape_->setHomeBox(viewBox_);
        const QSignalBlocker quiet(landscape_);  // we are sampling this box already
        landscape_->resetView();
    }
    request.box = viewBox_;
    request.nx = request.ny = std::clamp(study_.view.gridCells, 20, 2000);
    request.contourCount = std::clamp(study_.view.contourCount, 2, 100);
    request.logColour = landscape_->logColour();
    jobs_->sampleField(request);
    updateHeldText();
}

void MainWindow::updateHeldText() {
    if (study_.variables.size() > 2) objectiveEditor_->setHeldValues(heldVector());
}

void MainWindow::showRuns(std::shared_ptr<const RunBatch> batch) {
    if (!batch || batch->objective != objective_) return;  // results of a replaced objective
    auto snap = std::make_shared<widgets::Snapshot>();
    snap->objective = batch->objective;
    for (const auto& v : study_.variables) snap->variableNames.push_back(QString::fromStdString(v.name));
    snap->plotX = study_.view.plotX;
    snap->plotY = study_.view.plotY;
    for (std::size_t i = 0; i < batch->runs.size() && i < batch->entries.size(); ++i) {
        widgets::RunTrack track;
        track.label = QString::fromStdString(batch->entries[i].label);
        track.colour = batch->entries[i].colour;
        track.marker = batch->entries[i].marker;
        track.run = batch->runs[i];
        track.usesTrustRegion = batch->entries[i].usesTrustRegion;
        snap->tracks.push_back(track);
    }
    // Keep the selected iterate where it still exists; otherwise select the first start.
    if (!selection_.valid() || selection_.track >= static_cast<int>(snap->tracks.size())) selection_ = {0, 0};
    if (!snap->tracks.empty()) {
        const auto& run = snap->tracks[static_cast<std::size_t>(selection_.track)].run;
        const int last = run ? static_cast<int>(run->trace.size()) - 1 : -1;
        if (batch->stepping && last >= 0) selection_.iteration = last;  // follow the animation
        selection_.iteration = std::min(selection_.iteration, last);
        if (selection_.iteration < 0) selection_ = {};
    } else {
        selection_ = {};
    }
    snap->held = heldVector();
    if (snap->held.size() != objective_->dimension()) snap->held = batch->start;
    landscape_->setStart(batch->start);
    shownRunGeneration_ = batch->generation;
    pushSnapshot(snap);

    // Status bar summary.
    int converged = 0, failed = 0;
    double best = std::numeric_limits<double>::infinity();
    QString bestLabel, firstFailure;
    for (const auto& t : snap->tracks) {
        if (!t.run) continue;
        if (solve::isConvergence(t.run->termination)) ++converged;
        if (widgets::RunSummaryModel::failed(*t.run)) {
            ++failed;
            if (firstFailure.isEmpty()) firstFailure = QStringLiteral("%1: %2").arg(t.label, QString::fromStdString(t.run->message));
        }
        if (std::isfinite(t.run->value) && t.run->value < best) {
            best = t.run->value;
            bestLabel = t.label;
        }
    }
    const int count = static_cast<int>(snap->tracks.size());
    if (batch->stepping && !batch->allFinished) {
        const int k = snap->tracks.empty() || !snap->tracks[0].run ? 0 : snap->tracks[0].run->iterations();
        summary_ = tr("Stepping %n method(s): iteration %1", nullptr, count).arg(k);
    } else {
        summary_ = tr("Last run: %n method(s) in %1 ms; %2 converged", nullptr, count)
                       .arg(batch->seconds * 1e3, 0, 'f', 1)
                       .arg(converged);
        if (failed > 0) summary_ += tr(", %1 failed").arg(failed);
        if (batch->cancelled) summary_ += tr(" (cancelled)");
    }
    if (!bestLabel.isEmpty()) summary_ += tr("; lowest f = %1 (%2)").arg(humanNumber(best), bestLabel);
    // When nothing got anywhere the reason is what matters (details in the Summary panel).
    if (failed > 0 && failed == count) summary_ += tr(" — %1").arg(firstFailure);
    statusSummary_->setText(summary_);
    statusSummary_->setToolTip(failed > 0 ? tr("See the Summary panel for each method's message") : tr("Summary of the last run"));
    if (failed > 0 && failed == count) docks_.at("summary")->raise();
    if (study_.variables.size() > 2) heldResample_.start();
    emit runsShown();
}

// The landscape follows every result at once (it is what a drag looks at); the other views
// and the tables catch up 40 ms after the last result, so a continuous drag or a fast
// animation redraws one plot per frame rather than six.
void MainWindow::pushSnapshot(std::shared_ptr<const widgets::Snapshot> snapshot) {
    snapshot_ = std::move(snapshot);
    landscape_->setSnapshot(snapshot_);
    landscape_->setSelection(selection_);
    lazyViews_.start();
}

void MainWindow::updateOtherViews() {
    for (widgets::PlotView* view : {static_cast<widgets::PlotView*>(localModel_), static_cast<widgets::PlotView*>(curvature_),
                                    static_cast<widgets::PlotView*>(progress_), static_cast<widgets::PlotView*>(slice_)}) {
        view->setSnapshot(snapshot_);
        view->setSelection(selection_);
    }
    steps_->setSnapshot(snapshot_);
    steps_->setSelection(selection_);
    runSummary_->setSnapshot(snapshot_);
}

void MainWindow::showField(std::shared_ptr<const widgets::FieldSnapshot> field) {
    if (!objective_) return;
    field_ = std::move(field);
    landscape_->setField(field_);
    emit fieldShown();
}

void MainWindow::setSelection(const widgets::Selection& selection) {
    if (selection == selection_) return;
    selection_ = selection;
    emit selectionChanged(selection_);
    if (lazyViews_.isActive()) {
        lazyViews_.stop();
        updateOtherViews();
    }
    for (widgets::PlotView* view : {static_cast<widgets::PlotView*>(landscape_), static_cast<widgets::PlotView*>(localModel_),
                                    static_cast<widgets::PlotView*>(curvature_), static_cast<widgets::PlotView*>(progress_),
                                    static_cast<widgets::PlotView*>(slice_)})
        view->setSelection(selection_);
    steps_->setSelection(selection_);
    if (study_.variables.size() > 2) {
        updateHeldText();
        if (objectiveEditor_->heldFollowsSelection()) heldResample_.start();
    }
    emit selectionChanged(selection_);
}

QString MainWindow::lastSummary() const { return summary_; }

void MainWindow::onJobProgress(int /*kind*/, double fraction) {
    statusProgress_->setValue(static_cast<int>(std::lround(100 * std::clamp(fraction, 0.0, 1.0))));
}

void MainWindow::onJobStateChanged() {
    const bool busy = jobs_->anyBusy();
    // Short jobs (a drag rerun) should not flash the bar: it shows only while busy.
    statusProgress_->setVisible(busy);
    statusCancel_->setVisible(busy);
    if (!busy) statusProgress_->setValue(0);
}

bool MainWindow::waitForIdle(int timeoutMs) {
    QElapsedTimer clock;
    clock.start();
    while (clock.elapsed() < timeoutMs) {
        QCoreApplication::processEvents(QEventLoop::AllEvents, 5);
        if (!jobs_->anyBusy() && !heldResample_.isActive() && !lazyViews_.isActive() && !surveys_->pending()) {
            QCoreApplication::processEvents();
            if (!jobs_->anyBusy() && !lazyViews_.isActive()) return true;
        }
        QThread::usleep(200);
    }
    return false;
}

// ---------------------------------------------------------------- exports

QStringList MainWindow::viewNames() const {
    return {QStringLiteral("landscape"), QStringLiteral("local-model"), QStringLiteral("curvature"),
            QStringLiteral("progress"), QStringLiteral("slice"), QStringLiteral("basins")};
}

widgets::PlotView* MainWindow::viewByName(const QString& name) const {
    if (name == "landscape") return landscape_;
    if (name == "local-model") return localModel_;
    if (name == "curvature") return curvature_;
    if (name == "progress") return progress_;
    if (name == "slice") return slice_;
    if (name == "basins") return surveys_->basinsView();
    return nullptr;
}

QString MainWindow::figureTitle() const {
    QString title = study_.fit ? tr("%1 = %2 fitted to %3")
                                     .arg(QString::fromStdString(study_.fit->response), QString::fromStdString(study_.fit->model),
                                          QFileInfo(QString::fromStdString(study_.fit->dataPath)).fileName())
                               : tr("f = %1").arg(QString::fromStdString(study_.formula));
    const int n = static_cast<int>(study_.variables.size());
    if (n > 2) {
        const Vector held = heldVector();
        QStringList parts;
        for (int i = 0; i < n && i < held.size(); ++i) {
            if (i == study_.view.plotX || i == study_.view.plotY) continue;
            parts << QStringLiteral("%1 = %2").arg(QString::fromStdString(study_.variables[static_cast<std::size_t>(i)].name),
                                                   humanNumber(held(i)));
        }
        title += tr("; held at %1").arg(parts.join(QStringLiteral(", ")));
    }
    return title;
}

bool MainWindow::exportView(const QString& viewName, const QString& path, int width, int height, QString* error,
                            const ExportLook& look) {
    widgets::PlotView* view = viewByName(viewName);
    if (!view) {
        if (error) *error = tr("unknown view '%1'; known: %2").arg(viewName, viewNames().join(", "));
        return false;
    }
    widgets::FigureLook figure;
    figure.light = look.light;
    if (look.title) figure.title = figureTitle();
    return view->exportFigure(path, width, height, figure, error);
}

bool MainWindow::exportStepsCsv(const QString& path, QString* error) {
    if (!snapshot_) {
        if (error) *error = tr("there are no runs to export yet");
        return false;
    }
    // Where the numbers came from, and the caution, as comment lines above the header.
    const QString preamble = QStringLiteral("# %1\n# %2\n").arg(
        QString::fromStdString(study::provenanceLine(study::provenanceOf(study_))),
        QString::fromStdString(study::cautionLine()));
    const QByteArray text = (preamble + widgets::StepsModel::toCsv(*snapshot_)).toUtf8();
    QSaveFile file(path);
    if (!file.open(QIODevice::WriteOnly) || file.write(text) != text.size() || !file.commit()) {
        if (error) *error = tr("cannot write %1: %2").arg(path, file.errorString());
        return false;
    }
    return true;
}

void MainWindow::exportViewDialog() {
    QDialog dialog(this);
    dialog.setWindowTitle(tr("Export view"));
    auto* view = new QComboBox(&dialog);
    const QStringList titles = {tr("Landscape"), tr("Local model"), tr("Curvature"), tr("Progress"), tr("Slice"),
                                tr("Basins")};
    const QStringList names = viewNames();
    for (int i = 0; i < names.size(); ++i) view->addItem(titles[i], names[i]);
    view->setToolTip(tr("Which view to save"));
    auto* width = new QSpinBox(&dialog);
    auto* height = new QSpinBox(&dialog);
    for (QSpinBox* s : {width, height}) {
        s->setRange(100, 8000);
        s->setSuffix(tr(" px"));
    }
    width->setValue(preferences_.exportWidth);
    height->setValue(preferences_.exportHeight);
    width->setToolTip(tr("Width of the saved image (PDF and SVG: in points)"));
    height->setToolTip(tr("Height of the saved image (PDF and SVG: in points)"));
    auto* format = new QComboBox(&dialog);
    format->addItems({"png", "svg", "pdf"});
    format->setCurrentIndex(std::max(0, format->findText(preferences_.exportFormat)));
    format->setToolTip(tr("PNG for pictures, SVG or PDF for scalable drawings"));
    auto* light = new QCheckBox(tr("Light background, for print"), &dialog);
    light->setChecked(true);
    light->setToolTip(tr("Draw the figure on white whatever the window's appearance; untick to keep the window's look"));
    auto* title = new QCheckBox(tr("Title line with the formula and held values"), &dialog);
    title->setToolTip(figureTitle());
    auto* buttons = new QDialogButtonBox(QDialogButtonBox::Save | QDialogButtonBox::Cancel, &dialog);
    auto* form = new QFormLayout(&dialog);
    form->addRow(tr("View"), view);
    form->addRow(tr("Width"), width);
    form->addRow(tr("Height"), height);
    form->addRow(tr("Format"), format);
    form->addRow(light);
    form->addRow(title);
    form->addRow(buttons);
    connect(buttons, &QDialogButtonBox::accepted, &dialog, &QDialog::accept);
    connect(buttons, &QDialogButtonBox::rejected, &dialog, &QDialog::reject);
    if (dialog.exec() != QDialog::Accepted) return;
    const QString suffix = format->currentText();
    QString path = QFileDialog::getSaveFileName(this, tr("Export view"),
                                                suggestedPath(view->currentData().toString() + "." + suffix),
                                                suffix.toUpper() + QStringLiteral(" (*.%1)").arg(suffix));
    if (path.isEmpty()) return;
    rememberFolder(path);
    if (QFileInfo(path).suffix().isEmpty()) path += "." + suffix;
    QString error;
    ExportLook look;
    look.light = light->isChecked();
    look.title = title->isChecked();
    if (!exportView(view->currentData().toString(), path, width->value(), height->value(), &error, look))
        QMessageBox::warning(this, tr("Cannot export"), error);
    else
        statusBar()->showMessage(tr("Saved %1").arg(path), 4000);
}

bool MainWindow::writeReport(const QString& path, QString* error) {
    if (!objective_) {
        if (error) *error = tr("the objective cannot be built yet; fix the problem shown in the Objective panel first");
        return false;
    }
    if (reportWriter_->busy()) {
        if (error) *error = tr("a report is being written already; wait for it or cancel it");
        return false;
    }
    return reportWriter_->start(study_, studyPath_, baseDirectory_, modified_, path, error);
}

void MainWindow::writeReportDialog() {
    const QString base = studyPath_.isEmpty() ? QStringLiteral("report") : QFileInfo(studyPath_).completeBaseName() + "-report";
    const QString folder = studyPath_.isEmpty() ? lastUsedFolder() : QFileInfo(studyPath_).absolutePath();
    const QString html = tr("HTML report, one file (*.html)"), pdf = tr("PDF report (*.pdf)");
    QString filter = html;
    QString path = QFileDialog::getSaveFileName(this, tr("Write review report"), QDir(folder).filePath(base + ".html"),
                                                html + ";;" + pdf, &filter);
    if (path.isEmpty()) return;
    if (QFileInfo(path).suffix().isEmpty()) path += filter == pdf ? ".pdf" : ".html";
    rememberFolder(path);
    QString error;
    if (!writeReport(path, &error)) {
        QMessageBox::warning(this, tr("Cannot write the report"), error);
        return;
    }
    statusBar()->showMessage(tr("Writing the report to %1…").arg(QDir::toNativeSeparators(path)));
    // One connection per request: the writer tells how this report ended.
    auto* connection = new QMetaObject::Connection;
    *connection = connect(reportWriter_, &ReportWriter::finished, this, [this, connection](int outcome, const QString& message) {
        disconnect(*connection);
        delete connection;
        if (outcome == ReportWriter::Failed)
            QMessageBox::warning(this, tr("Cannot write the report"), message);
        else
            statusBar()->showMessage(message, 6000);
    });
}

void MainWindow::exportStepsDialog() {
    QString path = QFileDialog::getSaveFileName(this, tr("Export steps"), suggestedPath("steps.csv"), tr("CSV tables (*.csv)"));
    if (path.isEmpty()) return;
    rememberFolder(path);
    if (QFileInfo(path).suffix().isEmpty()) path += ".csv";
    QString error;
    if (!exportStepsCsv(path, &error))
        QMessageBox::warning(this, tr("Cannot export"), error);
    else
        statusBar()->showMessage(tr("Saved %1").arg(path), 4000);
}

}  // namespace sw::window
