#include "widgets/landscape_view.h"

#include <QCheckBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QMouseEvent>
#include <QToolButton>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>
#include <set>

namespace sw::widgets {

namespace {
constexpr double kPickRadiusPixels = 8.0;
constexpr double kStartGrabPixels = 11.0;
constexpr double kClickSlopPixels = 4.0;

// QCPColorMapData has no bulk setter: setCell per cell (with its bounds checks) and the
// constructor's fill(0) cost more than the whole colour mapping. These member pointers,
// formed through a derived class as the language allows for protected members, let us
// write the cell array in one pass and mark it modified, as setCell would.
struct ColourMapDataAccess : QCPColorMapData {
    static double* QCPColorMapData::*cells() { return &ColourMapDataAccess::mData; }
    static bool QCPColorMapData::*modified() { return &ColourMapDataAccess::mDataModified; }
};

QString vectorText(const Vector& v) {
    QStringList parts;
    for (Eigen::Index i = 0; i < v.size(); ++i) parts << formatNumber(v[i]);
    return parts.join(QStringLiteral(", "));
}
}  // namespace

LandscapeView::LandscapeView(QWidget* parent) : PlotView(parent) {
    setObjectName(QStringLiteral("landscapeView"));
    plot_->setInteractions(QCP::iRangeDrag | QCP::iRangeZoom);
    plot_->axisRect()->setRangeZoomFactor(0.85);
    plot_->addLayer(QStringLiteral("field"), plot_->layer(QStringLiteral("grid")), QCustomPlot::limAbove);
    plot_->addLayer(QStringLiteral("contours"), plot_->layer(QStringLiteral("field")), QCustomPlot::limAbove);
    plot_->addLayer(QStringLiteral("marks"), plot_->layer(QStringLiteral("main")), QCustomPlot::limAbove);

    colourMap_ = new QCPColorMap(plot_->xAxis, plot_->yAxis);
    colourMap_->setLayer(QStringLiteral("field"));
    colourMap_->setGradient(fieldGradient());
    colourMap_->setInterpolate(true);
    // Smoothing between cells only helps when a cell covers more than a pixel or two; at
    // 600 x 600 cells it would cost a bilinear pass over the whole image on every repaint.
    connect(plot_, &QCustomPlot::beforeReplot, this, [this] {
        const QCPColorMapData* data = colourMap_->data();
        const QRect area = plot_->axisRect()->rect();
        colourMap_->setInterpolate(data->keySize() * 3 < area.width() * 2 || data->valueSize() * 3 < area.height() * 2);
    });
    colourMap_->setTightBoundary(false);
    colourMap_->removeFromLegend();
    colourMap_->setVisible(false);

    colourScale_ = new QCPColorScale(plot_);
    connect(plot_, &QCustomPlot::afterLayout, this, &LandscapeView::fitScaleLabel);
    colourScale_->setType(QCPAxis::atRight);
    colourScale_->setBarWidth(12);
    colourScale_->setRangeDrag(false);
    colourScale_->setRangeZoom(false);
    // The plot and its colour scale share the top row; the legend has the whole width under
    // them (so its width never depends on the colour scale's, which is unknown before the
    // first layout and left the legend cut short after a relaunch).
    QCPAxisRect* rect = plot_->axisRect();
    plot_->plotLayout()->take(rect);
    plot_->plotLayout()->simplify();
    auto* top = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(0, 0, top);
    top->addElement(0, 0, rect);
    top->addElement(0, 1, colourScale_);
    colourMap_->setColorScale(colourScale_);
    colourScale_->setGradient(fieldGradient());  // the scale pushes its gradient onto the map
    marginGroup_ = new QCPMarginGroup(plot_);
    plot_->axisRect()->setMarginGroup(QCP::msBottom | QCP::msTop, marginGroup_);
    colourScale_->setMarginGroup(QCP::msBottom | QCP::msTop, marginGroup_);

    // The legend sits in its own row under the plot so it never hides a path.
    auto* legendRow = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(1, 0, legendRow);
    legendRow->setMargins(QMargins(4, 0, 4, 4));
    legendRow->addElement(0, 0, plot_->legend);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setWrap(3);
    plot_->legend->setVisible(true);
    enableLegendReflow(3);
    plot_->plotLayout()->setRowStretchFactor(1, 0.001);

    startCurve_ = new QCPCurve(plot_->xAxis, plot_->yAxis);
    startCurve_->setLayer(QStringLiteral("marks"));
    startCurve_->setLineStyle(QCPCurve::lsNone);
    startCurve_->setName(tr("start (drag to move)"));
    highlightCurve_ = new QCPCurve(plot_->xAxis, plot_->yAxis);
    highlightCurve_->setLayer(QStringLiteral("marks"));
    highlightCurve_->setLineStyle(QCPCurve::lsNone);
    highlightCurve_->removeFromLegend();

    auto* row = new QHBoxLayout;
    row->setContentsMargins(4, 0, 4, 2);
    readout_ = new QLabel(this);
    readout_->setObjectName(QStringLiteral("landscapeReadout"));
    readout_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    readout_->setToolTip(tr("Values under the cursor: position, f, gradient norm and Hessian eigenvalues"));
    readout_->setText(readoutHint());
    readout_->setWordWrap(true);
    logBox_ = new QCheckBox(tr("Log colour"), this);
    logBox_->setToolTip(tr("Colour by log10 of f minus the lowest f on this plane, so both the valley floor and "
                           "the walls show"));
    resetButton_ = new QToolButton(this);
    resetButton_->setText(tr("Reset view"));
    resetButton_->setToolTip(tr("Return to the plotted variables' ranges"));
    row->addWidget(readout_, 1);
    row->addWidget(logBox_);
    row->addWidget(resetButton_);
    layout_->addLayout(row);

    connect(logBox_, &QCheckBox::toggled, this, [this](bool on) {
        logColourSetByUser_ = true;
        if (on == logColour_) return;
        logColour_ = on;
        rebuildField();
        queueReplot();
        emit logColourChanged(on);
    });
    connect(resetButton_, &QToolButton::clicked, this, &LandscapeView::resetView);

    boxTimer_.setSingleShot(true);
    boxTimer_.setInterval(120);
    connect(&boxTimer_, &QTimer::timeout, this, [this] { emit viewBoxChanged(viewBox()); });
    auto rangeMoved = [this] {
        if (!settingRange_) boxTimer_.start();
    };
    connect(plot_->xAxis, qOverload<const QCPRange&>(&QCPAxis::rangeChanged), this, rangeMoved);
    connect(plot_->yAxis, qOverload<const QCPRange&>(&QCPAxis::rangeChanged), this, rangeMoved);

    plot_->setMouseTracking(true);
    plot_->installEventFilter(this);
    applyPlotStyle(plot_);
}

void LandscapeView::setField(std::shared_ptr<const FieldSnapshot> field) {
    field_ = std::move(field);
    if (field_ && !logColourSetByUser_ && field_->logColour != logColour_) {
        logColour_ = field_->logColour;
        const QSignalBlocker block(logBox_);
        logBox_->setChecked(logColour_);
    }
    if (field_ && !hasHome_ && field_->field.nx >= 2 && field_->field.ny >= 2) {
        home_ = field_->field.box;
        hasHome_ = true;
        settingRange_ = true;
        plot_->xAxis->setRange(home_.xMin, home_.xMax);
        plot_->yAxis->setRange(home_.yMin, home_.yMax);
        settingRange_ = false;
    }
    rebuildField();
    queueReplot();
}

void LandscapeView::setStart(const Vector& start) {
    start_ = start;
    hasStart_ = true;
    updateStartMarker();
    queueReplot();
}

void LandscapeView::setHomeBox(const analyze::Box& box) {
    const bool first = !hasHome_;
    home_ = box;
    hasHome_ = true;
    if (first) {
        settingRange_ = true;
        plot_->xAxis->setRange(box.xMin, box.xMax);
        plot_->yAxis->setRange(box.yMin, box.yMax);
        settingRange_ = false;
        queueReplot();
    }
}

analyze::Box LandscapeView::viewBox() const {
    const QCPRange x = plot_->xAxis->range(), y = plot_->yAxis->range();
    return analyze::Box{x.lower, x.upper, y.lower, y.upper};
}

void LandscapeView::resetView() {
    if (!hasHome_) return;
    plot_->xAxis->setRange(home_.xMin, home_.xMax);
    plot_->yAxis->setRange(home_.yMin, home_.yMax);
    boxTimer_.stop();
    emit viewBoxChanged(viewBox());
    queueReplot();
}

void LandscapeView::setLogColour(bool on) {
    logColourSetByUser_ = true;
    logBox_->setChecked(on);  // the toggled handler redraws
}

bool LandscapeView::logColour() const { return logColour_; }

QString LandscapeView::readoutText() const { return readout_->text(); }

QCPRange LandscapeView::colourRange() const { return colourMap_->dataRange(); }

QCPCurve* LandscapeView::pathCurve(int track) const {
    if (track < 0 || track >= static_cast<int>(pathCurves_.size())) return nullptr;
    return pathCurves_[static_cast<std::size_t>(track)];
}

QPointF LandscapeView::highlightPosition() const {
    if (!highlightCurve_->visible() || highlightCurve_->data()->isEmpty())
        return QPointF(std::nan(""), std::nan(""));
    const auto it = highlightCurve_->data()->constBegin();
    return QPointF(it->key, it->value);
}

void LandscapeView::clear() {
    field_.reset();
    snapshot_.reset();
    selection_ = {};
    start_ = Vector();
    hasStart_ = false;
    hasHome_ = false;
    dragging_ = pressed_ = false;
    readout_->setText(readoutHint());
    plot_->xAxis->setLabel(QString());
    plot_->yAxis->setLabel(QString());
    rebuildField();
    rebuildPaths();
    updateStartMarker();
    updateHighlight();
    queueReplot();
}

QString LandscapeView::readoutHint() const {
    return tr("Move the cursor over the landscape to read f, |∇f| and the Hessian eigenvalues.");
}

void LandscapeView::rebuild() {
    applyPlotStyle(plot_);
    startCurve_->setName(exporting() ? tr("start") : tr("start (drag to move)"));
    if (snapshot_ && snapshot_->plotX >= 0 && snapshot_->plotX < static_cast<int>(snapshot_->variableNames.size()))
        plot_->xAxis->setLabel(snapshot_->variableNames[static_cast<std::size_t>(snapshot_->plotX)]);
    if (snapshot_ && snapshot_->plotY >= 0 && snapshot_->plotY < static_cast<int>(snapshot_->variableNames.size()))
        plot_->yAxis->setLabel(snapshot_->variableNames[static_cast<std::size_t>(snapshot_->plotY)]);
    if (!hasStart_ && snapshot_) {
        for (const RunTrack& track : snapshot_->tracks) {
            if (track.run && !track.run->trace.empty()) {
                start_ = track.run->trace.front().x;
                break;
            }
        }
    }
    // The field and its contours change only with a new field or colour scale, not with runs.
    if (builtField_ != field_.get() || builtLogColour_ != logColour_ || builtDark_ != isDarkPalette(palette()))
        rebuildField();
    rebuildPaths();
    updateStartMarker();
    updateHighlight();
    queueReplot();
}

void LandscapeView::selectionChanged() {
    updateHighlight();
    queueReplot();
}

void LandscapeView::rebuildField() {
    builtField_ = field_.get();
    builtLogColour_ = logColour_;
    builtDark_ = isDarkPalette(palette());
    colourScale_->setGradient(fieldGradient(builtDark_));  // the scale passes it on to the map
    for (QCPCurve* curve : contourCurves_) plot_->removePlottable(curve);
    contourCurves_.clear();
    const analyze::Field* field = field_ ? &field_->field : nullptr;
    if (!field || field->nx < 2 || field->ny < 2 ||
        static_cast<std::size_t>(field->nx) * static_cast<std::size_t>(field->ny) != field->values.size()) {
        colourMap_->setVisible(false);
        colourScale_->setVisible(false);
        return;
    }

    // The range over finite cells, computed here: QCPColorMap::rescaleDataRange keeps its
    // default range when a cell is inf or NaN (see PITFALLS.md).
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    for (double v : field->values) {
        if (std::isfinite(v)) {
            lo = std::min(lo, v);
            hi = std::max(hi, v);
        }
    }
    const bool anyFinite = lo <= hi;
    // Log colour: log10(f - lo + offset), lo the lowest f on the plane; the small offset keeps
    // the lowest cell finite.
    const double span = anyFinite ? hi - lo : 0.0;
    const double offset = span > 0 ? span * 1e-5 : 1.0;
    auto colourOf = [&](double v) {
        if (!std::isfinite(v)) return std::nan("");
        return logColour_ ? std::log10(v - lo + offset) : v;
    };

    // Reuse the map's cell array when the grid size is unchanged; fill it in one pass
    // (row-major, x fastest, the layout of both Field and QCPColorMapData).
    QCPColorMapData* data = colourMap_->data();
    data->setSize(field->nx, field->ny);
    data->setRange(QCPRange(field->box.xMin, field->box.xMax), QCPRange(field->box.yMin, field->box.yMax));
    double* cells = data->*ColourMapDataAccess::cells();
    if (cells) {
        const std::size_t count = field->values.size();
        for (std::size_t k = 0; k < count; ++k) cells[k] = colourOf(field->values[k]);
        data->*ColourMapDataAccess::modified() = true;
    } else {
        for (int j = 0; j < field->ny; ++j)
            for (int i = 0; i < field->nx; ++i) data->setCell(i, j, colourOf(field->at(i, j)));
    }

    QCPRange range(0, 1);
    if (anyFinite) {
        range = QCPRange(colourOf(lo), colourOf(hi));
        if (!(range.upper > range.lower)) {
            // A constant field: centre it in a unit-wide range so it still gets a colour.
            const double mid = range.lower;
            const double half = std::max(0.5, std::abs(mid) * 1e-6);
            range = QCPRange(mid - half, mid + half);
        }
    }
    colourMap_->setDataRange(range);
    colourMap_->setVisible(true);
    colourScale_->setVisible(true);

    QCPAxis* scaleAxis = colourScale_->axis();
    if (logColour_) {
        scaleAxis->setTicker(QSharedPointer<QCPAxisTicker>(new TransformTicker(
            [](double v) { return std::log10(v); }, [](double t) { return std::pow(10.0, t); },
            [](double a, double b) {
                std::vector<double> values;
                if (!(b > 0)) return values;
                const int k0 = static_cast<int>(std::floor(std::log10(std::max(a, 1e-300)))) - 1;
                const int k1 = static_cast<int>(std::ceil(std::log10(b))) + 1;
                for (int k = k0; k <= k1; ++k) values.push_back(std::pow(10.0, k));
                return values;
            })));
        const QString low = formatNumber(lo);
        scaleLabels_ = {tr("f − %1, log scale (%1: lowest f on this plane)").arg(low),
                        tr("f − %1, log (%1: lowest f here)").arg(low), tr("f − %1, log").arg(low), tr("f − min, log")};
    } else {
        scaleAxis->setTicker(QSharedPointer<QCPAxisTicker>(new QCPAxisTicker));
        scaleLabels_ = {tr("f")};
    }
    if (field->nonFiniteCells > 0) {
        QStringList withGrey;
        for (const QString& label : scaleLabels_) withGrey << label + tr("   (grey: not finite)");
        scaleLabels_ = withGrey + scaleLabels_;  // drop the grey note before shortening the rest
    }
    scaleAxis->setLabel(scaleLabels_.first());
    fitScaleLabel();

    // Contour lines, dark on the light end of the gradient and light on the dark end.
    for (const analyze::ContourSet& set : field_->contours) {
        const double position = (colourOf(set.level) - range.lower) / (range.upper - range.lower);
        const bool lightFill = fieldGradientLightness(position, builtDark_) > 0.6;
        const QColor ink = lightFill ? QColor(20, 20, 30, 130) : QColor(255, 255, 255, 120);
        // Contours carry most of the plot's points: a cosmetic pen takes the raster engine's
        // fast line path (a stroked pen cost several ms per redraw at 600 x 600), widened by
        // the device pixel ratio so the lines keep their weight on high-DPI screens.
        QPen pen(ink, devicePixelRatioF());
        pen.setCosmetic(true);
        for (const analyze::Polyline& line : set.lines) {
            if (line.x.size() < 2 || line.x.size() != line.y.size()) continue;
            QVector<double> xs(line.x.begin(), line.x.end()), ys(line.y.begin(), line.y.end());
            if (line.closed && (xs.front() != xs.back() || ys.front() != ys.back())) {
                xs.push_back(xs.front());
                ys.push_back(ys.front());
            }
            auto* curve = new QCPCurve(plot_->xAxis, plot_->yAxis);
            curve->setLayer(QStringLiteral("contours"));
            curve->setData(xs, ys);
            curve->setPen(pen);
            curve->setSelectable(QCP::stNone);
            curve->removeFromLegend();
            curve->setName(tr("f = %1").arg(formatNumber(set.level)));
            contourCurves_.push_back(curve);
        }
    }
}

void LandscapeView::rebuildPaths() {
    for (QCPCurve* curve : pathCurves_) plot_->removePlottable(curve);
    for (QCPCurve* curve : endCurves_) plot_->removePlottable(curve);
    pathCurves_.clear();
    endCurves_.clear();
    if (!snapshot_) return;
    const int px = snapshot_->plotX, py = snapshot_->plotY;
    std::set<solve::PointKind> kindsShown;
    for (const RunTrack& track : snapshot_->tracks) {
        auto* path = new QCPCurve(plot_->xAxis, plot_->yAxis);
        path->setName(track.label);
        QPen pen(track.colour, 1.8);
        scaleForScreen(pen);
        path->setPen(pen);
        path->setScatterStyle(iterateStyle(track.marker, track.colour, 6.5));
        path->setSelectable(QCP::stNone);
        pathCurves_.push_back(path);
        if (!track.run) continue;
        QVector<double> xs, ys;
        for (const solve::IterationRecord& record : track.run->trace) {
            if (record.x.size() <= std::max(px, py)) continue;
            xs.push_back(record.x[px]);
            ys.push_back(record.x[py]);
        }
        path->setData(xs, ys);
        if (track.run->finished() && !xs.isEmpty()) {
            auto* end = new QCPCurve(plot_->xAxis, plot_->yAxis);
            end->setLayer(QStringLiteral("marks"));
            end->setLineStyle(QCPCurve::lsNone);
            // A run that stopped without converging is not at a critical point: its end is
            // marked as unclassified rather than by the local curvature there.
            const solve::PointKind kind =
                solve::isConvergence(track.run->termination) ? track.run->endPoint.kind : solve::PointKind::Unknown;
            end->setScatterStyle(endPointStyle(kind, track.colour));
            end->setData(QVector<double>{xs.back()}, QVector<double>{ys.back()});
            end->setSelectable(QCP::stNone);
            end->removeFromLegend();
            end->setName(track.label + QStringLiteral(": ") + endPointLabel(kind));
            endCurves_.push_back(end);
            kindsShown.insert(kind);
        }
    }
    // Legend entries for the end-point shapes, drawn in the text colour (no data).
    const QColor neutral = palette().color(QPalette::WindowText);
    for (solve::PointKind kind : kindsShown) {
        auto* key = new QCPCurve(plot_->xAxis, plot_->yAxis);
        key->setLineStyle(QCPCurve::lsNone);
        key->setPen(Qt::NoPen);
        key->setScatterStyle(endPointStyle(kind, neutral, 10));
        key->setName(endPointLabel(kind));
        key->setSelectable(QCP::stNone);
        endCurves_.push_back(key);
    }
}

void LandscapeView::updateStartMarker() {
    const QColor ink = palette().color(QPalette::WindowText);
    QColor fill = palette().color(QPalette::Base);
    fill.setAlpha(170);
    QPen pen(ink, 2.0);
    scaleForScreen(pen);
    startCurve_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssPlusCircle, pen, QBrush(fill), 15));
    if (!snapshot_ || start_.size() <= std::max(snapshot_->plotX, snapshot_->plotY)) {
        startCurve_->data()->clear();
        startCurve_->setVisible(false);
        return;
    }
    startCurve_->setData(QVector<double>{start_[snapshot_->plotX]}, QVector<double>{start_[snapshot_->plotY]});
    startCurve_->setVisible(true);
}

