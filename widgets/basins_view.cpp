#include "widgets/basins_view.h"

#include "core/survey/picture.h"
#include "widgets/critical_overlay.h"

#include <QLabel>
#include <QMouseEvent>
#include <QVBoxLayout>
#include <cmath>

namespace sw::widgets {

namespace {

QColor toQColor(survey::Rgb c) { return QColor(c.r, c.g, c.b); }

// "saddle 1 #5 (valve_a=-0.126, valve_b=-0.993)" for the readout; the legend's short form
// drops the names: "#5 saddle 1 (-0.126, -0.993)".
QString pointName(const survey::BasinSurvey& s, std::size_t k, bool brief = false) {
    const survey::CriticalPoint& p = s.map.points[k];
    QString text = QStringLiteral("#%1 %2").arg(k).arg(QString::fromUtf8(survey::kindWords(p)));
    if (p.kind == solve::PointKind::Saddle) text += QStringLiteral(" %1").arg(p.index);
    if (p.continuum) text += QObject::tr(" (set of %1)").arg(p.members);
    QStringList coordinates;
    for (int i : {s.region.xVariable, s.region.yVariable}) {
        const QString value = formatNumber(std::abs(p.x[i]) < 1e-12 ? 0.0 : p.x[i], 3);
        coordinates << (brief ? value
                              : QStringLiteral("%1=%2").arg(QString::fromStdString(s.variables[static_cast<std::size_t>(i)]),
                                                            value));
    }
    return text + QStringLiteral(" (") + coordinates.join(QStringLiteral(", ")) + QStringLiteral(")");
}

QString outcomeText(int code) {
    switch (code) {
        case survey::kCellLimit:
            return QObject::tr("limit: iteration or evaluation limit");
        case survey::kCellDiverged:
            return QObject::tr("diverged: not finite, or far away");
        case survey::kCellFailed:
            return QObject::tr("failed: broke down or stalled");
        case survey::kCellOutside:
            return QObject::tr("outside: a critical point outside the box");
        default:
            return QObject::tr("not run (cancelled)");
    }
}

}  // namespace

BasinsView::BasinsView(QWidget* parent) : PlotView(parent) {
    setObjectName(QStringLiteral("basinsView"));
    QCPAxisRect* first = plot_->axisRect();
    first->insetLayout()->take(plot_->legend);
    plot_->plotLayout()->take(first);
    plot_->plotLayout()->simplify();
    titleRow_ = new QCPLayoutGrid;
    panelRow_ = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(0, 0, titleRow_);
    plot_->plotLayout()->addElement(1, 0, panelRow_);
    plot_->plotLayout()->addElement(2, 0, plot_->legend);
    // An empty row takes the height the maps cannot use, so they stay about square.
    plot_->plotLayout()->addElement(3, 0, new QCPLayoutElement(plot_));
    plot_->plotLayout()->setRowStretchFactor(0, 0.001);
    plot_->plotLayout()->setRowStretchFactor(2, 0.001);
    plot_->plotLayout()->setRowSpacing(2);
    panelRow_->setColumnSpacing(14);
    panelRow_->addElement(0, 0, first);
    panels_.push_back(first);
    plot_->legend->setVisible(true);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setWrap(3);
    plot_->legend->setMargins(QMargins(4, 2, 4, 2));
    enableLegendReflow(3);
    connect(plot_, &QCustomPlot::beforeReplot, this, [this] {
        const int count = panelCount();
        const int width = plot_->viewport().width();
        if (count < 1 || width <= 0) return;
        // An axis rect's outer height including the bottom axis about equals its inner width
        // plus the left axis: a panel as tall as its share of the width is near square.
        const int share = (width - panelRow_->columnSpacing() * (count - 1)) / count;
        panelRow_->setMaximumSize(QWIDGETSIZE_MAX, std::max(160, share));
    });

    readout_ = new QLabel(this);
    readout_->setObjectName(QStringLiteral("basinsReadout"));
    readout_->setWordWrap(true);
    readout_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    readout_->setToolTip(tr("Where the run from the cell under the cursor ends; click a cell to run the methods from it"));
    readout_->setText(tr("Move the cursor over a map to see where its run ends; click to run the methods from there."));
    layout_->addWidget(readout_);
    plot_->setMouseTracking(true);
    plot_->installEventFilter(this);
    rebuild();
}

QCPAxisRect* BasinsView::panel(int index) const {
    return index >= 0 && index < panelCount() ? panels_[static_cast<std::size_t>(index)] : nullptr;
}

void BasinsView::setSurvey(std::shared_ptr<const survey::BasinSurvey> s) {
    survey_ = std::move(s);
    rebuild();
}

void BasinsView::setMessage(const QString& message) {
    message_ = message;
    rebuild();
}

void BasinsView::ensurePanels(int count) {
    count = std::max(1, count);
    while (panelCount() < count) {
        auto* rect = new QCPAxisRect(plot_);
        panelRow_->addElement(0, panelCount(), rect);
        panels_.push_back(rect);
    }
    while (panelCount() > count) {
        panelRow_->remove(panels_.back());
        panels_.pop_back();
    }
    panelRow_->simplify();
    while (static_cast<int>(titles_.size()) < count) {
        auto* title = new QCPTextElement(plot_);
        titleRow_->addElement(0, static_cast<int>(titles_.size()), title);
        titles_.push_back(title);
    }
    while (static_cast<int>(titles_.size()) > count) {
        titleRow_->remove(titles_.back());
        titles_.pop_back();
    }
    titleRow_->simplify();
    for (QCPAxisRect* rect : panels_) {
        rect->axis(QCPAxis::atRight)->setVisible(false);
        rect->axis(QCPAxis::atTop)->setVisible(false);
        rect->setMinimumSize(140, 140);
        // Narrow panels: few ticks, so the labels never run into each other.
        rect->axis(QCPAxis::atBottom)->ticker()->setTickCount(3);
        rect->axis(QCPAxis::atLeft)->ticker()->setTickCount(4);
    }
}

void BasinsView::rebuild() {
    plot_->clearPlottables();
    plot_->clearItems();
    const bool any = survey_ && !survey_->maps.empty() && survey_->grid > 0;
    ensurePanels(any ? static_cast<int>(survey_->maps.size()) : 1);
    applyPlotStyle(plot_);
    const QColor text = palette().color(QPalette::WindowText);
    QFont titleFont = font();
    titleFont.setBold(true);
    for (QCPTextElement* title : titles_) {
        title->setTextColor(text);
        title->setFont(titleFont);
    }
    if (!any) {
        titles_[0]->setText(!message_.isEmpty() ? message_ : tr("No basin maps yet: tick methods and switch on “Show basin maps”"));
        titles_[0]->setFont(font());
        panels_[0]->axis(QCPAxis::atBottom)->setRange(0, 1);
        panels_[0]->axis(QCPAxis::atLeft)->setRange(0, 1);
        queueReplot();
        return;
    }
    const survey::BasinSurvey& s = *survey_;
    const int xv = s.region.xVariable, yv = s.region.yVariable;
    const double x0 = s.region.lower[xv], x1 = s.region.upper[xv], y0 = s.region.lower[yv], y1 = s.region.upper[yv];
    for (std::size_t m = 0; m < s.maps.size(); ++m) {
        QCPAxisRect* rect = panels_[m];
        QCPAxis* xAxis = rect->axis(QCPAxis::atBottom);
        QCPAxis* yAxis = rect->axis(QCPAxis::atLeft);
        xAxis->setRange(x0, x1);
        yAxis->setRange(y0, y1);
        xAxis->setLabel(QString::fromStdString(s.variables[static_cast<std::size_t>(xv)]));
        yAxis->setLabel(m == 0 ? QString::fromStdString(s.variables[static_cast<std::size_t>(yv)]) : QString());
        const survey::Image image = survey::basinImage(s, m);
        const QImage picture(image.rgb.data(), image.width, image.height, image.width * 3, QImage::Format_RGB888);
        auto* pixmap = new QCPItemPixmap(plot_);
        pixmap->setClipAxisRect(rect);
        pixmap->setClipToAxisRect(true);
        pixmap->topLeft->setAxes(xAxis, yAxis);
        pixmap->bottomRight->setAxes(xAxis, yAxis);
        pixmap->topLeft->setCoords(x0, y1);
        pixmap->bottomRight->setCoords(x1, y0);
        pixmap->setScaled(true, Qt::IgnoreAspectRatio, Qt::FastTransformation);
        pixmap->setPixmap(QPixmap::fromImage(picture.copy()));
        pixmap->setSelectable(false);
        // The critical points, with the landscape's markers.
        std::map<solve::PointKind, std::pair<QVector<double>, QVector<double>>> byKind;
        for (const survey::CriticalPoint& p : s.map.points) {
            byKind[p.kind].first << p.x[xv];
            byKind[p.kind].second << p.x[yv];
        }
        for (const auto& [kind, xy] : byKind) {
            auto* curve = new QCPCurve(xAxis, yAxis);
            curve->setLineStyle(QCPCurve::lsNone);
            curve->setScatterStyle(criticalPointStyle(kind, 10));
            curve->setData(xy.first, xy.second);
            curve->removeFromLegend();
            curve->setSelectable(QCP::stNone);
        }
        long iterations = 0;
        for (int it : s.maps[m].iterations) iterations += it;
        titles_[m]->setText(QString::fromStdString(s.maps[m].method.label) + QStringLiteral("\n") +
                            tr("mean %1 iterations")
                                .arg(formatNumber(static_cast<double>(iterations) / std::max<long>(1, s.maps[m].total()), 3)));
    }
    // One legend: the points in their basin colours and markers, then the other outcomes seen.
    QCPAxis* legendX = panels_[0]->axis(QCPAxis::atBottom);
    QCPAxis* legendY = panels_[0]->axis(QCPAxis::atLeft);
    for (std::size_t k = 0; k < s.map.points.size(); ++k) {
        auto* entry = new QCPGraph(legendX, legendY);
        entry->setLineStyle(QCPGraph::lsNone);
        entry->setScatterStyle(criticalPointStyle(s.map.points[k].kind, 11, toQColor(survey::pointColour(k))));
        entry->setName(pointName(s, k, true));
        entry->setSelectable(QCP::stNone);
    }
    for (int code : {survey::kCellLimit, survey::kCellDiverged, survey::kCellFailed, survey::kCellOutside,
                     survey::kCellNotRun}) {
        long seen = 0;
        for (const survey::BasinMap& m : s.maps)
            for (int c : m.cells) seen += c == code;
        if (seen == 0) continue;
        auto* entry = new QCPGraph(legendX, legendY);
        entry->setLineStyle(QCPGraph::lsNone);
        QPen pen(text, 1.0);
        scaleForScreen(pen);
        entry->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssSquare, pen, QBrush(toQColor(survey::codeColour(code))), 11));
        entry->setName(outcomeText(code));
        entry->setSelectable(QCP::stNone);
    }
    queueReplot();
}

