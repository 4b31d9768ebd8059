#pragma once
// The workbench window: every view in a dock, one place for actions, a job runner for
// all computation, the study as the document (open, save, recent files, samples).
//
// Docks are made in one place, createDocks(), with addViewDock(); their default arrangement is
// placeDocks(). Adding a view is: build the widget, addViewDock(name, title, widget, tip), and
// one line in placeDocks() saying where it goes (see docs/window.md).

#include "app/window/job_runner.h"
#include "app/window/preferences.h"
#include "core/study/study.h"
#include "widgets/snapshot.h"

#include <QMainWindow>
#include <QMessageBox>
#include <QPointer>
#include <QTimer>
#include <functional>
#include <map>
#include <memory>

class QAction;
class QDockWidget;
class QScrollArea;
class QLabel;
class QMenu;
class QProgressBar;
class QSpinBox;
class QToolButton;
class QUndoStack;

namespace sw::widgets {
class LandscapeView;
class LocalModelView;
class CurvatureView;
class ProgressView;
class SliceView;
class StepsTable;
class RunSummary;
class PlotView;
}  // namespace sw::widgets

namespace sw::window {

class FitStatisticsPanel;
class ObjectiveEditor;
class LineupEditor;
class DerivativesPane;

// How an exported figure looks. By default print-ready: light background whatever the
// window's appearance, text at least 10 pt, no interaction hints.
struct ExportLook {
    bool light = true;     // false: the window's own appearance (dark when it is dark)
    bool title = false;    // a title line: the formula (or model) and the held values
};
class FindingsPanel;
class FindingsController;
class SurveyController;
class ReportWriter;
class RecoverySlot;

class MainWindow : public QMainWindow {
    Q_OBJECT
public:
    explicit MainWindow(QWidget* parent = nullptr);
    ~MainWindow() override;

    // Document. openStudy reports the first problem with its place in *error (no dialog).
    // A study's content that does not parse (a bad formula, a number typed as text, a table
    // that cannot be read) does not stop it opening: it is shown as saved, with the problem.
    // asCopy: opens the file as a new untitled study (samples), so Save never overwrites it.
    bool openStudy(const QString& path, QString* error = nullptr, bool asCopy = false);
    // Writes what is on screen (onScreenStudy), including fields that do not parse yet.
    bool saveStudy(const QString& path, QString* error = nullptr);
    void newStudy();
    // The study that runs: the last one whose objective could be built.
    const study::Study& study() const { return study_; }
    // The study as the editors show it now (what Save writes).
    study::Study onScreenStudy() const;
    QString studyPath() const { return studyPath_; }
    bool isModified() const { return modified_; }
    // Sample study files found next to the sources or the installed program.
    static QStringList sampleFiles();

    // Exports. viewName is one of viewNames(); the format follows the file suffix.
    QStringList viewNames() const;
    bool exportView(const QString& viewName, const QString& path, int width, int height, QString* error = nullptr,
                    const ExportLook& look = {});
    // The title line of an exported figure: formula (or model and response) and held values.
    QString figureTitle() const;
    bool exportStepsCsv(const QString& path, QString* error = nullptr);
    // The review report of the study on screen (report_writer.h): HTML or PDF by the suffix,
    // made through the job runner; the writer's finished() says when and how it ended.
    bool writeReport(const QString& path, QString* error = nullptr);
    ReportWriter* reportWriter() const { return reportWriter_; }

    // State, for tests, screenshots and benchmarks.
    std::shared_ptr<const widgets::Snapshot> snapshot() const { return snapshot_; }
    std::shared_ptr<const widgets::FieldSnapshot> field() const { return field_; }
    std::shared_ptr<const Objective> objective() const { return objective_; }
    widgets::Selection selection() const { return selection_; }
    Vector start() const;
    QString lastSummary() const;
    JobRunner* jobs() const { return jobs_; }
    FitStatisticsPanel* fitStatistics() const { return fitStatistics_; }
    widgets::LandscapeView* landscape() const { return landscape_; }
    widgets::LocalModelView* localModel() const { return localModel_; }
    widgets::CurvatureView* curvature() const { return curvature_; }
    widgets::ProgressView* progressView() const { return progress_; }
    widgets::SliceView* slice() const { return slice_; }
    widgets::StepsTable* steps() const { return steps_; }
    widgets::RunSummary* runSummary() const { return runSummary_; }
    DerivativesPane* derivatives() const { return derivatives_; }
    QDockWidget* dock(const QString& name) const;
    // Dock names in the order of the View menu.
    QStringList dockNames() const { return dockOrder_; }
    ObjectiveEditor* objectiveEditor() const { return objectiveEditor_; }
    LineupEditor* lineupEditor() const { return lineupEditor_; }
    FindingsPanel* findingsPanel() const { return findingsPanel_; }
    FindingsController* findingsController() const { return findingsController_; }
    SurveyController* surveys() const { return surveys_; }  // critical points and basins panels
    QAction* action(const QString& name) const;
    // Values of every variable the landscape holds fixed (the plotted two included, at the
    // selected iterate or start): the selected iterate, or the values typed in the editor.
    Vector heldVector() const;
    // Help texts (also shown from the Help menu).
    static QString formulaSyntaxText();
    QString shortcutsText() const;
    static QString aboutText();
    bool playing() const { return animation_.isActive(); }
    // Waits (processing events) until no job is in flight and the views are up to date.
    bool waitForIdle(int timeoutMs = 30000);