void LandscapeView::updateHighlight() {
    const solve::IterationRecord* record = selectedRecord();
    const int px = snapshot_ ? snapshot_->plotX : 0, py = snapshot_ ? snapshot_->plotY : 1;
    if (!record || record->x.size() <= std::max(px, py)) {
        highlightCurve_->data()->clear();
        highlightCurve_->setVisible(false);
        return;
    }
    QPen pen(palette().color(QPalette::Highlight), 2.6);
    scaleForScreen(pen);
    highlightCurve_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, pen, Qt::NoBrush, 20));
    highlightCurve_->setData(QVector<double>{record->x[px]}, QVector<double>{record->x[py]});
    highlightCurve_->setVisible(true);
}

Vector LandscapeView::pointAt(double x, double y) const {
    Vector point;
    if (snapshot_ && snapshot_->objective) {
        const int n = snapshot_->objective->dimension();
        if (snapshot_->held.size() == n)
            point = snapshot_->held;
        else if (start_.size() == n)
            point = start_;
        else
            point = Vector::Zero(n);
    } else {
        point = Vector::Zero(2);
    }
    const int px = snapshot_ ? snapshot_->plotX : 0, py = snapshot_ ? snapshot_->plotY : 1;
    if (point.size() > std::max(px, py)) {
        point[px] = x;
        point[py] = y;
    }
    return point;
}

