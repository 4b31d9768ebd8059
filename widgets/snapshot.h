#pragma once
// What the views draw: immutable snapshots handed over by the window. Views never run a
// solver or sample a field themselves.

#include "core/analyze/analyze.h"
#include "core/objective/objective.h"
#include "core/solve/record.h"

#include <QColor>
#include <QString>
#include <memory>
#include <vector>

namespace sw::widgets {

enum class Marker { Circle, Square, Triangle, Diamond, Cross, Plus, Star };

// One lineup entry's run, as drawn.
struct RunTrack {
    QString label;
    QColor colour;
    Marker marker = Marker::Circle;
    std::shared_ptr<const solve::Run> run;
    bool usesTrustRegion = false;
};

// Everything the plot views share.
struct Snapshot {
    std::shared_ptr<const Objective> objective;
    std::vector<QString> variableNames;
    int plotX = 0, plotY = 1;     // the two plotted variables
    Vector held;                  // values of the other variables (full n-vector)
    std::vector<RunTrack> tracks;
};

// The landscape's sampled field with its contour lines (from core/analyze).
struct FieldSnapshot {
    analyze::Field field;
    std::vector<analyze::ContourSet> contours;
    bool logColour = false;
};

// The selected iterate: which track, which record. track < 0 means none.
struct Selection {
    int track = -1;
    int iteration = -1;
    bool valid() const { return track >= 0 && iteration >= 0; }
    bool operator==(const Selection&) const = default;
};

}  // namespace sw::widgets
