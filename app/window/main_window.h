#pragma once
// The workbench window: every view in a dock, one place for actions, a job runner for
// all computation, the study as the document (open, save, recent files, samples).

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
class QLabel;
class QMenu;
class QProgressBar;
class QSpinBox;
class QToolButton;

namespace sw::widgets {
class LandscapeView;
class LocalModelView;
class CurvatureView;
class ProgressView;
class SliceView;
class StepsTable;
class PlotView;
}  // namespace sw::widgets

namespace sw::window {

class ObjectiveEditor;
class LineupEditor;
class ReportWriter;

class MainWindow : public QMainWindow {
    Q_OBJECT
public:
    explicit MainWindow(QWidget* parent = nullptr);
    ~MainWindow() override;

    // Document. openStudy reports the first problem with its place in *error (no dialog).
    bool openStudy(const QString& path, QString* error = nullptr);
    bool saveStudy(const QString& path, QString* error = nullptr);
    void newStudy();
    const study::Study& study() const { return study_; }
    QString studyPath() const { return studyPath_; }
    bool isModified() const { return modified_; }
    // Sample study files found next to the sources or the installed program.
    static QStringList sampleFiles();

    // Exports. viewName is one of viewNames(); the format follows the file suffix.
    QStringList viewNames() const;
    bool exportView(const QString& viewName, const QString& path, int width, int height, QString* error = nullptr);
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
    widgets::LandscapeView* landscape() const { return landscape_; }
    widgets::LocalModelView* localModel() const { return localModel_; }
    widgets::CurvatureView* curvature() const { return curvature_; }
    widgets::ProgressView* progressView() const { return progress_; }
    widgets::SliceView* slice() const { return slice_; }
    widgets::StepsTable* steps() const { return steps_; }
    ObjectiveEditor* objectiveEditor() const { return objectiveEditor_; }
    LineupEditor* lineupEditor() const { return lineupEditor_; }
    QAction* action(const QString& name) const;
    bool playing() const { return animation_.isActive(); }
    // Waits (processing events) until no job is in flight and the views are up to date.
    bool waitForIdle(int timeoutMs = 30000);

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

public slots:
    void runAll();
    void stepAll();
    void setPlaying(bool on);
    void resetRuns();
    void cancelJobs();
    void setSelection(const sw::widgets::Selection& selection);
    void moveStart(const sw::Vector& start);
    void setViewBox(const sw::analyze::Box& box);

signals:
    // After each delivered batch of runs has reached the views.
    void runsShown();
    void fieldShown();

protected:
    void closeEvent(QCloseEvent* event) override;

private:
    void presentStudy();
    void createViews();
    void createDocks();
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
    void updateTitle();

    void rebuildObjective();
    void onLineupEdited();
    void onPlotAxesChanged();
    void restart();
    RunRequest runRequest() const;
    void requestField();
    Vector heldVector() const;
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
    QString baseDirectory_;
    bool modified_ = false;
    bool loading_ = false;

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
    ObjectiveEditor* objectiveEditor_ = nullptr;
    LineupEditor* lineupEditor_ = nullptr;
    std::map<QString, QDockWidget*> docks_;
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