QString LandscapeView::readoutAt(double x, double y) const {
    const Vector point = pointAt(x, y);
    const int px = snapshot_ ? snapshot_->plotX : 0, py = snapshot_ ? snapshot_->plotY : 1;
    auto nameOf = [&](int i) {
        if (snapshot_ && i < static_cast<int>(snapshot_->variableNames.size()))
            return snapshot_->variableNames[static_cast<std::size_t>(i)];
        return QStringLiteral("x%1").arg(i + 1);
    };
    QString text = QStringLiteral("%1 = %2, %3 = %4").arg(nameOf(px), formatNumber(x), nameOf(py), formatNumber(y));
    if (!snapshot_ || !snapshot_->objective || point.size() != snapshot_->objective->dimension()) return text;
    Vector gradient;
    Matrix hessian;
    const double f = snapshot_->objective->valueGradientHessian(point, gradient, hessian);
    text += QStringLiteral("   f = %1   |∇f| = %2").arg(formatNumber(f), formatNumber(gradient.norm()));
    if (hessian.allFinite() && hessian.rows() > 0) {
        const Eigen::SelfAdjointEigenSolver<Matrix> solver(0.5 * (hessian + hessian.transpose()),
                                                            Eigen::EigenvaluesOnly);
        const Vector& lambda = solver.eigenvalues();
        if (lambda.size() <= 6)
            text += QStringLiteral("   Hessian eigenvalues: %1").arg(vectorText(lambda));
        else
            text += QStringLiteral("   Hessian eigenvalues: %1 … %2")
                        .arg(formatNumber(lambda[0]), formatNumber(lambda[lambda.size() - 1]));
    } else {
        text += QStringLiteral("   Hessian not finite here");
    }
    return text;
}

