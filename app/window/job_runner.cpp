#include "app/window/job_runner.h"

#include "core/fit/run_fit.h"

#include <QCoreApplication>
#include <QElapsedTimer>
#include <QThread>

namespace sw::window {

// Solvers of a step-by-step session. The objective is held here because solvers keep a
// reference to it. Only one step job touches a session at a time (stepBusy_).
struct JobRunner::StepSession {
    std::shared_ptr<const Objective> objective;
    Vector start;
    std::vector<RunEntry> entries;
    solve::StoppingRules rules;
    std::vector<std::unique_ptr<solve::Solver>> solvers;  // null where the input was rejected
    std::vector<std::shared_ptr<const solve::Run>> rejected;
    bool finished = false;
};

namespace {

std::shared_ptr<const solve::Run> rejectedRun(const RunEntry& entry, const std::string& why) {
    auto run = std::make_shared<solve::Run>();
    run->methodId = entry.methodId;
    run->label = entry.label;
    run->termination = solve::Termination::Failed;
    run->message = why;
    return run;
}

}  // namespace

JobRunner::JobRunner(QObject* parent) : QObject(parent) {
    qRegisterMetaType<std::shared_ptr<const RunBatch>>();
    qRegisterMetaType<std::shared_ptr<const widgets::FieldSnapshot>>();
    qRegisterMetaType<std::shared_ptr<const widgets::FitSnapshot>>();
    // Runs and fields may overlap; the field sampler spreads over every core itself.
    pool_.setMaxThreadCount(std::max(2, QThread::idealThreadCount()));
    for (auto& flag : cancel_) flag = std::make_shared<std::atomic<bool>>(false);
}

JobRunner::~JobRunner() {
    cancelAll();
    pool_.waitForDone();
}

JobRunner::CancelFlag JobRunner::startGeneration(Kind kind, quint64& generation) {
    cancel_[kind]->store(true);  // the older job of this kind stops at its next check
    cancel_[kind] = std::make_shared<std::atomic<bool>>(false);
    generation = ++generation_[kind];
    return cancel_[kind];
}

void JobRunner::launch(Kind kind, std::function<void()> work) {
    ++inFlight_[kind];
    emit jobStarted(kind);
    pool_.start(std::move(work));
}

void JobRunner::finishOnGui(Kind kind, quint64 generation, bool cancelled, std::function<void()> deliver) {
    QMetaObject::invokeMethod(
        this,
        [this, kind, generation, cancelled, deliver = std::move(deliver)] {
            --inFlight_[kind];
            const bool current = generation == generation_[kind];
            if (current && deliver) deliver();
            emit jobEnded(kind, cancelled || !current);
        },
        Qt::QueuedConnection);
}

void JobRunner::runAll(const RunRequest& request) {
    session_.reset();
    stepBusy_ = false;
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Runs, generation);
    launch(Runs, [this, request, generation, cancelled] {
        QElapsedTimer clock;
        clock.start();
        auto batch = std::make_shared<RunBatch>();
        batch->generation = generation;
        batch->objective = request.objective;
        batch->start = request.start;
        batch->entries = request.entries;
        batch->rules = request.rules;
        const double entryCount = std::max<std::size_t>(1, request.entries.size());
        double lastReport = -1;
        for (std::size_t i = 0; i < request.entries.size(); ++i) {
            const RunEntry& entry = request.entries[i];
            if (cancelled->load()) {
                batch->runs.push_back(rejectedRun(entry, "not run: the job was cancelled"));
                continue;
            }
            auto made = solve::makeSolver(entry.methodId, *request.objective, request.start, entry.options, request.rules);
            if (!made.solver) {
                batch->runs.push_back(rejectedRun(entry, made.error));
                continue;
            }
            const double maxIterations = std::max(1, request.rules.maxIterations);
            solve::Run run = solve::solve(std::move(made.solver), [&](const solve::Run& soFar) {
                if (cancelled->load()) return false;
                const double fraction = (static_cast<double>(i) + soFar.iterations() / maxIterations) / entryCount;
                if (fraction - lastReport >= 0.02) {
                    lastReport = fraction;
                    QMetaObject::invokeMethod(this, [this, fraction] { emit progress(Runs, fraction); },
                                              Qt::QueuedConnection);
                }
                return true;
            });
            run.label = entry.label;
            batch->runs.push_back(std::make_shared<const solve::Run>(std::move(run)));
        }
        batch->cancelled = cancelled->load();
        batch->allFinished = true;
        batch->seconds = clock.nsecsElapsed() * 1e-9;
        finishOnGui(Runs, generation, batch->cancelled, [this, batch] { emit runsReady(batch); });
    });
}

