#pragma once
// The one place where the window's computation runs off the GUI thread.
//
// Inputs are copied into each job; results come back as immutable snapshots
// (std::shared_ptr<const ...>) through queued signals on the GUI thread. Every job kind has
// a generation counter: a newer request of the same kind cancels the older one and the
// older result is dropped, so dragging the start or zooming never queues stale work.
// Each job reports progress and can be cancelled; the window never waits on a job.

#include "app/window/findings_job.h"
#include "core/analyze/analyze.h"
#include "core/solve/solver.h"
#include "widgets/fit_snapshot.h"
#include "core/survey/survey.h"
#include "widgets/snapshot.h"

#include <QObject>
#include <QThreadPool>
#include <array>
#include <functional>
#include <atomic>
#include <memory>
#include <mutex>
#include <string>
#include <vector>

namespace sw::window {

// One lineup entry as a job sees it.
struct RunEntry {
    std::string label;
    std::string methodId;
    solve::OptionValues options;
    // How the entry is drawn; carried through so results and looks always match.
    QColor colour;
    widgets::Marker marker = widgets::Marker::Circle;
    bool usesTrustRegion = false;
};

struct RunRequest {
    std::shared_ptr<const Objective> objective;
    Vector start;
    std::vector<RunEntry> entries;
    solve::StoppingRules rules;
};

// The runs of one request, in the order of its entries (a run whose input was rejected
// is a finished run with termination Failed and the reason as its message).
struct RunBatch {
    quint64 generation = 0;
    std::shared_ptr<const Objective> objective;
    Vector start;
    std::vector<RunEntry> entries;
    std::vector<std::shared_ptr<const solve::Run>> runs;
    solve::StoppingRules rules;  // the rules the runs had (the findings' reruns use them too)
    bool stepping = false;   // produced by single steps (runs may still be going)
    bool allFinished = false;
    bool cancelled = false;
    double seconds = 0;      // wall time of the job
};

struct FieldRequest {
    std::shared_ptr<const Objective> objective;
    Vector held;             // full n-vector; the plotted two are overwritten per cell
    int xVariable = 0, yVariable = 1;
    analyze::Box box;
    int nx = 200, ny = 200;
    int contourCount = 14;
    bool logColour = false;
};

// The statistics of one run of a data fit (the fit view's job; widgets/fit_snapshot.h). The
// run's end point (its current iterate while it is stepped) is where they are computed.
struct FitStatisticsRequest {
    std::shared_ptr<const FitObjective> objective;
    std::shared_ptr<const solve::Run> run;
    QString runLabel;
    QString equation, lossText;  // the fit in words, as the command line's report writes them
    double confidenceLevel = 0.95;
};
// Surveys (issue 11; job_runner_survey.cpp): the critical-point map, and basin maps (which
// compute their own map first). The region is the study's box, plane and held start.
struct CriticalRequest {
    std::shared_ptr<const Objective> objective;
    survey::Region region;
    survey::CriticalSettings settings;
};
struct BasinRequest {
    std::shared_ptr<const Objective> objective;
    survey::Region region;
    survey::CriticalSettings critical;
    std::vector<survey::BasinMethod> methods;
    survey::BasinSettings settings;
};

class JobRunner : public QObject {
    Q_OBJECT
public:
    enum Kind { Runs = 0, Field = 1, Statistics = 2, Findings = 3, Critical = 4, Basins = 5, Task = 6, KindCount = 7 };

    explicit JobRunner(QObject* parent = nullptr);
    ~JobRunner() override;

    // Solves every entry to the end (supersedes any earlier run or step job).
    void runAll(const RunRequest& request);
    // Starts a step-by-step session: every solver begins (its start record only).
    void beginSteps(const RunRequest& request);
    // One more step for every unfinished solver of the session. Returns false (and does
    // nothing) when there is no session, it is finished, or the previous step is still busy.
    bool stepAll();
    bool hasStepSession() const;
    bool stepSessionFinished() const;
    void endStepSession();

