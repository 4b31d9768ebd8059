// Survey jobs of the JobRunner (issue 11): the critical-point map and basin maps, off the GUI
// thread, with progress and cancel; a newer request of the same kind supersedes an older one.
// The survey spreads its pieces over every core itself (core/survey's forEachIndex).
#include "app/window/job_runner.h"

#include <QElapsedTimer>

namespace sw::window {

void JobRunner::findCritical(const CriticalRequest& request) {
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Critical, generation);
    launch(Critical, [this, request, generation, cancelled] {
        QElapsedTimer clock;
        clock.start();
        survey::Control control;
        control.cancel = cancelled.get();
        double lastReport = -1;
        control.progress = [this, &lastReport](double fraction) {
            if (fraction - lastReport < 0.05 && fraction < 1) return;
            lastReport = fraction;
            QMetaObject::invokeMethod(this, [this, fraction] { emit progress(Critical, fraction); }, Qt::QueuedConnection);
        };
        std::shared_ptr<survey::CriticalMap> map;
        QString problem;
        try {
            map = std::make_shared<survey::CriticalMap>(
                survey::CriticalSearch(*request.objective, request.region, request.settings, control).find(control));
            map->seconds = clock.nsecsElapsed() * 1e-9;
        } catch (const std::exception& e) {
            problem = QString::fromUtf8(e.what());
        }
        const bool wasCancelled = cancelled->load() || (map && map->cancelled);
        std::shared_ptr<const survey::CriticalMap> result = map;
        auto objective = request.objective;
        finishOnGui(Critical, generation, wasCancelled, [this, result, objective, problem, wasCancelled] {
            if (!problem.isEmpty())
                emit surveyFailed(Critical, problem);
            else if (!wasCancelled)
                emit criticalReady(result, objective);
        });
    });
}

void JobRunner::mapBasins(const BasinRequest& request) {
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Basins, generation);
    launch(Basins, [this, request, generation, cancelled] {
        survey::Control control;
        control.cancel = cancelled.get();
        double lastReport = -1;
        control.progress = [this, &lastReport](double fraction) {
            if (fraction - lastReport < 0.02 && fraction < 1) return;
            lastReport = fraction;
            QMetaObject::invokeMethod(this, [this, fraction] { emit progress(Basins, fraction); }, Qt::QueuedConnection);
        };
        std::shared_ptr<survey::BasinSurvey> result;
        QString problem;
        try {
            result = std::make_shared<survey::BasinSurvey>(survey::mapBasins(
                *request.objective, request.region, request.methods, request.settings, request.critical, control));
        } catch (const std::exception& e) {
            problem = QString::fromUtf8(e.what());
        }
        const bool wasCancelled = cancelled->load() || (result && result->cancelled);
        std::shared_ptr<const survey::BasinSurvey> delivered = result;
        auto objective = request.objective;
        finishOnGui(Basins, generation, wasCancelled, [this, delivered, objective, problem, wasCancelled] {
            if (!problem.isEmpty())
                emit surveyFailed(Basins, problem);
            else if (!wasCancelled)
                emit basinsReady(delivered, objective);
        });
    });
}

}  // namespace sw::window