void JobRunner::beginSteps(const RunRequest& request) {
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Runs, generation);
    auto session = std::make_shared<StepSession>();
    session->objective = request.objective;
    session->start = request.start;
    session->entries = request.entries;
    session->rules = request.rules;
    session_ = session;
    stepBusy_ = true;
    launch(Runs, [this, request, generation, cancelled, session] {
        auto batch = std::make_shared<RunBatch>();
        batch->generation = generation;
        batch->objective = request.objective;
        batch->start = request.start;
        batch->entries = request.entries;
        batch->rules = request.rules;
        batch->stepping = true;
        bool allFinished = true;
        for (const RunEntry& entry : request.entries) {
            auto made = solve::makeSolver(entry.methodId, *request.objective, request.start, entry.options, request.rules);
            if (made.solver) {
                made.solver->begin();
                allFinished = allFinished && made.solver->finished();
                session->rejected.push_back(nullptr);
            } else {
                session->rejected.push_back(rejectedRun(entry, made.error));
            }
            session->solvers.push_back(std::move(made.solver));
        }
        for (std::size_t i = 0; i < session->solvers.size(); ++i) {
            if (session->solvers[i]) {
                auto run = std::make_shared<solve::Run>(session->solvers[i]->run());
                run->label = request.entries[i].label;
                batch->runs.push_back(run);
            } else {
                batch->runs.push_back(session->rejected[i]);
            }
        }
        session->finished = allFinished;
        batch->allFinished = allFinished;
        batch->cancelled = cancelled->load();
        finishOnGui(Runs, generation, batch->cancelled, [this, batch, session] {
            if (session_ == session) stepBusy_ = false;
            emit runsReady(batch);
        });
    });
}

bool JobRunner::stepAll() {
    auto session = session_;
    if (!session || stepBusy_ || session->finished) return false;
    stepBusy_ = true;
    const quint64 generation = generation_[Runs];  // a step continues the session's generation
    CancelFlag cancelled = cancel_[Runs];
    launch(Runs, [this, session, generation, cancelled] {
        auto batch = std::make_shared<RunBatch>();
        batch->generation = generation;
        batch->objective = session->objective;
        batch->start = session->start;
        batch->entries = session->entries;
        batch->rules = session->rules;
        batch->stepping = true;
        bool allFinished = true;
        for (std::size_t i = 0; i < session->solvers.size(); ++i) {
            auto& solver = session->solvers[i];
            if (!solver) {
                batch->runs.push_back(session->rejected[i]);
                continue;
            }
            if (!cancelled->load() && !solver->finished()) solver->step();
            allFinished = allFinished && solver->finished();
            auto run = std::make_shared<solve::Run>(solver->run());
            run->label = session->entries[i].label;
            batch->runs.push_back(run);
        }
        session->finished = allFinished;
        batch->allFinished = allFinished;
        batch->cancelled = cancelled->load();
        finishOnGui(Runs, generation, batch->cancelled, [this, batch, session] {
            if (session_ == session) stepBusy_ = false;
            emit runsReady(batch);
        });
    });
    return true;
}

bool JobRunner::hasStepSession() const { return session_ != nullptr; }
bool JobRunner::stepSessionFinished() const { return session_ && session_->finished && !stepBusy_; }

void JobRunner::endStepSession() {
    session_.reset();
    stepBusy_ = false;
}

