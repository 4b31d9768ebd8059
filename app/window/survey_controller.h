#pragma once
// The window's surveys (issue 11): the critical-point map (markers on the landscape and a
// table, in the "Critical points" panel) and basin maps as small multiples (the "Basins"
// panel). Both run through the JobRunner (progress, cancel, newer requests supersede older
// ones) and stay up to date while they are switched on; switching one on stores its settings
// in the study ("surveys"), so a saved study reopens with it.
//
// The region is the study's: every variable's plot range is the box, the plotted pair is the
// plane, and the other variables are held at their start values.

#include "app/window/job_runner.h"
#include "core/study/study.h"

#include <QObject>
#include <QPointer>
#include <QTimer>
#include <memory>

class QCheckBox;
class QLabel;
class QListWidget;
class QPushButton;
class QSpinBox;
class QWidget;

namespace sw::widgets {
class BasinsView;
class CriticalOverlay;
class CriticalPointsTable;
class LandscapeView;
}  // namespace sw::widgets

namespace sw::window {

class SurveyController : public QObject {
    Q_OBJECT
public:
    SurveyController(JobRunner* jobs, widgets::LandscapeView* landscape, QWidget* parent);

    QWidget* criticalPanel() const { return criticalPanel_; }
    QWidget* basinsPanel() const { return basinsPanel_; }
    widgets::BasinsView* basinsView() const { return basinsView_; }
    widgets::CriticalPointsTable* criticalTable() const { return table_; }
    widgets::CriticalOverlay* overlay() const { return overlay_; }
    std::shared_ptr<const survey::CriticalMap> criticalMap() const { return map_; }
    std::shared_ptr<const survey::BasinSurvey> basins() const { return basins_; }

    // A study was opened or started: its saved surveys set the panels.
    void studyOpened(const study::Study& study);
    // The objective, the lineup or the plotted pair changed: surveys that are on follow.
    void studyChanged(const study::Study& study, std::shared_ptr<const Objective> objective);

    // For tests and the shell: switch a survey on or off (as the check boxes do).
    void setCriticalOn(bool on);
    void setBasinsOn(bool on);
    void setBasinMethods(const QStringList& labels);
    void setBasinGrid(int cells);
    // The start a run "from near" point k uses: along its lowest-curvature eigenvector (a
    // saddle's escape direction), 4 % of the plane's mean width, to the lower side.
    Vector startNear(int point) const;
    // True while an edit waits for its short delay before a basin job starts.
    bool pending() const { return basinDelay_.isActive(); }

signals:
    void startRequested(sw::Vector start);
    void surveysEdited(sw::study::SurveySettings settings);
    void criticalShown();
    void basinsShown();

private:
    QWidget* buildCriticalPanel(QWidget* parent);
    QWidget* buildBasinsPanel(QWidget* parent);
    void fillMethodList(const std::vector<std::string>* keep);
    study::SurveySettings settingsFromControls() const;
    void controlsEdited();
    void requestCritical();
    void requestBasins();
    survey::Region region() const;
    void showCritical(std::shared_ptr<const survey::CriticalMap> map, std::shared_ptr<const Objective> objective);
    void showBasins(std::shared_ptr<const survey::BasinSurvey> result, std::shared_ptr<const Objective> objective);
    void runFromPoint(int point);
    void updateCriticalSummary();

    JobRunner* jobs_ = nullptr;
    widgets::LandscapeView* landscape_ = nullptr;
    study::Study study_;
    std::shared_ptr<const Objective> objective_;
    std::shared_ptr<const survey::CriticalMap> map_;
    std::shared_ptr<const survey::BasinSurvey> basins_;
    QString criticalProblem_, basinsProblem_;
    bool loading_ = false;
    // What the shown results were computed for (a change triggers a new job).
    QString criticalInputs_, basinInputs_;
    QTimer basinDelay_;

    QWidget* criticalPanel_ = nullptr;
    QCheckBox* criticalOn_ = nullptr;
    QSpinBox* starts_ = nullptr;
    QSpinBox* signChangeGrid_ = nullptr;
    QPushButton* runFromHere_ = nullptr;
    QLabel* criticalSummary_ = nullptr;
    widgets::CriticalPointsTable* table_ = nullptr;
    widgets::CriticalOverlay* overlay_ = nullptr;

    QWidget* basinsPanel_ = nullptr;
    QCheckBox* basinsOn_ = nullptr;
    QSpinBox* grid_ = nullptr;
    QListWidget* methods_ = nullptr;
    QLabel* basinsSummary_ = nullptr;
    widgets::BasinsView* basinsView_ = nullptr;
};

}  // namespace sw::window
