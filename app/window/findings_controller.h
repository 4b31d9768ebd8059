#pragma once
// Connects the findings panel to the window: asks the job runner for the findings of every
// delivered batch of runs (after a run, each animation step, each drag), shows them in the
// panel, flags the lineup entries whose run has a problem, and when a finding is activated
// selects its iteration in every view and marks its evidence on the landscape. Everything
// heavy (the rules and the remedies' reruns) runs in the job runner, off the GUI thread.

#include "app/window/job_runner.h"

#include <QObject>
#include <QString>
#include <map>
#include <memory>

class QListWidget;

namespace sw::widgets {
class EvidenceOverlay;
}

namespace sw::window {

class FindingsPanel;
class MainWindow;
class FindingFlagDelegate;

class FindingsController : public QObject {
    Q_OBJECT
public:
    FindingsController(MainWindow* window, FindingsPanel* panel);

    std::shared_ptr<const FindingsBatch> findings() const { return findings_; }
    widgets::EvidenceOverlay* overlay() const { return overlay_; }
    // The lineup label -> problem titles shown as flags in the method list.
    const std::map<QString, QStringList>& flags() const;

private:
    void onRuns(std::shared_ptr<const RunBatch> batch);
    void onFindings(std::shared_ptr<const FindingsBatch> batch);
    void onActivated(int track, int index);
    void showEvidence(int track, const diagnose::Finding& finding);

    MainWindow* window_;
    FindingsPanel* panel_;
    widgets::EvidenceOverlay* overlay_ = nullptr;
    FindingFlagDelegate* flagDelegate_ = nullptr;
    std::shared_ptr<const RunBatch> runs_;
    std::shared_ptr<const FindingsBatch> findings_;
    QString screenshotFinding_;
};

}  // namespace sw::window