    // Resizes the window and lays the docks out in the default proportions for that size.
    void setInitialSize(const QSize& size);

    // Preferences (kept in QSettings, applied at once; see preferences.h).
    const Preferences& preferences() const { return preferences_; }
    void setPreferences(const Preferences& preferences);
    // Opens the preferences dialog without blocking (or raises the open one) and returns it.
    PreferencesDialog* showPreferences();

    // How the window asks a yes/no/cancel question (the unsaved-changes prompt). The default
    // shows a QMessageBox; tests put in a function that answers without a modal loop.
    using Question = std::function<QMessageBox::StandardButton(QWidget* parent, const QString& title,
                                                               const QString& text, QMessageBox::StandardButtons)>;
    void setQuestion(Question question);

    // Undo and redo of every edit of the study (study_edit.h). New and Open clear the stack;
    // Save marks its clean state, so undoing past a save makes the study modified again.
    QUndoStack* undoStack() const { return undo_; }

    // Recovery (recovery.h): while the study has unsaved edits, what is on screen is written
    // aside every autosaveInterval() ms (default 30 s) and on every run of the methods.
    void setAutosaveInterval(int milliseconds);
    int autosaveInterval() const;
    // This window's recovery file ("" until it first writes one) and writing it now (when
    // there is something unsaved; true when the file holds what is on screen).
    QString recoveryFile() const;
    bool writeRecovery();
    // Offers a study left by a window that did not close normally (a crash, a kill) through the
    // question hook: Yes restores it (modified, the title says recovered), No discards the
    // file. Files of windows that still run are never offered. True when one was restored.
    bool offerRecovery();
    bool isRecovered() const { return recovered_; }

public slots:
    void runAll();
    void stepAll();
    void setPlaying(bool on);
    void resetRuns();
    void cancelJobs();
    void setSelection(const sw::widgets::Selection& selection);
    void moveStart(const sw::Vector& start);
    void setViewBox(const sw::analyze::Box& box);
    // Edit ▸ Undo / Redo (an edit still being recorded is recorded first).
    void undo();
    void redo();

signals:
    // After each delivered batch of runs has reached the views.
    void runsShown();
    void fieldShown();
    void selectionChanged(const sw::widgets::Selection& selection);

protected:
    void closeEvent(QCloseEvent* event) override;
    // Ctrl+Z / Ctrl+Shift+Z (the platform's undo keys) in any field of this window undo the
    // study's last edit, not the field's private text history (which would record a new edit
    // and clear Redo).
    bool eventFilter(QObject* watched, QEvent* event) override;
    void changeEvent(QEvent* event) override;

private:
    // modified: a study restored from a recovery file or shown by undo is still unsaved.
    void presentStudy(bool modified = false);
    // The user changed the study: marks it modified and records an undo step (at once, or
    // after the current event when editors report one action in several signals).
    void studyEdited(bool mayMerge = false);
    void recordEdit();
    void showStudyText(const std::string& text, const QString& recordedBase);
    std::string onScreenText() const;
    void clearViews();
    void createViews();
    void createDocks();
    // Makes a dock for `content` (wrapped in a scroll area when it is an editor, so a short
    // panel scrolls instead of squeezing its controls over each other) and lists it in the View menu.
    QDockWidget* addViewDock(const QString& name, const QString& title, QWidget* content, const QString& tip,
                             bool scrolls = false);
    void placeDocks();
    void fitToScreen();
    void refreshIcons();
    void showHelpText(const QString& title, const QString& html);
    void createActions();
    void createMenus();
    void createToolBars();
    void createStatusBar();
    void readSettings();
    void writeSettings();
    void resetLayout();
    void applyPreferences(const Preferences& preferences, bool changeStudy);