bool LandscapeView::nearStart(const QPointF& pixel) const {
    if (!startCurve_->visible() || startCurve_->data()->isEmpty()) return false;
    const auto it = startCurve_->data()->constBegin();
    const QPointF marker(plot_->xAxis->coordToPixel(it->key), plot_->yAxis->coordToPixel(it->value));
    return QLineF(marker, pixel).length() <= kStartGrabPixels;
}

Selection LandscapeView::iterateNear(const QPointF& pixel) const {
    Selection best;
    if (!snapshot_) return best;
    double bestDistance = kPickRadiusPixels;
    const int px = snapshot_->plotX, py = snapshot_->plotY;
    for (std::size_t t = 0; t < snapshot_->tracks.size(); ++t) {
        const auto& run = snapshot_->tracks[t].run;
        if (!run) continue;
        for (std::size_t k = 0; k < run->trace.size(); ++k) {
            const Vector& x = run->trace[k].x;
            if (x.size() <= std::max(px, py)) continue;
            const QPointF p(plot_->xAxis->coordToPixel(x[px]), plot_->yAxis->coordToPixel(x[py]));
            const double d = QLineF(p, pixel).length();
            if (d <= bestDistance) {
                bestDistance = d;
                best = Selection{static_cast<int>(t), static_cast<int>(k)};
            }
        }
    }
    return best;
}