    void sampleField(const FieldRequest& request);
    // One call into core/fit, which cannot be interrupted: a superseded or cancelled request
    // that has not started is skipped, one that has started finishes and is dropped.
    void computeFitStatistics(const FitStatisticsRequest& request);

    // Findings of a batch's runs, then the remedies' reruns (findings_job.cpp); a newer request
    // supersedes an older one. findingsReady comes once without and once with the outcomes.
    void diagnose(const DiagnosisRequest& request);

    // A bad request (region, settings, methods) is reported through surveyFailed, not thrown.
    void findCritical(const CriticalRequest& request);
    void mapBasins(const BasinRequest& request);

    // Any other long computation (the review report): `work` runs on the pool with the job's
    // cancel flag and a progress callback (0..1, any thread); `done` runs on the GUI thread
    // afterwards unless the task was cancelled or a newer task superseded it.
    using TaskWork = std::function<void(const std::atomic<bool>& cancelled, const std::function<void(double)>& progress)>;
    void runTask(TaskWork work, std::function<void()> done);

    void cancel(Kind kind);
    void cancelAll();
    bool busy(Kind kind) const { return inFlight_[kind] > 0; }
    bool anyBusy() const {
        for (int k = 0; k < KindCount; ++k)
            if (busy(static_cast<Kind>(k))) return true;
        return false;
    }
    quint64 generation(Kind kind) const { return generation_[kind]; }
    // For tests and benchmarks: processes events until no job is in flight or timeoutMs passed.
    bool waitForIdle(int timeoutMs);

signals:
    void runsReady(std::shared_ptr<const sw::window::RunBatch> batch);
    void fieldReady(std::shared_ptr<const sw::widgets::FieldSnapshot> field, quint64 generation);
    void fitStatisticsReady(std::shared_ptr<const sw::widgets::FitSnapshot> statistics);
    void findingsReady(std::shared_ptr<const sw::window::FindingsBatch> batch);
    void criticalReady(std::shared_ptr<const sw::survey::CriticalMap> map, std::shared_ptr<const sw::Objective> objective);
    void basinsReady(std::shared_ptr<const sw::survey::BasinSurvey> survey, std::shared_ptr<const sw::Objective> objective);
    // kind is Critical or Basins; the sentence says what was wrong with the request.
    void surveyFailed(int kind, QString problem);
    void progress(int kind, double fraction);
    void jobStarted(int kind);
    // After a result was delivered, dropped as stale, or the job was cancelled.
    void jobEnded(int kind, bool cancelled);

private:
    struct StepSession;
    using CancelFlag = std::shared_ptr<std::atomic<bool>>;
    CancelFlag startGeneration(Kind kind, quint64& generation);
    void launch(Kind kind, std::function<void()> work);
    void finishOnGui(Kind kind, quint64 generation, bool cancelled, std::function<void()> deliver);

    QThreadPool pool_;
    std::array<quint64, KindCount> generation_{};
    std::array<int, KindCount> inFlight_{};
    std::array<CancelFlag, KindCount> cancel_{};
    std::shared_ptr<StepSession> session_;
    bool stepBusy_ = false;
};

}  // namespace sw::window

Q_DECLARE_METATYPE(std::shared_ptr<const sw::window::RunBatch>)
Q_DECLARE_METATYPE(std::shared_ptr<const sw::widgets::FieldSnapshot>)
Q_DECLARE_METATYPE(std::shared_ptr<const sw::widgets::FitSnapshot>)
Q_DECLARE_METATYPE(std::shared_ptr<const sw::window::FindingsBatch>)
Q_DECLARE_METATYPE(std::shared_ptr<const sw::survey::CriticalMap>)
Q_DECLARE_METATYPE(std::shared_ptr<const sw::survey::BasinSurvey>)