    void openDialog();
    bool save();
    bool saveAsDialog();
    bool maybeSave();
    void exportViewDialog();
    void exportStepsDialog();
    void writeReportDialog();
    void about();
    void addRecentFile(const QString& path);
    void updateRecentMenu();
    void updateSamplesMenu();
    void setModified(bool modified);
    void showBuildProblem(const std::exception& problem);
    void updateTitle();

    void rebuildObjective();
    void onLineupEdited();
    void onHeldValuesEdited();
    void onPlotAxesChanged();
    void restart();
    RunRequest runRequest() const;
    void requestField();
    analyze::Box homeBox() const;
    void showRuns(std::shared_ptr<const RunBatch> batch);
    void showField(std::shared_ptr<const widgets::FieldSnapshot> field);
    void pushSnapshot(std::shared_ptr<const widgets::Snapshot> snapshot);
    void updateOtherViews();
    void updateHeldText();
    void onJobProgress(int kind, double fraction);
    void onJobStateChanged();
    void animationTick();
    widgets::PlotView* viewByName(const QString& name) const;

    Preferences preferences_;
    bool paletteApplied_ = false;
    Question question_;

    // Document.
    study::Study study_;
    QString studyPath_;
    QString baseDirectory_;  // the study file's folder; empty for a new study not yet saved
    QString copiedFrom_;     // the sample an untitled study was opened from
    bool modified_ = false;
    bool loading_ = false;
    bool recovered_ = false;  // restored from a recovery file and not saved since

    // Undo: the stack and the on-screen study's text as last recorded (each step's "before").
    QUndoStack* undo_ = nullptr;
    std::string shownText_;
    QTimer pendingEdit_;  // an edit reported but not recorded yet (one step per user action)
    bool pendingMayMerge_ = true;
    bool showingStep_ = false;  // undo or redo is showing a step; the stack's index moves next

    // Recovery.
    std::unique_ptr<RecoverySlot> recovery_;
    QTimer autosave_;
    QString writtenRecovery_;  // the last wrapper content written (nothing new: no write)

    // Results.
    std::shared_ptr<const Objective> objective_;
    std::shared_ptr<const widgets::Snapshot> snapshot_;
    std::shared_ptr<const widgets::FieldSnapshot> field_;
    widgets::Selection selection_;
    analyze::Box viewBox_;
    bool hasViewBox_ = false;
    QString summary_;
    quint64 shownRunGeneration_ = 0;

    JobRunner* jobs_ = nullptr;
    FitStatisticsPanel* fitStatistics_ = nullptr;  // the Fit dock; places itself (fit_statistics_panel.h)
    ReportWriter* reportWriter_ = nullptr;
    QTimer animation_;
    QTimer heldResample_;
    QTimer lazyViews_;  // views other than the landscape catch up when a drag pauses

    // Views and editors.
    widgets::LandscapeView* landscape_ = nullptr;
    widgets::LocalModelView* localModel_ = nullptr;
    widgets::CurvatureView* curvature_ = nullptr;
    widgets::ProgressView* progress_ = nullptr;
    widgets::SliceView* slice_ = nullptr;
    widgets::StepsTable* steps_ = nullptr;
    widgets::RunSummary* runSummary_ = nullptr;
    DerivativesPane* derivatives_ = nullptr;
    ObjectiveEditor* objectiveEditor_ = nullptr;
    LineupEditor* lineupEditor_ = nullptr;
    FindingsPanel* findingsPanel_ = nullptr;
    FindingsController* findingsController_ = nullptr;
    SurveyController* surveys_ = nullptr;
    std::map<QString, QDockWidget*> docks_;
    QStringList dockOrder_;
    QByteArray defaultLayout_;

    // Actions, menus, status.
    std::map<QString, QAction*> actions_;
    QMenu* recentMenu_ = nullptr;
    QMenu* samplesMenu_ = nullptr;
    QMenu* viewMenu_ = nullptr;
    QSpinBox* speed_ = nullptr;
    QLabel* statusSummary_ = nullptr;
    QProgressBar* statusProgress_ = nullptr;
    QToolButton* statusCancel_ = nullptr;
};

}  // namespace sw::window
