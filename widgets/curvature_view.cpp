#include "widgets/curvature_view.h"
#include "widgets/elided_label.h"

#include <QLabel>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

namespace sw::widgets {

namespace {
constexpr int kMostEigenvaluesDrawn = 6;  // above this only the smallest and largest are drawn
QColor negativeBandColour() { return QColor(0xd5, 0x5e, 0x00); }
}  // namespace

CurvatureView::CurvatureView(QWidget* parent) : PlotView(parent) {
    setObjectName(QStringLiteral("curvatureView"));
    eigenRect_ = plot_->axisRect();
    conditionRect_ = new QCPAxisRect(plot_);
    plot_->plotLayout()->addElement(1, 0, conditionRect_);
    plot_->plotLayout()->setRowStretchFactor(0, 1.6);
    plot_->plotLayout()->setRowStretchFactor(1, 1.0);
    auto* group = new QCPMarginGroup(plot_);
    eigenRect_->setMarginGroup(QCP::msLeft | QCP::msRight, group);
    conditionRect_->setMarginGroup(QCP::msLeft | QCP::msRight, group);
    conditionRect_->axis(QCPAxis::atLeft)->setScaleType(QCPAxis::stLogarithmic);
    conditionRect_->axis(QCPAxis::atLeft)->setTicker(QSharedPointer<QCPAxisTickerLog>(new QCPAxisTickerLog));
    // Axis titles stay short enough to fit along short panels (a rotated title longer than its
    // panel was cut off and ran into the other panel's); the caption above says the rest.
    conditionRect_->axis(QCPAxis::atLeft)->setLabel(tr("cond(H)"));
    conditionRect_->axis(QCPAxis::atBottom)->setLabel(tr("iteration"));
    eigenRect_->axis(QCPAxis::atBottom)->setLabel(QString());
    connect(eigenRect_->axis(QCPAxis::atBottom), qOverload<const QCPRange&>(&QCPAxis::rangeChanged),
            conditionRect_->axis(QCPAxis::atBottom), qOverload<const QCPRange&>(&QCPAxis::setRange));

    caption_ = new ElidedLabel(this);
    caption_->setObjectName(QStringLiteral("curvatureCaption"));
    caption_->setContentsMargins(4, 2, 4, 0);
    layout_->insertWidget(0, caption_);

    auto* legendRow = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(2, 0, legendRow);
    plot_->plotLayout()->setRowStretchFactor(2, 0.001);
    legendRow->setMargins(QMargins(4, 0, 4, 4));
    legendRow->addElement(0, 0, plot_->legend);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setWrap(3);
    plot_->legend->setVisible(true);
    enableLegendReflow(3, {}, 110);  // names elided (full name as a tooltip): fewer rows, taller plots
    enableTickThinning();
    applyPlotStyle(plot_);
    rebuild();
}

std::vector<QCPGraph*> CurvatureView::eigenvalueGraphs(int track) const {
    if (track < 0 || track >= static_cast<int>(eigenGraphs_.size())) return {};
    return eigenGraphs_[static_cast<std::size_t>(track)];
}

QCPGraph* CurvatureView::conditionGraph(int track) const {
    if (track < 0 || track >= static_cast<int>(conditionGraphs_.size())) return nullptr;
    return conditionGraphs_[static_cast<std::size_t>(track)];
}

QString CurvatureView::caption() const { return caption_->fullText(); }

QPointF CurvatureView::highlightPosition() const {
    if (!highlight_ || !highlight_->visible() || highlight_->data()->isEmpty()) return QPointF(std::nan(""), std::nan(""));
    const auto it = highlight_->data()->constBegin();
    return QPointF(it->key, it->value);
}

void CurvatureView::rebuild() {
    plot_->clearPlottables();
    plot_->clearItems();
    eigenGraphs_.clear();
    conditionGraphs_.clear();
    pickPoints_.clear();
    highlight_ = conditionHighlight_ = nullptr;
    negativeCount_ = 0;
    applyPlotStyle(plot_);
    QCPAxis* ex = eigenRect_->axis(QCPAxis::atBottom);
    QCPAxis* ey = eigenRect_->axis(QCPAxis::atLeft);
    QCPAxis* cx = conditionRect_->axis(QCPAxis::atBottom);
    QCPAxis* cy = conditionRect_->axis(QCPAxis::atLeft);

    // Spectra of every track (records' eigenvalues where stored, else from the exact Hessian).
    std::vector<std::vector<analyze::SpectrumPoint>> spectra;
    double smallest = std::numeric_limits<double>::infinity(), largest = 0;
    int lastIteration = 1;
    if (snapshot_) {
        for (const RunTrack& track : snapshot_->tracks) {
            spectra.push_back(track.run ? analyze::spectrumAlong(*track.run, snapshot_->objective.get())
                                        : std::vector<analyze::SpectrumPoint>{});
            for (const analyze::SpectrumPoint& point : spectra.back()) {
                lastIteration = std::max(lastIteration, point.iteration);
                for (Eigen::Index i = 0; i < point.eigenvalues.size(); ++i) {
                    const double a = std::abs(point.eigenvalues[i]);
                    if (!std::isfinite(a)) continue;
                    largest = std::max(largest, a);
                    if (a > 0) smallest = std::min(smallest, a);
                }
            }
        }
    }
    // Linear zone: the decade of the smallest non-zero |lambda|, but no more than 8 decades
    // below the largest, so tiny round-off eigenvalues do not stretch the axis.
    c_ = 1.0;
    if (largest > 0 && std::isfinite(smallest)) {
        c_ = std::pow(10.0, std::floor(std::log10(std::max(smallest, largest * 1e-8))));
    }
    ey->setTicker(symmetricLogTicker(c_));
    ey->setLabel(tr("λ"));
    caption_->setFullText(tr("Top: the Hessian's eigenvalues λ at each iteration, on a symmetric log scale (linear for "
                         "|λ| < %1). Bottom: the condition number cond(H) = |λ|max / |λ|min.")
                          .arg(formatNumber(c_)));

    // Shaded band for negative curvature.
    auto* band = new QCPItemRect(plot_);
    band->setClipAxisRect(eigenRect_);
    band->topLeft->setAxes(ex, ey);
    band->bottomRight->setAxes(ex, ey);
    band->topLeft->setAxisRect(eigenRect_);
    band->bottomRight->setAxisRect(eigenRect_);
    band->topLeft->setTypeX(QCPItemPosition::ptAxisRectRatio);
    band->topLeft->setTypeY(QCPItemPosition::ptPlotCoords);
    band->bottomRight->setTypeX(QCPItemPosition::ptAxisRectRatio);
    band->bottomRight->setTypeY(QCPItemPosition::ptAxisRectRatio);
    band->topLeft->setCoords(0, 0);
    band->bottomRight->setCoords(1, 1);
    QColor bandFill = negativeBandColour();
    bandFill.setAlpha(isDarkPalette(palette()) ? 45 : 28);
    band->setBrush(QBrush(bandFill));
    band->setPen(Qt::NoPen);
    band->setLayer(QStringLiteral("grid"));
    band->setSelectable(false);
    auto* bandLabel = new QCPItemText(plot_);
    bandLabel->setClipAxisRect(eigenRect_);
    bandLabel->position->setAxes(ex, ey);
    bandLabel->position->setAxisRect(eigenRect_);
    bandLabel->position->setType(QCPItemPosition::ptAxisRectRatio);
    bandLabel->position->setCoords(0.01, 0.99);
    bandLabel->setPositionAlignment(Qt::AlignLeft | Qt::AlignBottom);
    bandLabel->setText(tr("negative curvature"));
    bandLabel->setColor(negativeBandColour());
    bandLabel->setSelectable(false);

    double yLo = 0, yHi = 0;
    double cLo = std::numeric_limits<double>::infinity(), cHi = 0;
    if (snapshot_) {
        for (std::size_t t = 0; t < snapshot_->tracks.size(); ++t) {
            const RunTrack& track = snapshot_->tracks[t];
            const auto& spectrum = spectra[t];
            int n = 0;
            for (const auto& point : spectrum) n = std::max(n, static_cast<int>(point.eigenvalues.size()));
            std::vector<int> indices;
            if (n <= kMostEigenvaluesDrawn)
                for (int i = 0; i < n; ++i) indices.push_back(i);
            else
                indices = {0, n - 1};
            std::vector<QCPGraph*> graphs;
            for (std::size_t k = 0; k < indices.size(); ++k) {
                auto* graph = plot_->addGraph(ex, ey);
                QPen pen(trackColour(track), 1.5, k == 0 ? Qt::SolidLine : Qt::DashLine);
                scaleForScreen(pen);
                graph->setPen(pen);
                graph->setScatterStyle(iterateStyle(track.marker, trackColour(track), 5));
                graph->setSelectable(QCP::stNone);
                if (k == 0)
                    graph->setName(n > kMostEigenvaluesDrawn ? tr("%1 (λmin solid, λmax dashed)").arg(track.label)
                                                             : track.label);
                else
                    graph->removeFromLegend();
                graphs.push_back(graph);
            }
            auto* negative = plot_->addGraph(ex, ey);
            negative->setLineStyle(QCPGraph::lsNone);
            QPen outline(negativeBandColour().darker(140), 1.6);
            scaleForScreen(outline);
            negative->setScatterStyle(QCPScatterStyle(scatterShape(track.marker), outline, QBrush(trackColour(track)), 9));
            negative->removeFromLegend();
            negative->setSelectable(QCP::stNone);

            auto* condition = plot_->addGraph(cx, cy);
            QPen cpen(trackColour(track), 1.5);
            scaleForScreen(cpen);
            condition->setPen(cpen);
            condition->setScatterStyle(iterateStyle(track.marker, trackColour(track), 5));
            condition->removeFromLegend();
            condition->setSelectable(QCP::stNone);

            for (const auto& point : spectrum) {
                const double k = point.iteration;
                for (std::size_t j = 0; j < indices.size(); ++j) {
                    const int i = indices[j];
                    const double lambda = i < point.eigenvalues.size() ? point.eigenvalues[i] : std::nan("");
                    const double y = std::isfinite(lambda) ? symmetricLog(lambda, c_) : std::nan("");
                    graphs[j]->addData(k, y);
                    if (std::isfinite(y)) {
                        yLo = std::min(yLo, y);
                        yHi = std::max(yHi, y);
                    }
                    if (lambda < 0 && point.negativeCurvature) negative->addData(k, y);
                }
                if (point.negativeCurvature) ++negativeCount_;
                const double cond = point.conditionNumber;
                condition->addData(k, std::isfinite(cond) && cond > 0 ? cond : std::nan(""));
                if (std::isfinite(cond) && cond > 0) {
                    cLo = std::min(cLo, cond);
                    cHi = std::max(cHi, cond);
                }
                if (point.eigenvalues.size() > 0) {
                    pickPoints_.push_back(PickPoint{ex, ey, k, symmetricLog(point.eigenvalues[0], c_),
                                                    Selection{static_cast<int>(t), point.iteration}});
                    if (std::isfinite(cond) && cond > 0)
                        pickPoints_.push_back(PickPoint{cx, cy, k, cond, Selection{static_cast<int>(t), point.iteration}});
                }
            }
            eigenGraphs_.push_back(graphs);
            conditionGraphs_.push_back(condition);
        }
    }
    if (negativeCount_ > 0) {
        auto* key = plot_->addGraph(ex, ey);
        key->setLineStyle(QCPGraph::lsNone);
        QPen outline(negativeBandColour().darker(140), 1.6);
        key->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, outline,
                                             QBrush(palette().color(QPalette::WindowText)), 9));
        key->setName(tr("iterate with negative curvature"));
        key->setSelectable(QCP::stNone);
    }

    ex->setRange(-0.5, lastIteration + 0.5);
    const double pad = std::max(0.3, 0.08 * (yHi - yLo));
    ey->setRange(std::min(yLo, 0.0) - pad, std::max(yHi, 0.0) + pad);
    if (cHi > 0 && std::isfinite(cLo))
        cy->setRange(cLo / 2, cHi * 2);
    else
        cy->setRange(1, 10);

    highlight_ = plot_->addGraph(ex, ey);
    conditionHighlight_ = plot_->addGraph(cx, cy);
    for (QCPGraph* graph : {highlight_, conditionHighlight_})
        styleAsSelectionRing(graph, palette().color(QPalette::Highlight));
    updateHighlight();
    queueReplot();
}

void CurvatureView::selectionChanged() {
    updateHighlight();
    queueReplot();
}

void CurvatureView::updateHighlight() {
    if (!highlight_) return;
    highlight_->data()->clear();
    conditionHighlight_->data()->clear();
    highlight_->setVisible(false);
    conditionHighlight_->setVisible(false);
    const int t = selection_.track;
    if (!selection_.valid() || t >= static_cast<int>(eigenGraphs_.size())) return;
    const auto& graphs = eigenGraphs_[static_cast<std::size_t>(t)];
    if (!graphs.empty()) {
        const auto it = graphs.front()->data()->findBegin(selection_.iteration, false);
        if (it != graphs.front()->data()->constEnd() && it->key == selection_.iteration && std::isfinite(it->value)) {
            highlight_->addData(it->key, it->value);
            highlight_->setVisible(true);
        }
    }
    QCPGraph* condition = conditionGraphs_[static_cast<std::size_t>(t)];
    const auto it = condition->data()->findBegin(selection_.iteration, false);
    if (it != condition->data()->constEnd() && it->key == selection_.iteration && std::isfinite(it->value)) {
        conditionHighlight_->addData(it->key, it->value);
        conditionHighlight_->setVisible(true);
    }
}

}  // namespace sw::widgets
