#pragma once
// The findings panel: what Saddlewise concludes about each run, with the numbers behind it and
// the remedies it tried. Runs are groups (in the track's colour) holding their findings,
// problems first; a finding's detail (evidence, remedy, what the rerun did) shows below the
// list (beside it when the panel is wide). Activating a finding asks the window to select its iteration and mark its evidence.
// The panel only shows findings; FindingsController feeds it.

#include "app/window/findings_job.h"
#include "widgets/snapshot.h"

#include <QWidget>
#include <memory>
#include <vector>

class QCheckBox;
class QComboBox;
class QLabel;
class QSplitter;
class QTextBrowser;
class QTreeWidget;
class QTreeWidgetItem;

namespace sw::window {

class FindingsPanel : public QWidget {
    Q_OBJECT
public:
    struct Track {
        QString label;
        QColor colour;
        widgets::Marker marker = widgets::Marker::Circle;
    };

    explicit FindingsPanel(QWidget* parent = nullptr);

    // New findings (and the tracks they belong to, in the same order). pending: the remedies'
    // reruns are still going.
    void setFindings(std::shared_ptr<const FindingsBatch> batch, std::vector<Track> tracks,
                     std::vector<std::string> variableNames, bool pending);
    // Runs changed and their findings are being worked out.
    void setUpdating();
    void setSelectedTrack(int track);
    // Selects a finding as a click would (emits findingActivated). False when there is none.
    bool activate(int track, diagnose::FindingId id);
    // The finding shown in the detail pane, or nullptr; *track receives its track.
    const diagnose::Finding* currentFinding(int* track = nullptr) const;

    // For tests and screenshots.
    QTreeWidget* tree() const { return tree_; }
    QTextBrowser* detail() const { return detail_; }
    QLabel* summary() const { return summary_; }
    int shownFindingCount() const;

signals:
    void findingActivated(int track, int index);

protected:
    void changeEvent(QEvent* event) override;
    // A wide, low panel (docked under the landscape) shows the list and the detail side by
    // side; a tall one stacks them.
    void resizeEvent(QResizeEvent* event) override;

private:
    void rebuild();
    void showDetail(int track, int index);
    void onCurrentItemChanged(QTreeWidgetItem* current);
    QString detailHtml(int track, int index) const;

    std::shared_ptr<const FindingsBatch> batch_;
    std::vector<Track> tracks_;
    std::vector<std::string> names_;
    bool pending_ = false;
    int selectedTrack_ = -1;
    int currentTrack_ = -1;
    diagnose::FindingId currentId_ = diagnose::FindingId::ConvergenceRate;
    bool hasCurrent_ = false;
    bool rebuilding_ = false;

    QLabel* summary_ = nullptr;
    QComboBox* scope_ = nullptr;
    QCheckBox* notes_ = nullptr;
    QTreeWidget* tree_ = nullptr;
    QTextBrowser* detail_ = nullptr;
    QSplitter* splitter_ = nullptr;
};

}  // namespace sw::window