bool LandscapeView::eventFilter(QObject* watched, QEvent* event) {
    if (watched != plot_) return PlotView::eventFilter(watched, event);
    switch (event->type()) {
    case QEvent::MouseButtonPress: {
        auto* mouse = static_cast<QMouseEvent*>(event);
        if (mouse->button() != Qt::LeftButton) break;
        if (nearStart(mouse->position())) {
            dragging_ = true;
            return true;  // keep QCustomPlot from starting a pan
        }
        pressed_ = true;
        pressPixel_ = mouse->position();
        break;
    }
    case QEvent::MouseMove: {
        auto* mouse = static_cast<QMouseEvent*>(event);
        const double x = plot_->xAxis->pixelToCoord(mouse->position().x());
        const double y = plot_->yAxis->pixelToCoord(mouse->position().y());
        if (dragging_) {
            Vector start = (start_.size() > 0 && snapshot_ && snapshot_->objective &&
                            start_.size() == snapshot_->objective->dimension())
                               ? start_
                               : pointAt(x, y);
            if (snapshot_ && start.size() > std::max(snapshot_->plotX, snapshot_->plotY)) {
                start[snapshot_->plotX] = x;
                start[snapshot_->plotY] = y;
            }
            start_ = start;
            hasStart_ = true;
            updateStartMarker();
            plot_->replot(QCustomPlot::rpQueuedReplot);
            emit startMoved(start);
            return true;
        }
        if (!(mouse->buttons() & Qt::LeftButton) && plot_->axisRect()->rect().contains(mouse->position().toPoint()))
            readout_->setText(readoutAt(x, y));
        break;
    }
    case QEvent::MouseButtonRelease: {
        auto* mouse = static_cast<QMouseEvent*>(event);
        if (mouse->button() != Qt::LeftButton) break;
        if (dragging_) {
            dragging_ = false;
            emit startDragFinished();
            return true;
        }
        if (pressed_) {
            pressed_ = false;
            if (QLineF(pressPixel_, mouse->position()).length() <= kClickSlopPixels &&
                plot_->axisRect()->rect().contains(mouse->position().toPoint())) {
                const Selection hit = iterateNear(mouse->position());
                if (hit.valid()) {
                    emit selectionRequested(hit);
                } else {
                    const double x = plot_->xAxis->pixelToCoord(mouse->position().x());
                    const double y = plot_->yAxis->pixelToCoord(mouse->position().y());
                    Vector start = pointAt(x, y);
                    if (snapshot_ && snapshot_->objective && start_.size() == snapshot_->objective->dimension()) {
                        start = start_;
                        start[snapshot_->plotX] = x;
                        start[snapshot_->plotY] = y;
                    }
                    start_ = start;
                    hasStart_ = true;
                    updateStartMarker();
                    queueReplot();
                    emit startPlaced(start);
                }
            }
        }
        break;
    }
    default: break;
    }
    return PlotView::eventFilter(watched, event);
}

void LandscapeView::fitScaleLabel() {
    if (scaleLabels_.isEmpty() || !colourScale_->visible()) return;
    QCPAxis* axis = colourScale_->axis();
    const int room = axis->axisRect() ? axis->axisRect()->rect().height() : 0;
    if (room <= 0) return;
    const QFontMetrics metrics(axis->labelFont());
    QString chosen = scaleLabels_.last();
    for (const QString& label : scaleLabels_)
        if (metrics.horizontalAdvance(label) <= room) {
            chosen = label;
            break;
        }
    if (axis->label() != chosen) axis->setLabel(chosen);  // the label's thickness is the same: no new layout
}

}  // namespace sw::widgets