bool BasinsView::cellAt(const QPointF& pixel, int& method, long& cell) const {
    if (!survey_ || survey_->maps.empty() || survey_->grid <= 0) return false;
    const survey::BasinSurvey& s = *survey_;
    for (std::size_t m = 0; m < s.maps.size() && m < panels_.size(); ++m) {
        QCPAxisRect* rect = panels_[m];
        if (!rect->rect().contains(pixel.toPoint())) continue;
        const int xv = s.region.xVariable, yv = s.region.yVariable;
        const double x = rect->axis(QCPAxis::atBottom)->pixelToCoord(pixel.x());
        const double y = rect->axis(QCPAxis::atLeft)->pixelToCoord(pixel.y());
        const int i = static_cast<int>(std::floor((x - s.region.lower[xv]) / s.region.width(xv) * s.grid));
        const int j = static_cast<int>(std::floor((y - s.region.lower[yv]) / s.region.width(yv) * s.grid));
        if (i < 0 || j < 0 || i >= s.grid || j >= s.grid) return false;
        method = static_cast<int>(m);
        cell = static_cast<long>(j) * s.grid + i;
        return true;
    }
    return false;
}

QString BasinsView::readoutAt(const QPointF& pixel) const {
    int m = 0;
    long cell = 0;
    if (!cellAt(pixel, m, cell)) return {};
    const survey::BasinSurvey& s = *survey_;
    const survey::BasinMap& map = s.maps[static_cast<std::size_t>(m)];
    const int i = static_cast<int>(cell % s.grid), j = static_cast<int>(cell / s.grid);
    const int code = map.cells[static_cast<std::size_t>(cell)];
    const QString where = QStringLiteral("%1 = %2, %3 = %4")
                              .arg(QString::fromStdString(s.variables[static_cast<std::size_t>(s.region.xVariable)]),
                                   formatNumber(s.cellX(i)),
                                   QString::fromStdString(s.variables[static_cast<std::size_t>(s.region.yVariable)]),
                                   formatNumber(s.cellY(j)));
    const QString ends = code >= 0 ? tr("ends at %1").arg(pointName(s, static_cast<std::size_t>(code))) : outcomeText(code);
    return tr("%1 from %2: %3 after %4 iterations")
        .arg(QString::fromStdString(map.method.label), where, ends)
        .arg(map.iterations[static_cast<std::size_t>(cell)]);
}

QString BasinsView::readoutText() const { return readout_->text(); }

bool BasinsView::eventFilter(QObject* watched, QEvent* event) {
    if (watched == plot_) {
        if (event->type() == QEvent::MouseMove) {
            const QString text = readoutAt(static_cast<QMouseEvent*>(event)->position());
            if (!text.isEmpty()) readout_->setText(text);
        } else if (event->type() == QEvent::MouseButtonPress) {
            pressPixel_ = static_cast<QMouseEvent*>(event)->position();
        } else if (event->type() == QEvent::MouseButtonRelease) {
            auto* mouse = static_cast<QMouseEvent*>(event);
            int m = 0;
            long cell = 0;
            if (mouse->button() == Qt::LeftButton && QLineF(pressPixel_, mouse->position()).length() <= 4.0 &&
                cellAt(mouse->position(), m, cell)) {
                Vector start = survey_->region.held;
                start[survey_->region.xVariable] = survey_->cellX(static_cast<int>(cell % survey_->grid));
                start[survey_->region.yVariable] = survey_->cellY(static_cast<int>(cell / survey_->grid));
                emit cellClicked(start);
            }
        }
    }
    return PlotView::eventFilter(watched, event);
}

}  // namespace sw::widgets
