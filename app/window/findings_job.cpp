// JobRunner::diagnose: the findings job (declared in job_runner.h, kept here beside its request
// and result types). The rules run first and their findings are delivered at once; the remedies'
// reruns follow in the same pool thread and arrive as a second delivery. A newer request cancels
// the reruns of an older one.
#include "app/window/job_runner.h"

#include <QMetaObject>

namespace sw::window {

void JobRunner::diagnose(const DiagnosisRequest& request) {
    static const int registered = qRegisterMetaType<std::shared_ptr<const FindingsBatch>>();
    (void)registered;
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Findings, generation);
    launch(Findings, [this, request, generation, cancelled] {
        const std::size_t count = std::min({request.runs.size(), request.methodIds.size(), request.options.size()});
        auto batch = std::make_shared<FindingsBatch>();
        batch->runsGeneration = request.runsGeneration;
        batch->objective = request.objective;
        batch->runs = request.runs;
        std::vector<diagnose::RunSetup> setups;
        for (std::size_t i = 0; i < count; ++i) {
            setups.push_back({request.methodIds[i], request.options[i], request.rules, request.start});
            if (request.runs[i] && request.objective)
                batch->findings.push_back(diagnose::findFindings(*request.runs[i], *request.objective, setups.back()));
            else
                batch->findings.emplace_back();
        }
        bool anyRemedy = false;
        for (std::size_t i = 0; i < count; ++i)
            for (const diagnose::Finding& f : batch->findings[i])
                anyRemedy = anyRemedy || (f.remedy && request.runs[i] && request.runs[i]->finished());
        const bool rerun = request.tryRemedies && anyRemedy;
        batch->remediesDone = !rerun;
        if (rerun && !cancelled->load()) {
            // The rules' findings now; the outcomes follow.
            std::shared_ptr<const FindingsBatch> early = std::make_shared<FindingsBatch>(*batch);
            QMetaObject::invokeMethod(
                this,
                [this, early, generation] {
                    if (generation == generation_[Findings]) emit findingsReady(early);
                },
                Qt::QueuedConnection);
            for (std::size_t i = 0; i < count && !cancelled->load(); ++i) {
                if (!request.runs[i] || !request.runs[i]->finished()) continue;
                diagnose::tryRemedies(batch->findings[i], *request.runs[i], *request.objective, setups[i],
                                      cancelled.get());
                const double fraction = static_cast<double>(i + 1) / static_cast<double>(count);
                QMetaObject::invokeMethod(this, [this, fraction] { emit progress(Findings, fraction); },
                                          Qt::QueuedConnection);
            }
            batch->remediesDone = !cancelled->load();
        }
        const bool wasCancelled = cancelled->load();
        std::shared_ptr<const FindingsBatch> result = batch;
        finishOnGui(Findings, generation, wasCancelled, [this, result, wasCancelled] {
            if (!wasCancelled) emit findingsReady(result);
        });
    });
}

}  // namespace sw::window
