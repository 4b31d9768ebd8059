#include "widgets/progress_view.h"

#include <QApplication>
#include <QComboBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

namespace sw::widgets {

ProgressView::ProgressView(QWidget* parent) : PlotView(parent) {
    setObjectName(QStringLiteral("progressView"));
    gapRect_ = plot_->axisRect();
    gradientRect_ = new QCPAxisRect(plot_);
    plot_->plotLayout()->addElement(1, 0, gradientRect_);
    auto* group = new QCPMarginGroup(plot_);
    gapRect_->setMarginGroup(QCP::msLeft | QCP::msRight, group);
    gradientRect_->setMarginGroup(QCP::msLeft | QCP::msRight, group);
    for (QCPAxisRect* rect : {gapRect_, gradientRect_}) {
        QCPAxis* y = rect->axis(QCPAxis::atLeft);
        y->setScaleType(QCPAxis::stLogarithmic);
        y->setTicker(QSharedPointer<QCPAxisTickerLog>(new QCPAxisTickerLog));
    }
    gradientRect_->axis(QCPAxis::atLeft)->setLabel(tr("gradient norm |∇f|"));
    connect(gapRect_->axis(QCPAxis::atBottom), qOverload<const QCPRange&>(&QCPAxis::rangeChanged),
            gradientRect_->axis(QCPAxis::atBottom), qOverload<const QCPRange&>(&QCPAxis::setRange));

    auto* legendRow = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(2, 0, legendRow);
    plot_->plotLayout()->setRowStretchFactor(2, 0.001);
    legendRow->setMargins(QMargins(4, 0, 4, 4));
    legendRow->addElement(0, 0, plot_->legend);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setWrap(3);
    plot_->legend->setVisible(true);
    enableLegendReflow(3);
    enableTickThinning();

    // What f_best is, in a line above the plots: as the axis label it was clipped whenever
    // the panel was short.
    plot_->plotLayout()->insertRow(0);
    bestNote_ = new QCPTextElement(plot_, QString());
    QFont noteFont = QApplication::font();
    noteFont.setPointSizeF(std::max(7.0, noteFont.pointSizeF() * 0.9));
    bestNote_->setFont(noteFont);
    bestNote_->setMargins(QMargins(4, 2, 4, 3));  // room below for the underscore's descent
    plot_->plotLayout()->addElement(0, 0, bestNote_);
    plot_->plotLayout()->setRowStretchFactor(0, 0.001);
    // A short panel (a 1280 x 800 screen) has plots shorter than their axis labels, which then
    // ran into each other, and no room for the note's second line: shorter words there.
    connect(plot_, &QCustomPlot::beforeReplot, this, [this] {
        const QFontMetrics metrics(gradientRect_->axis(QCPAxis::atLeft)->labelFont());
        const int height = gradientRect_->rect().height();  // 0 before the first layout: not short
        const bool shortPlots = height > 0 && height < metrics.horizontalAdvance(tr("gradient norm |∇f|")) + 8;
        gradientRect_->axis(QCPAxis::atLeft)->setLabel(shortPlots ? tr("|∇f|") : tr("gradient norm |∇f|"));
        const QString note = shortPlots ? bestShort_ : bestLong_;
        if (bestNote_->text() != note) bestNote_->setText(note);
    });

    auto* row = new QHBoxLayout;
    row->setContentsMargins(4, 0, 4, 2);
    auto* label = new QLabel(tr("Horizontal axis:"), this);
    axisChoice_ = new QComboBox(this);
    axisChoice_->addItem(tr("iteration"));
    axisChoice_->addItem(tr("evaluations (value + gradient + Hessian)"));
    // The choice may shrink so the panel can be docked narrow.
    axisChoice_->setSizeAdjustPolicy(QComboBox::AdjustToMinimumContentsLengthWithIcon);
    axisChoice_->setMinimumContentsLength(8);
    axisChoice_->setToolTip(tr("Plot progress against iterations, or against the work spent in evaluations"));
    label->setBuddy(axisChoice_);
    row->addWidget(label);
    row->addWidget(axisChoice_);
    row->addStretch(1);
    layout_->addLayout(row);
    connect(axisChoice_, qOverload<int>(&QComboBox::currentIndexChanged), this,
            [this](int index) { setAgainstEvaluations(index == 1); });
    applyPlotStyle(plot_);
    rebuild();
}

QString ProgressView::bestNoteText() const { return bestNote_->text(); }

void ProgressView::setAgainstEvaluations(bool on) {
    if (on == againstEvaluations_) return;
    againstEvaluations_ = on;
    {
        const QSignalBlocker block(axisChoice_);
        axisChoice_->setCurrentIndex(on ? 1 : 0);
    }
    rebuild();
    emit againstEvaluationsChanged(on);
}

QCPGraph* ProgressView::gapGraph(int track) const {
    if (track < 0 || track >= static_cast<int>(gapGraphs_.size())) return nullptr;
    return gapGraphs_[static_cast<std::size_t>(track)];
}

QCPGraph* ProgressView::gradientGraph(int track) const {
    if (track < 0 || track >= static_cast<int>(gradientGraphs_.size())) return nullptr;
    return gradientGraphs_[static_cast<std::size_t>(track)];
}

QPointF ProgressView::highlightPosition() const {
    if (!gapHighlight_ || !gapHighlight_->visible() || gapHighlight_->data()->isEmpty())
        return QPointF(std::nan(""), std::nan(""));
    const auto it = gapHighlight_->data()->constBegin();
    return QPointF(it->key, it->value);
}

double ProgressView::xOf(const solve::IterationRecord& record) const {
    return againstEvaluations_ ? static_cast<double>(record.evaluations.total()) : record.iteration;
}

double ProgressView::gapOf(double value) const {
    if (!std::isfinite(value)) return std::nan("");
    const double gap = value - best_;
    return gap > floor_ ? gap : floor_;
}

void ProgressView::rebuild() {
    plot_->clearPlottables();
    gapGraphs_.clear();
    gradientGraphs_.clear();
    pickPoints_.clear();
    gapHighlight_ = gradientHighlight_ = nullptr;
    applyPlotStyle(plot_);
    QCPAxis* gx = gapRect_->axis(QCPAxis::atBottom);
    QCPAxis* gy = gapRect_->axis(QCPAxis::atLeft);
    QCPAxis* dx = gradientRect_->axis(QCPAxis::atBottom);
    QCPAxis* dy = gradientRect_->axis(QCPAxis::atLeft);
    dx->setLabel(againstEvaluations_ ? tr("evaluations (value + gradient + Hessian, cumulative)") : tr("iteration"));

    // f_best: the lowest finite f seen by any track. A gap of zero cannot sit on a log axis,
    // so gaps at or below the floor (a tenth of the smallest positive gap) are drawn on it.
    best_ = std::numeric_limits<double>::infinity();
    double smallestGap = std::numeric_limits<double>::infinity();
    double smallestGradient = std::numeric_limits<double>::infinity();
    if (snapshot_) {
        for (const RunTrack& track : snapshot_->tracks)
            if (track.run)
                for (const auto& record : track.run->trace)
                    if (std::isfinite(record.value)) best_ = std::min(best_, record.value);
        for (const RunTrack& track : snapshot_->tracks)
            if (track.run)
                for (const auto& record : track.run->trace) {
                    const double gap = record.value - best_;
                    if (std::isfinite(gap) && gap > 0) smallestGap = std::min(smallestGap, gap);
                    if (std::isfinite(record.gradientNorm) && record.gradientNorm > 0)
                        smallestGradient = std::min(smallestGradient, record.gradientNorm);
                }
    }
    const bool anyValue = std::isfinite(best_);
    if (!anyValue) best_ = 0;
    floor_ = std::isfinite(smallestGap) ? smallestGap / 10 : 1e-16 * std::max(1.0, std::abs(best_));
    const double gradientFloor = std::isfinite(smallestGradient) ? smallestGradient / 10 : 1e-16;
    gy->setLabel(tr("f − f_best"));
    bestLong_ = tr("f_best = %1, the lowest f any run reached\nruns at f_best are drawn at %2 (a log axis has no 0)")
                    .arg(formatNumber(best_), formatNumber(floor_, 2));
    bestShort_ = tr("f_best = %1, the lowest f reached; runs at it are drawn at %2").arg(formatNumber(best_), formatNumber(floor_, 2));
    if (!anyValue) bestLong_ = bestShort_ = tr("no run has reached a finite f yet");
    bestNote_->setText(bestLong_);

    double xMax = 1;
    double gLo = std::numeric_limits<double>::infinity(), gHi = 0, dLo = gLo, dHi = 0;
    if (snapshot_) {
        for (std::size_t t = 0; t < snapshot_->tracks.size(); ++t) {
            const RunTrack& track = snapshot_->tracks[t];
            auto* gap = plot_->addGraph(gx, gy);
            auto* gradient = plot_->addGraph(dx, dy);
            for (QCPGraph* graph : {gap, gradient}) {
                QPen pen(trackColour(track), 1.6);
                scaleForScreen(pen);
                graph->setPen(pen);
                graph->setScatterStyle(iterateStyle(track.marker, trackColour(track), 5));
                graph->setSelectable(QCP::stNone);
            }
            gap->setName(track.label);
            gradient->removeFromLegend();
            if (track.run) {
                for (std::size_t k = 0; k < track.run->trace.size(); ++k) {
                    const auto& record = track.run->trace[k];
                    const double x = xOf(record);
                    const double g = gapOf(record.value);
                    const double d = std::isfinite(record.gradientNorm)
                                         ? std::max(record.gradientNorm, gradientFloor)
                                         : std::nan("");
                    gap->addData(x, g);
                    gradient->addData(x, d);
                    xMax = std::max(xMax, x);
                    if (std::isfinite(g)) gLo = std::min(gLo, g), gHi = std::max(gHi, g);
                    if (std::isfinite(d)) dLo = std::min(dLo, d), dHi = std::max(dHi, d);
                    const Selection selection{static_cast<int>(t), static_cast<int>(k)};
                    pickPoints_.push_back(PickPoint{gx, gy, x, g, selection});
                    pickPoints_.push_back(PickPoint{dx, dy, x, d, selection});
                }
            }
            gapGraphs_.push_back(gap);
            gradientGraphs_.push_back(gradient);
        }
    }
    gx->setRange(againstEvaluations_ ? 0 : -0.5, xMax * 1.03 + 0.5);
    gy->setRange(std::isfinite(gLo) ? QCPRange(gLo / 3, gHi * 3) : QCPRange(1e-3, 1e3));
    dy->setRange(std::isfinite(dLo) ? QCPRange(dLo / 3, dHi * 3) : QCPRange(1e-3, 1e3));

    gapHighlight_ = plot_->addGraph(gx, gy);
    gradientHighlight_ = plot_->addGraph(dx, dy);
    for (QCPGraph* graph : {gapHighlight_, gradientHighlight_})
        styleAsSelectionRing(graph, palette().color(QPalette::Highlight));
    updateHighlight();
    queueReplot();
}

void ProgressView::selectionChanged() {
    updateHighlight();
    queueReplot();
}

void ProgressView::updateHighlight() {
    if (!gapHighlight_) return;
    gapHighlight_->data()->clear();
    gradientHighlight_->data()->clear();
    const solve::IterationRecord* record = selectedRecord();
    const int t = selection_.track, k = selection_.iteration;
    const bool shown = record && t < static_cast<int>(gapGraphs_.size()) &&
                       k < gapGraphs_[static_cast<std::size_t>(t)]->data()->size();
    gapHighlight_->setVisible(shown);
    gradientHighlight_->setVisible(shown);
    if (!shown) return;
    // The graphs hold one point per record, in order, so the record's index finds its point.
    const auto gap = gapGraphs_[static_cast<std::size_t>(t)]->data()->at(k);
    const auto gradient = gradientGraphs_[static_cast<std::size_t>(t)]->data()->at(k);
    gapHighlight_->addData(gap->key, gap->value);
    gradientHighlight_->addData(gradient->key, gradient->value);
}

}  // namespace sw::widgets
