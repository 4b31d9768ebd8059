#include "widgets/local_model_view.h"

#include <QElapsedTimer>
#include <QLabel>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

namespace sw::widgets {

namespace {
constexpr int kGridCells = 80;   // the true field's grid (80 x 80 evaluations)
constexpr int kLevelCount = 12;

// Colours for eigen-axes: blue-ish for upward curvature, vermilion for downward; with the
// line style (solid / dash-dot) the distinction does not rely on colour alone.
QColor positiveCurvatureColour() { return QColor(0x1f, 0x6f, 0xb4); }
QColor negativeCurvatureColour() { return QColor(0xd5, 0x5e, 0x00); }
}  // namespace

LocalModelView::LocalModelView(QWidget* parent) : PlotView(parent) {
    setObjectName(QStringLiteral("localModelView"));
    verdict_ = new QLabel(this);
    verdict_->setObjectName(QStringLiteral("localModelVerdict"));
    verdict_->setWordWrap(true);
    verdict_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    verdict_->setContentsMargins(4, 0, 4, 2);
    verdict_->setToolTip(tr("The shape of the quadratic model at the selected iterate, from the Hessian's eigenvalues"));
    layout_->addWidget(verdict_);
    plot_->legend->setVisible(true);
    plot_->axisRect()->insetLayout()->setInsetAlignment(0, Qt::AlignTop | Qt::AlignRight);
    plot_->setToolTip(tr("The quadratic model (dashed) over the true contours at the selected iterate; "
                         "click the legend to move it to another corner"));
    connect(plot_, &QCustomPlot::legendClick, this, [this] { moveLegendToNextCorner(); });
    // Equal scales on both axes, so eigenvector axes look perpendicular and the trust
    // region looks round: adjust the ranges once the axis rect's size is known.
    connect(plot_, &QCustomPlot::afterLayout, this, [this] {
        const QRect r = plot_->axisRect()->rect();
        const QCPRange xr = plot_->xAxis->range(), yr = plot_->yAxis->range();
        if (r.width() < 2 || r.height() < 2 || !(xr.size() > 0) || !(yr.size() > 0)) return;
        const double unitsPerPixel = std::max(xr.size() / r.width(), yr.size() / r.height());
        const QCPRange nx(xr.center() - 0.5 * unitsPerPixel * r.width(), xr.center() + 0.5 * unitsPerPixel * r.width());
        const QCPRange ny(yr.center() - 0.5 * unitsPerPixel * r.height(),
                          yr.center() + 0.5 * unitsPerPixel * r.height());
        if (std::abs(nx.size() - xr.size()) > 1e-9 * xr.size()) plot_->xAxis->setRange(nx);
        if (std::abs(ny.size() - yr.size()) > 1e-9 * yr.size()) plot_->yAxis->setRange(ny);
    });
    applyPlotStyle(plot_);
    rebuild();
}

QString LocalModelView::verdict() const { return verdict_->text(); }

Qt::Alignment LocalModelView::legendCorner() const { return plot_->axisRect()->insetLayout()->insetAlignment(0); }

void LocalModelView::moveLegendToNextCorner() {
    static const Qt::Alignment corners[] = {Qt::AlignTop | Qt::AlignRight, Qt::AlignBottom | Qt::AlignRight,
                                            Qt::AlignBottom | Qt::AlignLeft, Qt::AlignTop | Qt::AlignLeft};
    const Qt::Alignment now = legendCorner();
    int next = 0;
    for (int i = 0; i < 4; ++i)
        if (corners[i] == now) next = (i + 1) % 4;
    plot_->axisRect()->insetLayout()->setInsetAlignment(0, corners[next]);
    plot_->replot(QCustomPlot::rpQueuedReplot);
}

void LocalModelView::setHalfWidth(double halfWidth) {
    halfWidth_ = std::isfinite(halfWidth) && halfWidth > 0 ? halfWidth : 0;
    rebuild();
}

bool LocalModelView::showsNewtonPoint() const { return newton_ && newton_->visible(); }
bool LocalModelView::showsTrustRegion() const { return trust_ && trust_->visible(); }

void LocalModelView::rebuild() {
    plot_->clearPlottables();
    plot_->clearItems();
    newton_ = nullptr;
    trust_ = nullptr;
    modelCurves_ = trueCurves_ = eigenAxes_ = 0;
    applyPlotStyle(plot_);
    const QPalette pal = palette();
    const QColor ink = pal.color(QPalette::WindowText);

    const solve::IterationRecord* record = selectedRecord();
    if (!record || !snapshot_ || !snapshot_->objective) {
        verdict_->setText(tr("Select an iterate (click it on the landscape or in the steps table) to see its local "
                             "quadratic model."));
        plot_->xAxis->setLabel(QString());
        plot_->yAxis->setLabel(QString());
        queueReplot();
        return;
    }
    const Objective& objective = *snapshot_->objective;
    const int n = objective.dimension();
    const int px = snapshot_->plotX, py = snapshot_->plotY;
    if (record->x.size() != n || n < 2 || px < 0 || py < 0 || px >= n || py >= n || px == py) {
        verdict_->setText(tr("The local model needs two plotted variables."));
        queueReplot();
        return;
    }
    const RunTrack& track = snapshot_->tracks[static_cast<std::size_t>(selection_.track)];
    auto nameOf = [&](int i) {
        return i < static_cast<int>(snapshot_->variableNames.size()) ? snapshot_->variableNames[static_cast<std::size_t>(i)]
                                                                     : QStringLiteral("x%1").arg(i + 1);
    };
    plot_->xAxis->setLabel(tr("%1 (around iterate %2)").arg(nameOf(px)).arg(record->iteration));
    plot_->yAxis->setLabel(nameOf(py));

    const Vector& x = record->x;
    const analyze::QuadraticModel model = analyze::quadraticModel(objective, x);
    // The model restricted to the plotted plane: 2 x 2 block of H and the matching gradient entries.
    Eigen::Matrix2d h2;
    h2 << model.hessian(px, px), model.hessian(px, py), model.hessian(py, px), model.hessian(py, py);
    const Eigen::Vector2d g2(model.gradient[px], model.gradient[py]);

    // Window: wide enough for the step, the trust region and (within reason) the Newton point.
    double half = halfWidth_;
    if (!(half > 0)) {
        double local = 0;
        if (record->step.size() == n) local = std::max(local, 1.4 * std::hypot(record->step[px], record->step[py]));
        if (track.usesTrustRegion && std::isfinite(record->trustRadius)) local = std::max(local, 1.25 * record->trustRadius);
        double newtonReach = 0;
        if (model.hasNewtonPoint && model.newtonPoint.size() == n)
            newtonReach = 1.3 * std::hypot(model.newtonPoint[px] - x[px], model.newtonPoint[py] - x[py]);
        if (std::isfinite(newtonReach) && newtonReach > 0)
            half = local > 0 ? std::max(local, std::min(newtonReach, 2.5 * local)) : newtonReach;
        else
            half = local;
        if (!(half > 0) || !std::isfinite(half)) half = 0.1 * std::max(1.0, std::hypot(x[px], x[py]));
        half = std::max(half, 1e-9 * std::max(1.0, std::hypot(x[px], x[py])));
    }
    const analyze::Box box{x[px] - half, x[px] + half, x[py] - half, x[py] + half};

    // True contours from an 80 x 80 field (a few milliseconds; timed for the brief's 10 ms budget).
    QElapsedTimer timer;
    timer.start();
    analyze::Field truth;
    analyze::sampleField(objective, x, px, py, box, kGridCells, kGridCells, truth);
    sampleMs_ = static_cast<double>(timer.nsecsElapsed()) * 1e-6;

    analyze::Field modelField = truth;
    modelField.nonFiniteCells = 0;
    double mMin = std::numeric_limits<double>::infinity(), mMax = -mMin;
    for (int j = 0; j < kGridCells; ++j) {
        for (int i = 0; i < kGridCells; ++i) {
            const Eigen::Vector2d p(truth.x(i) - x[px], truth.y(j) - x[py]);
            const double m = model.value + g2.dot(p) + 0.5 * p.dot(h2 * p);
            modelField.values[static_cast<std::size_t>(j) * kGridCells + i] = m;
            if (std::isfinite(m)) {
                mMin = std::min(mMin, m);
                mMax = std::max(mMax, m);
            } else {
                ++modelField.nonFiniteCells;
            }
        }
    }
    modelField.finiteMin = mMin;
    modelField.finiteMax = mMax;

    // Shared levels, chosen on the true field, so each model contour pairs with a true one.
    std::vector<double> levels = analyze::chooseLevels(truth, kLevelCount);
    if (levels.empty()) levels = analyze::chooseLevels(modelField, kLevelCount);

    QColor trueInk = ink;
    trueInk.setAlpha(120);
    QPen truePen(trueInk, devicePixelRatioF());  // cosmetic: the fast path for many points
    truePen.setCosmetic(true);
    QPen modelPen(track.colour, 1.6, Qt::DashLine);
    scaleForScreen(modelPen);
    auto drawSets = [&](const std::vector<analyze::ContourSet>& sets, const QPen& pen, const QString& legendName) {
        int count = 0;
        for (const analyze::ContourSet& set : sets) {
            for (const analyze::Polyline& line : set.lines) {
                if (line.x.size() < 2 || line.x.size() != line.y.size()) continue;
                QVector<double> xs(line.x.begin(), line.x.end()), ys(line.y.begin(), line.y.end());
                if (line.closed) {
                    xs.push_back(xs.front());
                    ys.push_back(ys.front());
                }
                auto* curve = new QCPCurve(plot_->xAxis, plot_->yAxis);
                curve->setData(xs, ys);
                curve->setPen(pen);
                curve->setSelectable(QCP::stNone);
                if (count == 0)
                    curve->setName(legendName);
                else
                    curve->removeFromLegend();
                ++count;
            }
        }
        return count;
    };
    trueCurves_ = drawSets(analyze::contourLines(truth, levels), truePen, tr("f (true contours)"));
    modelCurves_ = drawSets(analyze::contourLines(modelField, levels), modelPen, tr("quadratic model"));

    // Eigenvector axes of the plotted 2 x 2 block, each labelled with its eigenvalue.
    const Eigen::SelfAdjointEigenSolver<Eigen::Matrix2d> eigen(h2);
    if (h2.allFinite() && eigen.info() == Eigen::Success) {
        for (int k = 0; k < 2; ++k) {
            const double lambda = eigen.eigenvalues()[k];
            const Eigen::Vector2d v = eigen.eigenvectors().col(k);
            const bool up = lambda > model.zeroTolerance * std::max(1.0, eigen.eigenvalues().cwiseAbs().maxCoeff());
            const bool down = lambda < -model.zeroTolerance * std::max(1.0, eigen.eigenvalues().cwiseAbs().maxCoeff());
            const QColor colour = down ? negativeCurvatureColour() : up ? positiveCurvatureColour() : ink;
            QPen pen(colour, 1.8, down ? Qt::DashDotLine : up ? Qt::SolidLine : Qt::DotLine);
            scaleForScreen(pen);
            const double reach = 0.75 * half;
            auto* axis = new QCPItemLine(plot_);
            axis->start->setCoords(x[px] - reach * v[0], x[py] - reach * v[1]);
            axis->end->setCoords(x[px] + reach * v[0], x[py] + reach * v[1]);
            axis->setPen(pen);
            axis->setSelectable(false);
            auto* label = new QCPItemText(plot_);
            label->position->setCoords(x[px] + reach * v[0], x[py] + reach * v[1]);
            label->setPositionAlignment(Qt::AlignLeft | Qt::AlignBottom);
            label->setText(QStringLiteral("λ%1 = %2").arg(k == 0 ? QStringLiteral("₁") : QStringLiteral("₂"),
                                                          formatNumber(lambda, 3)));
            label->setColor(colour);
            label->setSelectable(false);
            ++eigenAxes_;
        }
    }

    // Trust-region boundary (the ball |p| <= Delta meets the plotted plane in a circle).
    if (track.usesTrustRegion && std::isfinite(record->trustRadius) && record->trustRadius > 0) {
        QVector<double> xs, ys;
        for (int k = 0; k <= 120; ++k) {
            const double a = 2 * M_PI * k / 120;
            xs.push_back(x[px] + record->trustRadius * std::cos(a));
            ys.push_back(x[py] + record->trustRadius * std::sin(a));
        }
        trust_ = new QCPCurve(plot_->xAxis, plot_->yAxis);
        trust_->setData(xs, ys);
        QPen pen(ink, 1.4, Qt::DotLine);
        scaleForScreen(pen);
        trust_->setPen(pen);
        trust_->setName(tr("trust region, Δ = %1").arg(formatNumber(record->trustRadius)));
        trust_->setSelectable(QCP::stNone);
    }

    // The step actually taken from this iterate.
    if (record->step.size() == n && record->step.allFinite() && record->step.norm() > 0) {
        auto* arrow = new QCPItemLine(plot_);
        arrow->start->setCoords(x[px], x[py]);
        arrow->end->setCoords(x[px] + record->step[px], x[py] + record->step[py]);
        QPen pen(track.colour, 2.2);
        scaleForScreen(pen);
        arrow->setPen(pen);
        arrow->setHead(QCPLineEnding(QCPLineEnding::esSpikeArrow, 10, 12));
        arrow->setSelectable(false);
        auto* stepKey = new QCPCurve(plot_->xAxis, plot_->yAxis);  // legend entry for the arrow
        stepKey->setPen(pen);
        const QString what = stepDescription(track.run->methodId, *record);
        stepKey->setName(what.isEmpty() ? tr("step of %1").arg(track.label) : tr("step of %1 (%2)").arg(track.label, what));
        stepKey->setSelectable(QCP::stNone);
    }

    // The iterate itself.
    auto* here = new QCPCurve(plot_->xAxis, plot_->yAxis);
    here->setLineStyle(QCPCurve::lsNone);
    here->setScatterStyle(iterateStyle(track.marker, track.colour, 10));
    here->setData(QVector<double>{x[px]}, QVector<double>{x[py]});
    here->setName(tr("%1, iterate %2").arg(track.label).arg(record->iteration));

    if (model.hasNewtonPoint && model.newtonPoint.size() == n && model.newtonPoint.allFinite()) {
        newton_ = new QCPCurve(plot_->xAxis, plot_->yAxis);
        newton_->setLineStyle(QCPCurve::lsNone);
        QPen pen(ink, 2.0);
        scaleForScreen(pen);
        newton_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCrossCircle, pen, QBrush(pal.color(QPalette::Base)), 13));
        newton_->setData(QVector<double>{model.newtonPoint[px]}, QVector<double>{model.newtonPoint[py]});
        QString role;
        switch (model.shape) {
        case analyze::Shape::Bowl: role = tr("model minimiser"); break;
        case analyze::Shape::Dome: role = tr("model maximiser"); break;
        case analyze::Shape::Saddle: role = tr("model saddle"); break;
        default: role = tr("model stationary point"); break;
        }
        const bool inView = std::abs(model.newtonPoint[px] - x[px]) <= half && std::abs(model.newtonPoint[py] - x[py]) <= half;
        newton_->setName(tr("Newton point (%1)%2").arg(role, inView ? QString() : tr(", outside this window")));
    }

    settingRangeFor(box);
    QString text = QString::fromStdString(model.verdict);
    if (text.isEmpty()) text = QString::fromUtf8(analyze::toString(model.shape));
    if (!text.isEmpty()) text[0] = text[0].toUpper();
    if (n > 2) text += tr("  (full %1-variable model; the plot shows the plane of %2 and %3)").arg(n).arg(nameOf(px), nameOf(py));
    verdict_->setText(tr("Iterate %1 of %2: %3").arg(record->iteration).arg(track.label, text));
    queueReplot();
}

void LocalModelView::settingRangeFor(const analyze::Box& box) {
    plot_->xAxis->setRange(box.xMin, box.xMax);
    plot_->yAxis->setRange(box.yMin, box.yMax);
}

}  // namespace sw::widgets