void JobRunner::sampleField(const FieldRequest& request) {
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Field, generation);
    launch(Field, [this, request, generation, cancelled] {
        auto snapshot = std::make_shared<widgets::FieldSnapshot>();
        snapshot->logColour = request.logColour;
        analyze::Control control;
        control.cancel = cancelled.get();
        double lastReport = -1;
        control.progress = [this, &lastReport](double fraction) {
            if (fraction - lastReport < 0.05 && fraction < 1) return;
            lastReport = fraction;
            QMetaObject::invokeMethod(this, [this, fraction] { emit progress(Field, fraction); }, Qt::QueuedConnection);
        };
        const bool complete = analyze::sampleField(*request.objective, request.held, request.xVariable,
                                                   request.yVariable, request.box, request.nx, request.ny,
                                                   snapshot->field, control);
        if (complete && !cancelled->load()) {
            const auto levels = analyze::chooseLevels(snapshot->field, request.contourCount);
            snapshot->contours = analyze::contourLines(snapshot->field, levels);
        }
        const bool wasCancelled = !complete || cancelled->load();
        std::shared_ptr<const widgets::FieldSnapshot> result = snapshot;
        finishOnGui(Field, generation, wasCancelled, [this, result, generation, wasCancelled] {
            if (!wasCancelled) emit fieldReady(result, generation);
        });
    });
}

void JobRunner::computeFitStatistics(const FitStatisticsRequest& request) {
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Statistics, generation);
    launch(Statistics, [this, request, generation, cancelled] {
        if (cancelled->load()) {  // superseded while it waited for a thread
            finishOnGui(Statistics, generation, true, {});
            return;
        }
        QElapsedTimer clock;
        clock.start();
        auto snapshot = std::make_shared<widgets::FitSnapshot>();
        const solve::Run& run = *request.run;
        snapshot->runLabel = request.runLabel;
        snapshot->methodId = run.methodId;
        snapshot->termination = run.termination;
        snapshot->terminationMessage = run.message;
        snapshot->iteration = run.iterations();
        snapshot->finished = run.finished();
        snapshot->definition = request.objective->definition();
        snapshot->equation = request.equation;
        snapshot->lossText = request.lossText;
        // A finished run's x is its end point; a stepped run's is its latest record.
        const Vector x = run.finished() || run.trace.empty() ? run.x : run.trace.back().x;
        if (x.size() != request.objective->dimension()) {
            snapshot->problem = run.message.empty() ? QStringLiteral("the run has no iterate")
                                                    : QString::fromStdString(run.message);
        } else {
            try {
                snapshot->statistics = fit::computeStatistics(*request.objective, x, request.confidenceLevel);
                snapshot->warnings = fit::fitWarnings(run, snapshot->statistics);
            } catch (const std::exception& e) {
                snapshot->problem = QString::fromUtf8(e.what());
            }
        }
        snapshot->seconds = clock.nsecsElapsed() * 1e-9;
        const bool wasCancelled = cancelled->load();
        std::shared_ptr<const widgets::FitSnapshot> result = snapshot;
        finishOnGui(Statistics, generation, wasCancelled, [this, result, wasCancelled] {
            if (!wasCancelled) emit fitStatisticsReady(result);
        });
    });
}

void JobRunner::runTask(TaskWork work, std::function<void()> done) {
    quint64 generation = 0;
    CancelFlag cancelled = startGeneration(Task, generation);
    launch(Task, [this, work = std::move(work), done = std::move(done), generation, cancelled] {
        double lastReport = -1;
        const std::function<void(double)> progress = [this, &lastReport](double fraction) {
            if (fraction - lastReport < 0.02 && fraction < 1) return;
            lastReport = fraction;
            QMetaObject::invokeMethod(this, [this, fraction] { emit this->progress(Task, fraction); }, Qt::QueuedConnection);
        };
        work(*cancelled, progress);
        const bool wasCancelled = cancelled->load();
        finishOnGui(Task, generation, wasCancelled, [done, wasCancelled] {
            if (!wasCancelled && done) done();
        });
    });
}

void JobRunner::cancel(Kind kind) {
    cancel_[kind]->store(true);
    if (kind == Runs) {
        session_.reset();
        stepBusy_ = false;
    }
}

void JobRunner::cancelAll() {
    for (int k = 0; k < KindCount; ++k) cancel(static_cast<Kind>(k));
}

bool JobRunner::waitForIdle(int timeoutMs) {
    QElapsedTimer clock;
    clock.start();
    while (anyBusy()) {
        if (clock.elapsed() > timeoutMs) return false;
        QCoreApplication::processEvents(QEventLoop::AllEvents, 5);
        if (anyBusy()) QThread::usleep(200);
    }
    return true;
}

}  // namespace sw::window
