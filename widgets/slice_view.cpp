#include "widgets/slice_view.h"
#include "widgets/elided_label.h"

#include <QCheckBox>
#include <QComboBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

namespace sw::widgets {

namespace {
constexpr int kSamples = 241;
QColor armijoColour() { return QColor(0xd5, 0x5e, 0x00); }
QColor modelColour() { return QColor(0x2e, 0x9e, 0x7a); }
}  // namespace

SliceView::SliceView(QWidget* parent) : PlotView(parent) {
    setObjectName(QStringLiteral("sliceView"));
    plot_->setInteractions(QCP::iRangeDrag | QCP::iRangeZoom);
    // The legend has its own row under the plot: inside it hid the accepted step.
    auto* legendRow = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(1, 0, legendRow);
    plot_->plotLayout()->setRowStretchFactor(1, 0.001);
    legendRow->setMargins(QMargins(4, 0, 4, 4));
    legendRow->addElement(0, 0, plot_->legend);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setVisible(true);
    enableLegendReflow(3, {}, 110);  // names elided (full name as a tooltip): fewer rows, taller plot

    auto* row = new QHBoxLayout;
    row->setContentsMargins(4, 0, 4, 2);
    auto* label = new QLabel(tr("Along:"), this);
    directionChoice_ = new QComboBox(this);
    directionChoice_->setToolTip(tr("The line through the selected iterate: its step's search direction, or one of "
                                    "the Hessian's eigenvectors"));
    directionChoice_->addItem(tr("search direction of the step"), -1);
    label->setBuddy(directionChoice_);
    caption_ = new ElidedLabel(this);
    caption_->setObjectName(QStringLiteral("sliceCaption"));
    caption_->setContentsMargins(4, 0, 4, 2);
    logScale_ = new QCheckBox(tr("log α"), this);
    logScale_->setToolTip(tr("Step lengths on a log scale: line-search trials often span several decades "
                             "(on by itself when they span more than two)"));
    connect(logScale_, &QCheckBox::toggled, this, [this](bool on) {
        logScaleChosen_ = true;
        if (on != logScale_->property("applied").toBool()) rebuild();
    });
    row->addWidget(label);
    row->addWidget(directionChoice_);
    row->addWidget(logScale_);
    row->addStretch(1);
    layout_->addLayout(row);
    layout_->addWidget(caption_);  // its own line under the controls, shortened to fit
    connect(directionChoice_, qOverload<int>(&QComboBox::activated), this,
            [this](int index) { setDirection(directionChoice_->itemData(index).toInt()); });
    applyPlotStyle(plot_);
    rebuild();
}

void SliceView::setDirection(int eigenvectorIndex) {
    direction_ = std::max(-1, eigenvectorIndex);
    rebuild();
}

void SliceView::setArmijoConstant(double c1) {
    if (std::isfinite(c1) && c1 > 0 && c1 < 1) c1_ = c1;
    rebuild();
}

QString SliceView::caption() const { return caption_->fullText(); }

void SliceView::rebuild() {
    plot_->clearPlottables();
    trueGraph_ = modelGraph_ = armijoGraph_ = trialGraph_ = rejectedGraph_ = acceptedGraph_ = nullptr;
    applyPlotStyle(plot_);
    const QColor ink = palette().color(QPalette::WindowText);

    const solve::IterationRecord* record = selectedRecord();
    const int n = snapshot_ && snapshot_->objective ? snapshot_->objective->dimension() : 0;
    // Keep the direction list in step with the dimension.
    if (directionChoice_->count() != 1 + n) {
        const QSignalBlocker block(directionChoice_);
        directionChoice_->clear();
        directionChoice_->addItem(tr("search direction of the step"), -1);
        for (int i = 0; i < n; ++i)
            directionChoice_->addItem(i == 0 ? tr("eigenvector 1 (smallest λ)")
                                      : i == n - 1 ? tr("eigenvector %1 (largest λ)").arg(i + 1)
                                                   : tr("eigenvector %1").arg(i + 1),
                                      i);
    }
    {
        const QSignalBlocker block(directionChoice_);
        const int index = directionChoice_->findData(direction_);
        directionChoice_->setCurrentIndex(index >= 0 ? index : 0);
    }
    if (!record || n == 0 || record->x.size() != n) {
        caption_->setFullText(tr("Select an iterate to see f along its step."));
        plot_->xAxis->setLabel(QString());
        plot_->yAxis->setLabel(QString());
        queueReplot();
        return;
    }
    const Objective& objective = *snapshot_->objective;
    const RunTrack& track = snapshot_->tracks[static_cast<std::size_t>(selection_.track)];
    const Vector& x = record->x;
    const analyze::QuadraticModel model = analyze::quadraticModel(objective, x);
    const Vector& gradient = model.gradient.size() == n ? model.gradient : record->gradient;

    // The line x + t d and the range of t.
    Vector d;
    double acceptedT = std::nan("");
    double tMax = 1;
    double tMin = std::numeric_limits<double>::infinity();  // smallest positive trial or step
    QString what;
    const bool hasStep = record->step.size() == n && record->step.allFinite() && record->step.norm() > 0;
    const int eigenIndex = direction_ >= 0 && direction_ < n ? direction_ : -1;
    if (eigenIndex < 0 && hasStep) {
        // Line-search methods record alpha along the search direction d, with step = alpha d.
        const bool hasAlpha = std::isfinite(record->stepLength) && record->stepLength > 0;
        d = hasAlpha ? Vector(record->step / record->stepLength) : record->step;
        acceptedT = hasAlpha ? record->stepLength : 1.0;
        tMax = acceptedT;
        tMin = acceptedT;
        for (const auto& trial : record->trials)
            if (std::isfinite(trial.alpha) && trial.alpha > 0) {
                tMax = std::max(tMax, trial.alpha);
                tMin = std::min(tMin, trial.alpha);
            }
        what = tr("search direction d of the %1 step").arg(QString::fromUtf8(solve::toString(record->stepKind)));
        plot_->xAxis->setLabel(hasAlpha ? tr("step length α along d") : tr("fraction t of the step"));
    } else if (eigenIndex >= 0 && model.eigenvectors.cols() == n && model.eigenvectors.allFinite()) {
        d = model.eigenvectors.col(eigenIndex);
        if (gradient.size() == n && gradient.dot(d) > 0) d = -d;  // descent side to the right
        const double reach = hasStep ? record->step.norm()
                             : std::isfinite(record->trustRadius) ? record->trustRadius
                                                                  : 0.1 * std::max(1.0, x.norm());
        tMax = reach > 0 ? reach : 1.0;
        what = tr("Hessian's eigenvector %1 (λ = %2)").arg(eigenIndex + 1).arg(formatNumber(model.eigenvalues[eigenIndex]));
        plot_->xAxis->setLabel(tr("distance t along the eigenvector"));
    } else if (gradient.size() == n && gradient.allFinite() && gradient.norm() > 0) {
        d = -gradient / gradient.norm();
        tMax = 0.1 * std::max(1.0, x.norm());
        what = tr("steepest descent (this iterate has no step)");
        plot_->xAxis->setLabel(tr("distance t along −∇f"));
    } else {
        caption_->setFullText(tr("Iterate %1 of %2 has no step and a zero or non-finite gradient: no line to show.")
                              .arg(record->iteration)
                              .arg(track.label));
        queueReplot();
        return;
    }
    plot_->yAxis->setLabel(tr("f along the line"));

    // The window shows every trial and the accepted step (a backtracking search tries 1, ½, ¼, …
    // before it accepts a short step: each rejected trial is part of the story). When the trials
    // span more than two decades the step length goes on a log scale, unless the user chose.
    const bool trialsShown = eigenIndex < 0 && hasStep;
    const double tShown = std::isfinite(acceptedT) && acceptedT > 0 ? acceptedT : tMax;
    const bool spansDecades = trialsShown && std::isfinite(tMin) && tMin > 0 && tMax / tMin > 100;
    logScale_->setEnabled(trialsShown && std::isfinite(tMin) && tMin > 0 && tMax / tMin > 10);
    if (!logScaleChosen_) {
        const QSignalBlocker quiet(logScale_);
        logScale_->setChecked(spansDecades);
    }
    const bool logAxis = logScale_->isEnabled() && logScale_->isChecked();
    logScale_->setProperty("applied", logAxis);
    double shownLo = -0.3 * tShown, shownHi = 1.6 * tShown;
    std::vector<double> ts;
    if (logAxis) {
        shownLo = tMin / 2;
        shownHi = tMax * 1.6;
        const double a = std::log10(shownLo), b = std::log10(shownHi);
        for (double e : analyze::linspace(a, b, kSamples)) ts.push_back(std::pow(10.0, e));
    } else {
        if (trialsShown) shownHi = std::max(shownHi, 1.08 * tMax);
        ts = analyze::linspace(shownLo, shownHi, kSamples);
    }
    plot_->xAxis->setScaleType(logAxis ? QCPAxis::stLogarithmic : QCPAxis::stLinear);
    if (logAxis)
        plot_->xAxis->setTicker(QSharedPointer<QCPAxisTickerLog>(new QCPAxisTickerLog));
    else
        plot_->xAxis->setTicker(QSharedPointer<QCPAxisTicker>(new QCPAxisTicker));
    const std::vector<double> truth = analyze::valuesAlong(objective, x, d, ts);
    const std::vector<double> quadratic = model.finite ? model.along(d, ts) : std::vector<double>(ts.size(), std::nan(""));
    const std::vector<double> armijo = gradient.size() == n
                                           ? analyze::sufficientDecreaseLine(record->value, gradient, d, ts, c1_)
                                           : std::vector<double>(ts.size(), std::nan(""));
    const QVector<double> keys(ts.begin(), ts.end());

    trueGraph_ = plot_->addGraph();
    trueGraph_->setData(keys, QVector<double>(truth.begin(), truth.end()), true);
    QPen truePen(ink, 2.0);
    scaleForScreen(truePen);
    trueGraph_->setPen(truePen);
    trueGraph_->setName(tr("f (true)"));

    modelGraph_ = plot_->addGraph();
    modelGraph_->setData(keys, QVector<double>(quadratic.begin(), quadratic.end()), true);
    QPen modelPen(modelColour(), 1.6, Qt::DashLine);
    scaleForScreen(modelPen);
    modelGraph_->setPen(modelPen);
    modelGraph_->setName(tr("quadratic model"));

    armijoGraph_ = plot_->addGraph();
    armijoGraph_->setData(keys, QVector<double>(armijo.begin(), armijo.end()), true);
    QPen armijoPen(armijoColour(), 1.3, Qt::DashDotLine);
    scaleForScreen(armijoPen);
    armijoGraph_->setPen(armijoPen);
    armijoGraph_->setName(tr("sufficient decrease, c₁ = %1").arg(formatNumber(c1_)));

    trialGraph_ = plot_->addGraph();
    trialGraph_->setLineStyle(QCPGraph::lsNone);
    QPen trialPen(trackColour(track), 1.5);
    scaleForScreen(trialPen);
    trialGraph_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, trialPen, Qt::NoBrush, 9));
    trialGraph_->setName(tr("line-search trials"));
    rejectedGraph_ = plot_->addGraph();
    rejectedGraph_->setLineStyle(QCPGraph::lsNone);
    rejectedGraph_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCross, QPen(armijoColour(), 1.8), Qt::NoBrush, 9));
    rejectedGraph_->setName(tr("rejected trial"));
    int rejected = 0;
    if (eigenIndex < 0 && hasStep) {
        for (const auto& trial : record->trials) {
            if (!std::isfinite(trial.alpha)) continue;
            const double value = std::isfinite(trial.value) ? trial.value : std::nan("");
            trialGraph_->addData(trial.alpha, value);
            if (!trial.accepted) {
                rejectedGraph_->addData(trial.alpha, value);
                ++rejected;
            }
        }
    }
    if (rejected == 0) rejectedGraph_->removeFromLegend();
    if (trialGraph_->data()->isEmpty()) trialGraph_->removeFromLegend();

    acceptedGraph_ = plot_->addGraph();
    acceptedGraph_->setLineStyle(QCPGraph::lsNone);
    acceptedGraph_->setScatterStyle(iterateStyle(track.marker, trackColour(track), 11));
    if (std::isfinite(acceptedT)) {
        const double landed = objective.value(x + acceptedT * d);
        acceptedGraph_->addData(acceptedT, landed);
        acceptedGraph_->setName(record->accepted ? tr("accepted step") : tr("proposed step (rejected)"));
    } else {
        acceptedGraph_->removeFromLegend();
    }
    for (QCPGraph* graph : {trueGraph_, modelGraph_, armijoGraph_, trialGraph_, rejectedGraph_, acceptedGraph_})
        graph->setSelectable(QCP::stNone);

    // Vertical range: first what happens up to twice the accepted step (the true curve there,
    // trials there, the step, f at the iterate); then farther trials and the rest of the curve
    // as long as the plot does not grow beyond five times that. A trial far uphill (a first
    // trial at 1e11 when f is 20) would flatten everything else: it is drawn pinned to the top
    // edge instead (an upward triangle), and the caption gives its value.
    const double tNear = 2 * tShown;
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    auto take = [&](double v) {
        if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
    };
    for (std::size_t i = 0; i < ts.size(); ++i)
        if (ts[i] <= tNear) take(truth[i]);
    for (const auto& point : *trialGraph_->data())
        if (point.key <= tNear) take(point.value);
    for (const auto& point : *acceptedGraph_->data()) take(point.value);
    take(record->value);
    if (!(lo <= hi)) lo = -1, hi = 1;
    const double nearSpan = hi > lo ? hi - lo : std::max(1.0, std::abs(hi)) * 0.2;
    const double ceiling = hi + 4 * nearSpan;
    double farthestAbove = -std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < ts.size(); ++i)
        if (std::isfinite(truth[i]) && truth[i] <= ceiling) take(truth[i]);
    for (const auto& point : *trialGraph_->data()) {
        if (!std::isfinite(point.value)) continue;
        if (point.value <= ceiling)
            take(point.value);
        else
            farthestAbove = std::max(farthestAbove, point.value);
    }
    const double pad = hi > lo ? 0.08 * (hi - lo) : std::max(1.0, std::abs(hi)) * 0.1;
    plot_->yAxis->setRange(lo - pad, hi + pad);
    plot_->xAxis->setRange(shownLo, shownHi);
    int pinned = 0;
    if (std::isfinite(farthestAbove)) {
        auto* above = plot_->addGraph();
        above->setLineStyle(QCPGraph::lsNone);
        QPen pen(armijoColour(), 1.6);
        scaleForScreen(pen);
        above->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssTriangle, pen, QBrush(armijoColour()), 9));
        const double top = hi + 0.5 * pad;
        for (const auto& point : *trialGraph_->data())
            if (std::isfinite(point.value) && point.value > ceiling) {
                above->addData(point.key, top);
                ++pinned;
            }
        above->setName(tr("trial far above (pinned to the top)"));
        above->setSelectable(QCP::stNone);
    }

    const double slope = gradient.size() == n ? gradient.dot(d) : std::nan("");
    QString text = tr("Iterate %1 of %2, along the %3: |d| = %4, slope ∇f·d = %5")
                       .arg(record->iteration)
                       .arg(track.label, what, formatNumber(d.norm()), formatNumber(slope));
    if (std::isfinite(acceptedT) && eigenIndex < 0)
        text += tr(", step at %1, %2 trial(s)").arg(formatNumber(acceptedT)).arg(record->trials.size());
    if (pinned > 0) text += tr("; %n trial(s) far above, up to f = %1", nullptr, pinned).arg(formatNumber(farthestAbove));
    caption_->setFullText(text);
    queueReplot();
}

}  // namespace sw::widgets
