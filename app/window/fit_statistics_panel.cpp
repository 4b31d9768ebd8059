#include "app/window/fit_statistics_panel.h"

#include "app/cli/fit_report.h"
#include "app/window/main_window.h"
#include "widgets/fit_statistics_view.h"

#include <QAction>
#include <QDockWidget>
#include <QMenu>
#include <QMenuBar>
#include <algorithm>
#include <iterator>

namespace sw::window {

FitStatisticsPanel::FitStatisticsPanel(MainWindow* window, JobRunner* jobs)
    : QObject(window), window_(window), jobs_(jobs) {
    view_ = new widgets::FitStatisticsView(window);
    dock_ = new QDockWidget(tr("Fit"), window);
    dock_->setObjectName("fit-statistics");
    dock_->setWidget(view_);
    dock_->setToolTip(tr("The selected run's fit: estimates, standard errors, intervals, correlations and warnings"));
    dock_->toggleViewAction()->setToolTip(tr("Show or hide the %1 panel").arg(dock_->windowTitle()));

    // Beside the Steps table, and after it in the View menu.
    auto* steps = window->findChild<QDockWidget*>(QStringLiteral("steps"), Qt::FindDirectChildrenOnly);
    if (steps) {
        window->addDockWidget(window->dockWidgetArea(steps), dock_);
        window->tabifyDockWidget(steps, dock_);
        steps->raise();
        const QAction* stepsToggle = steps->toggleViewAction();
        for (QAction* top : window->menuBar()->actions()) {
            QMenu* menu = top->menu();
            if (!menu) continue;
            const QList<QAction*> items = menu->actions();
            const auto at = std::find(items.begin(), items.end(), stepsToggle);
            if (at == items.end()) continue;
            const auto next = std::next(at);
            menu->insertAction(next == items.end() ? nullptr : *next, dock_->toggleViewAction());
            break;
        }
    } else {
        window->addDockWidget(Qt::BottomDockWidgetArea, dock_);
    }

    stepped_.setSingleShot(true);
    stepped_.setInterval(150);
    connect(&stepped_, &QTimer::timeout, this, [this] {
        if (pendingRun_) request();
    });
    connect(window, &MainWindow::runsShown, this, &FitStatisticsPanel::update);
    connect(window, &MainWindow::selectionChanged, this, &FitStatisticsPanel::update);
    connect(dock_, &QDockWidget::visibilityChanged, this, [this](bool visible) {
        if (visible) update();
    });
    connect(jobs_, &JobRunner::fitStatisticsReady, this, &FitStatisticsPanel::deliver);
    connect(jobs_, &JobRunner::jobEnded, this, [this](int kind, bool cancelled) {
        // Cancelled (not superseded): nothing is on its way any more; the next update asks again.
        if (kind != JobRunner::Statistics || !cancelled || jobs_->busy(JobRunner::Statistics)) return;
        if (view_->busy()) {
            requestedRun_.reset();
            view_->setBusy(false);
        }
    });
    showMessage(tr("No runs yet."));
}

void FitStatisticsPanel::showMessage(const QString& message) {
    requestedRun_.reset();
    pendingRun_.reset();
    pendingObjective_.reset();
    stepped_.stop();
    if (view_->snapshot() || !view_->text().contains(message)) view_->showMessage(message);
    emit shown();
}

void FitStatisticsPanel::update() {
    const auto objective = window_->objective();
    const auto fitObjective = std::dynamic_pointer_cast<const FitObjective>(objective);
    if (objective != objective_) {
        objective_ = objective;
        // A study that fits a model opens with its statistics in front.
        if (fitObjective && !lastWasFit_) dock_->raise();
        lastWasFit_ = fitObjective != nullptr;
    }
    if (!objective) return;
    if (!fitObjective) {
        showMessage(tr("This study minimises a formula. For a study that fits a model to a table, the selected run's "
                       "estimates, standard errors, intervals, correlations and warnings show here."));
        return;
    }
    const auto snapshot = window_->snapshot();
    if (!snapshot || snapshot->objective != objective) return;  // the new objective's runs are on their way
    if (snapshot->tracks.empty()) {
        showMessage(tr("No method is enabled: enable one in the Methods panel to fit the model."));
        return;
    }
    const widgets::Selection selection = window_->selection();
    const int trackCount = static_cast<int>(snapshot->tracks.size());
    const int track = selection.valid() && selection.track < trackCount ? selection.track : 0;
    const widgets::RunTrack& chosen = snapshot->tracks[static_cast<std::size_t>(track)];
    if (!chosen.run) return;
    if (chosen.run == requestedRun_) return;  // shown, or on its way
    if (!dock_->isVisible()) return;          // computed when the panel is shown
    pendingObjective_ = fitObjective;
    pendingRun_ = chosen.run;
    requestedLabel_ = chosen.label;
    if (chosen.run->finished()) {
        stepped_.stop();
        request();
    } else if (!stepped_.isActive()) {
        stepped_.start();
    }
}

void FitStatisticsPanel::request() {
    const auto objective = pendingObjective_;
    if (!objective || !pendingRun_) return;
    FitStatisticsRequest r;
    r.objective = objective;
    r.run = pendingRun_;
    r.runLabel = requestedLabel_;
    r.equation = QString::fromStdString(cli::modelEquation(objective->definition()));
    r.lossText = QString::fromStdString(cli::lossInWords(objective->definition()));
    requestedRun_ = pendingRun_;
    pendingRun_.reset();
    pendingObjective_.reset();
    view_->setBusy(true);
    jobs_->computeFitStatistics(r);
}

void FitStatisticsPanel::deliver(std::shared_ptr<const widgets::FitSnapshot> statistics) {
    view_->setSnapshot(std::move(statistics));
    emit shown();
}

}  // namespace sw::window
