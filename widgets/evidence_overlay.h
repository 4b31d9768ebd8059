#pragma once
// Marks a finding's evidence on the landscape: a ring at the point the finding is about, an
// arrow for each direction it names (both ways for an escape direction at a saddle, where f
// falls either way; one way for a drift or an uphill step), and, when its remedy was tried, the
// rerun's path dashed in the track's colour. Arrows keep a fixed length on screen whatever the
// zoom (a direction is a line through the point in the variables' own units; its drawn length is
// only a hint). The overlay adds its own items and curves to the plot and never touches the
// landscape's own.

#include "core/solve/record.h"

#include <QColor>
#include <QObject>
#include <QPointer>
#include <QString>
#include <memory>
#include <vector>

class QCPCurve;
class QCPItemLine;
class QCPItemText;

namespace sw::widgets {

class LandscapeView;

class EvidenceOverlay : public QObject {
    Q_OBJECT
public:
    struct Content {
        Vector point;                       // full n-vector
        std::vector<Vector> directions;     // full n-vectors
        bool bothWays = false;              // arrows point both ways
        QString label;                      // drawn beside the first arrow, e.g. "escape"
        QColor colour;                      // the track's colour
        std::shared_ptr<const solve::Run> remedyRun;  // its x in the original variables
        QString remedyLabel;                // legend entry for the rerun's path, e.g. "rerun: switch to bfgs"
        int plotX = 0, plotY = 1;
    };

    explicit EvidenceOverlay(LandscapeView* landscape);
    ~EvidenceOverlay() override;

    void show(const Content& content);
    void clear();
    bool isShown() const { return shown_; }
    // For tests: what is drawn.
    int arrowCount() const;
    QPointF markedPoint() const;             // in plot coordinates (NaN when nothing shown)
    int remedyPathPoints() const;

private:
    void layoutArrows();
    void restyle();

    QPointer<LandscapeView> landscape_;
    Content content_;
    bool shown_ = false;
    QCPCurve* ring_ = nullptr;
    QCPCurve* remedyPath_ = nullptr;
    std::vector<QCPItemLine*> arrows_;
    QCPItemText* label_ = nullptr;
};

}  // namespace sw::widgets
