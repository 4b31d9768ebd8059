#pragma once
// The window's "Fit" panel: keeps the fit view (widgets/fit_statistics_view.h) on the
// statistics of the selected run of a data-fit study.
//
// It owns its dock and places itself (tabbed with the Steps table, listed in the View menu),
// so the main window only creates it. It follows the window: after every batch of runs
// (MainWindow::runsShown) and every change of selection (MainWindow::selectionChanged) it
// asks the job runner for the statistics of the selected run, unless they are already shown
// or on their way. Statistics are computed only while the panel is visible; a stepped run that
// has not finished is recomputed at most every 150 ms. A formula study shows a sentence instead.

#include "app/window/job_runner.h"

#include <QObject>
#include <QTimer>
#include <memory>

class QDockWidget;

namespace sw::widgets {
class FitStatisticsView;
}

namespace sw::window {

class MainWindow;

class FitStatisticsPanel : public QObject {
    Q_OBJECT
public:
    FitStatisticsPanel(MainWindow* window, JobRunner* jobs);

    widgets::FitStatisticsView* view() const { return view_; }
    QDockWidget* dock() const { return dock_; }
    // The run whose statistics are shown (or on their way); null for none.
    std::shared_ptr<const solve::Run> shownRun() const { return requestedRun_; }

signals:
    // After statistics (or a sentence in their place) reached the view.
    void shown();

private:
    void update();
    void request();
    void deliver(std::shared_ptr<const widgets::FitSnapshot> statistics);
    void showMessage(const QString& message);

    MainWindow* window_;
    JobRunner* jobs_;
    widgets::FitStatisticsView* view_ = nullptr;
    QDockWidget* dock_ = nullptr;
    QTimer stepped_;  // spaces out requests for a run that is being stepped

    std::shared_ptr<const Objective> objective_;     // of the last update
    std::shared_ptr<const solve::Run> requestedRun_;  // shown, or requested
    QString requestedLabel_;
    std::shared_ptr<const FitObjective> pendingObjective_;  // the objective pendingRun_ ran on
    std::shared_ptr<const solve::Run> pendingRun_;          // waiting for the timer
    bool lastWasFit_ = false;
};

}  // namespace sw::window
