#include "widgets/plot_style.h"

#include "core/solve/solver.h"
#include "widgets/theme.h"

#include <QEvent>
#include <QFileInfo>
#include <QGuiApplication>
#include <QHelpEvent>
#include <QSvgGenerator>
#include <QToolTip>
#include <QVBoxLayout>
#include <algorithm>
#include <array>
#include <cmath>

namespace sw::widgets {

void scaleForScreen(QPen& pen) {
    const double ratio = qGuiApp ? qGuiApp->devicePixelRatio() : 1.0;
    pen.setWidthF(pen.widthF() * ratio);
    pen.setCosmetic(true);
}

QCPScatterStyle::ScatterShape scatterShape(Marker marker) {
    switch (marker) {
    case Marker::Circle: return QCPScatterStyle::ssCircle;
    case Marker::Square: return QCPScatterStyle::ssSquare;
    case Marker::Triangle: return QCPScatterStyle::ssTriangle;
    case Marker::Diamond: return QCPScatterStyle::ssDiamond;
    case Marker::Cross: return QCPScatterStyle::ssCross;
    case Marker::Plus: return QCPScatterStyle::ssPlus;
    case Marker::Star: return QCPScatterStyle::ssStar;
    }
    return QCPScatterStyle::ssCircle;
}

QCPScatterStyle iterateStyle(Marker marker, const QColor& colour, double size) {
    // A pale tint of the track's colour inside a full-colour outline: the markers stay
    // visible where a dark colour meets the dark (low) end of the landscape's colour scale,
    // which is exactly where paths end, and the outline still tells the tracks apart.
    constexpr double tint = 0.55;  // share of white
    QColor fill = QColor::fromRgbF(static_cast<float>(colour.redF() + tint * (1.0 - colour.redF())),
                                   static_cast<float>(colour.greenF() + tint * (1.0 - colour.greenF())),
                                   static_cast<float>(colour.blueF() + tint * (1.0 - colour.blueF())));
    fill.setAlpha(230);
    QPen pen(colour, 1.3);
    scaleForScreen(pen);
    return QCPScatterStyle(scatterShape(marker), pen, QBrush(fill), size);
}

QCPScatterStyle endPointStyle(solve::PointKind kind, const QColor& colour, double size) {
    QPen pen(colour.darker(130), 2.0);
    scaleForScreen(pen);
    QColor pale = colour.lighter(170);
    switch (kind) {
    case solve::PointKind::Minimum: return QCPScatterStyle(QCPScatterStyle::ssCircle, pen, QBrush(colour), size);
    case solve::PointKind::Saddle:
        return QCPScatterStyle(QCPScatterStyle::ssCrossSquare, pen, QBrush(pale), size);
    case solve::PointKind::Maximum: return QCPScatterStyle(QCPScatterStyle::ssTriangle, pen, QBrush(pale), size);
    case solve::PointKind::Degenerate: return QCPScatterStyle(QCPScatterStyle::ssDiamond, pen, Qt::NoBrush, size);
    case solve::PointKind::NotCritical:
    case solve::PointKind::Unknown: break;
    }
    return QCPScatterStyle(QCPScatterStyle::ssCircle, pen, Qt::NoBrush, size);
}

void styleAsSelectionRing(QCPGraph* graph, const QColor& highlight, double size) {
    graph->setLineStyle(QCPGraph::lsNone);
    QPen pen(highlight, 2.4);
    scaleForScreen(pen);
    graph->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, pen, Qt::NoBrush, size));
    graph->removeFromLegend();
    graph->setSelectable(QCP::stNone);
}

QString endPointLabel(solve::PointKind kind) {
    switch (kind) {
    case solve::PointKind::Minimum: return QStringLiteral("ends at a local minimum");
    case solve::PointKind::Saddle: return QStringLiteral("ends at a saddle");
    case solve::PointKind::Maximum: return QStringLiteral("ends at a local maximum");
    case solve::PointKind::Degenerate: return QStringLiteral("ends at a degenerate point");
    case solve::PointKind::NotCritical: return QStringLiteral("ends where the gradient is not zero");
    case solve::PointKind::Unknown: break;
    }
    return QStringLiteral("stopped before converging");
}

QString stepDescription(const std::string& methodId, const solve::IterationRecord& record) {
    return QString::fromStdString(solve::stepKindWord(methodId, record));
}

bool isDarkPalette(const QPalette& palette) { return palette.color(QPalette::Window).lightness() < 128; }

namespace {
double relativeLuminance(const QColor& c) {
    auto channel = [](double v) { return v <= 0.04045 ? v / 12.92 : std::pow((v + 0.055) / 1.055, 2.4); };
    return 0.2126 * channel(c.redF()) + 0.7152 * channel(c.greenF()) + 0.0722 * channel(c.blueF());
}
}  // namespace

double contrastRatio(const QColor& a, const QColor& b) {
    const double la = relativeLuminance(a), lb = relativeLuminance(b);
    return (std::max(la, lb) + 0.05) / (std::min(la, lb) + 0.05);
}

QColor readableColour(const QColor& colour, const QColor& background) {
    constexpr double kWanted = 3.0;  // WCAG's minimum for graphical objects
    if (contrastRatio(colour, background) >= kWanted) return colour;
    // Mix toward white on a dark background, toward black on a light one, in small steps.
    const QColor toward = relativeLuminance(background) < 0.18 ? QColor(Qt::white) : QColor(Qt::black);
    QColor mixed = colour;
    for (int k = 1; k <= 20 && contrastRatio(mixed, background) < kWanted; ++k) {
        const double t = k / 20.0;
        mixed = QColor::fromRgbF(static_cast<float>(colour.redF() + t * (toward.redF() - colour.redF())),
                                 static_cast<float>(colour.greenF() + t * (toward.greenF() - colour.greenF())),
                                 static_cast<float>(colour.blueF() + t * (toward.blueF() - colour.blueF())));
    }
    mixed.setAlpha(colour.alpha());
    return mixed;
}

QPalette figurePalette() {
    QPalette p(QColor(0xf0, 0xf0, 0xf0));  // a neutral light palette derived from a light button colour
    p.setColor(QPalette::Window, Qt::white);
    p.setColor(QPalette::Base, Qt::white);
    p.setColor(QPalette::WindowText, QColor(0x20, 0x20, 0x20));
    p.setColor(QPalette::Text, QColor(0x20, 0x20, 0x20));
    p.setColor(QPalette::Highlight, QColor(0x1f, 0x5f, 0xbf));
    return p;
}

void raiseFontSizes(QCustomPlot* plot, double points) {
    auto raised = [points](QFont font) {
        if (font.pointSizeF() > 0) {
            if (font.pointSizeF() < points) font.setPointSizeF(points);
        } else {
            font.setPointSizeF(points);  // a pixel-sized font: give it a point size instead
        }
        return font;
    };
    std::vector<QCPAxis*> axes;
    for (QCPAxisRect* rect : plot->axisRects())
        for (QCPAxis* axis : rect->axes()) axes.push_back(axis);
    const QList<QCPLayoutElement*> elements = plot->plotLayout()->elements(true);
    for (QCPLayoutElement* element : elements) {
        if (auto* scale = qobject_cast<QCPColorScale*>(element)) axes.push_back(scale->axis());
        if (auto* text = qobject_cast<QCPTextElement*>(element)) text->setFont(raised(text->font()));
        if (auto* legend = qobject_cast<QCPLegend*>(element)) {
            legend->setFont(raised(legend->font()));
            for (int k = 0; k < legend->itemCount(); ++k)
                if (QCPAbstractLegendItem* item = legend->item(k)) item->setFont(raised(item->font()));
        }
    }
    for (QCPAxis* axis : axes) {
        axis->setLabelFont(raised(axis->labelFont()));
        axis->setTickLabelFont(raised(axis->tickLabelFont()));
    }
    for (int i = 0; i < plot->itemCount(); ++i)
        if (auto* text = qobject_cast<QCPItemText*>(plot->item(i))) text->setFont(raised(text->font()));
}

void styleAxisRect(QCPAxisRect* rect, const QPalette& palette) {
    const QColor text = palette.color(QPalette::WindowText);
    QColor grid = text;
    grid.setAlpha(isDarkPalette(palette) ? 45 : 35);
    QColor subGrid = text;
    subGrid.setAlpha(15);
    QFont labelFont = QApplication::font();
    QFont tickFont = labelFont;
    tickFont.setPointSizeF(std::max(7.0, labelFont.pointSizeF() * 0.9));
    for (QCPAxis* axis : rect->axes()) {
        axis->setBasePen(QPen(text, 1));
        axis->setTickPen(QPen(text, 1));
        axis->setSubTickPen(QPen(text, 1));
        axis->setLabelColor(text);
        axis->setTickLabelColor(text);
        axis->setLabelFont(labelFont);
        axis->setTickLabelFont(tickFont);
        axis->grid()->setPen(QPen(grid, 1, Qt::DotLine));
        axis->grid()->setSubGridPen(QPen(subGrid, 1, Qt::DotLine));
        axis->grid()->setZeroLinePen(QPen(grid, 1));
    }
    rect->setBackground(QBrush(palette.color(QPalette::Base)));
}

void applyPlotStyle(QCustomPlot* plot) {
    const QPalette palette = plot->palette();
    plot->setBackground(QBrush(palette.color(QPalette::Window)));
    for (QCPAxisRect* rect : plot->axisRects()) styleAxisRect(rect, palette);
    // A colour scale keeps its axis in an axis rect of its own that axisRects() does not list:
    // without this its title and ticks stay black on a dark window.
    for (QCPLayoutElement* element : plot->plotLayout()->elements(true))
        if (auto* scale = qobject_cast<QCPColorScale*>(element)) {
            const QColor text = palette.color(QPalette::WindowText);
            QCPAxis* axis = scale->axis();
            axis->setBasePen(QPen(text, 1));
            axis->setTickPen(QPen(text, 1));
            axis->setSubTickPen(QPen(text, 1));
            axis->setLabelColor(text);
            axis->setTickLabelColor(text);
            QFont labelFont = QApplication::font();
            QFont tickFont = labelFont;
            tickFont.setPointSizeF(std::max(7.0, labelFont.pointSizeF() * 0.9));
            axis->setLabelFont(labelFont);
            axis->setTickLabelFont(tickFont);
        }
    const QColor text = palette.color(QPalette::WindowText);
    QColor legendFill = palette.color(QPalette::Base);
    legendFill.setAlpha(215);
    plot->legend->setBrush(QBrush(legendFill));
    plot->legend->setBorderPen(QPen(text.lighter(isDarkPalette(palette) ? 80 : 200)));
    plot->legend->setTextColor(text);
    QFont legendFont = QApplication::font();
    legendFont.setPointSizeF(std::max(7.0, legendFont.pointSizeF() * 0.9));
    plot->legend->setFont(legendFont);
    for (int i = 0; i < plot->plotLayout()->elementCount(); ++i) {
        if (auto* title = qobject_cast<QCPTextElement*>(plot->plotLayout()->elementAt(i))) title->setTextColor(text);
    }
}

namespace {
// The landscape's colour scale, our own (scripts/colour_scale.py designs it and prints these
// stops). Sequential: CIE lightness L* rises evenly from the lowest f to the highest, and the
// hue turns from a deep evergreen through teal and blue to lilac and a pale blush, the other
// way round the hue circle from the common violet-teal-green-yellow scales. Stops are equally
// spaced in CIEDE2000 difference along the path, so equal steps in f look like equal steps in
// colour. The dark appearance uses the same path ending at L* 84 instead of 95, so the high
// walls of a landscape do not glare in a dark window.
//   light: L* 14 .. 95      dark: L* 12 .. 84
// tests/gui/theme_test.cpp checks monotone lightness and separation under simulated
// protanopia, deuteranopia and tritanopia (CIEDE2000 between tenths of the scale).
const std::array<QColor, 11>& gradientStops(bool dark) {
    static const std::array<QColor, 11> light = {
        QColor(0x1b, 0x26, 0x20), QColor(0x08, 0x3b, 0x33), QColor(0x01, 0x54, 0x5a), QColor(0x04, 0x6b, 0x83),
        QColor(0x04, 0x7f, 0xb2), QColor(0x4a, 0x8d, 0xd8), QColor(0x87, 0x96, 0xe2), QColor(0xb6, 0xa0, 0xe4),
        QColor(0xe1, 0xb1, 0xe1), QColor(0xfb, 0xcf, 0xe1), QColor(0xff, 0xec, 0xef)};
    static const std::array<QColor, 11> darkStops = {
        QColor(0x17, 0x22, 0x1c), QColor(0x02, 0x34, 0x2c), QColor(0x02, 0x4b, 0x51), QColor(0x03, 0x60, 0x78),
        QColor(0x02, 0x72, 0xa5), QColor(0x44, 0x7d, 0xc8), QColor(0x7a, 0x83, 0xcd), QColor(0xa5, 0x8b, 0xcd),
        QColor(0xc9, 0x9a, 0xc7), QColor(0xde, 0xb4, 0xc5), QColor(0xe0, 0xcd, 0xcf)};
    return dark ? darkStops : light;
}
}  // namespace

QCPColorGradient fieldGradient(bool dark) {
    QCPColorGradient gradient;
    gradient.clearColorStops();
    const auto& stops = gradientStops(dark);
    for (std::size_t i = 0; i < stops.size(); ++i)
        gradient.setColorStopAt(static_cast<double>(i) / static_cast<double>(stops.size() - 1), stops[i]);
    gradient.setColorInterpolation(QCPColorGradient::ciRGB);
    gradient.setLevelCount(350);
    gradient.setNanHandling(QCPColorGradient::nhNanColor);
    gradient.setNanColor(QColor(150, 150, 150));
    return gradient;
}

double fieldGradientLightness(double t, bool dark) {
    const auto& stops = gradientStops(dark);
    const double x = std::clamp(t, 0.0, 1.0) * static_cast<double>(stops.size() - 1);
    const std::size_t i = std::min(static_cast<std::size_t>(x), stops.size() - 2);
    const double u = x - static_cast<double>(i);
    return ((1 - u) * cielab(stops[i]).L + u * cielab(stops[i + 1]).L) / 100.0;
}

QString formatNumber(double value, int significantDigits) {
    if (std::isnan(value)) return QStringLiteral("nan");
    if (std::isinf(value)) return value > 0 ? QStringLiteral("inf") : QStringLiteral("-inf");
    if (value == 0) return QStringLiteral("0");
    return QString::number(value, 'g', significantDigits);
}

TransformTicker::TransformTicker(Map forward, Map inverse, Candidates candidates)
    : forward_(std::move(forward)), inverse_(std::move(inverse)), candidates_(std::move(candidates)) {}

QVector<double> TransformTicker::createTickVector(double /*tickStep*/, const QCPRange& range) {
    const double lo = inverse_(range.lower), hi = inverse_(range.upper);
    std::vector<double> ticks;
    for (double v : candidates_(std::min(lo, hi), std::max(lo, hi))) {
        const double t = forward_(v);
        if (std::isfinite(t) && t >= range.lower && t <= range.upper) ticks.push_back(t);
    }
    std::sort(ticks.begin(), ticks.end());
    ticks.erase(std::unique(ticks.begin(), ticks.end()), ticks.end());
    // Thin evenly (keeping zero when present) so labels do not collide.
    const int wanted = std::max(2, tickCount() + 1);
    if (static_cast<int>(ticks.size()) > wanted) {
        const int stride = static_cast<int>(std::ceil(static_cast<double>(ticks.size()) / wanted));
        std::size_t anchor = 0;
        for (std::size_t i = 0; i < ticks.size(); ++i)
            if (std::abs(ticks[i]) < 1e-12) anchor = i;
        std::vector<double> thinned;
        for (std::size_t i = 0; i < ticks.size(); ++i)
            if ((static_cast<long>(i) - static_cast<long>(anchor)) % stride == 0) thinned.push_back(ticks[i]);
        ticks = thinned;
    }
    return QVector<double>(ticks.begin(), ticks.end());
}

QString TransformTicker::getTickLabel(double tick, const QLocale& /*locale*/, QChar /*formatChar*/, int /*precision*/) {
    return formatNumber(inverse_(tick), 3);
}

int TransformTicker::getSubTickCount(double /*tickStep*/) { return 0; }

double symmetricLog(double value, double c) {
    return std::copysign(std::log10(1.0 + std::abs(value) / c), value);
}

double symmetricLogInverse(double transformed, double c) {
    return std::copysign(c * (std::pow(10.0, std::abs(transformed)) - 1.0), transformed);
}

QSharedPointer<TransformTicker> symmetricLogTicker(double c) {
    auto candidates = [c](double lo, double hi) {
        std::vector<double> values{0.0};
        const double top = std::max(std::abs(lo), std::abs(hi));
        if (!(top > 0) || !std::isfinite(top)) return values;
        const int kMin = static_cast<int>(std::floor(std::log10(c))) - 1;
        const int kMax = static_cast<int>(std::ceil(std::log10(top))) + 1;
        for (int k = kMin; k <= kMax; ++k) {
            for (double mantissa : {1.0, 2.0, 5.0}) {
                const double v = mantissa * std::pow(10.0, k);
                if (v < 0.5 * c) continue;  // inside the linear zone the decades crowd together
                if (v <= hi) values.push_back(v);
                if (-v >= lo) values.push_back(-v);
            }
        }
        return values;
    };
    return QSharedPointer<TransformTicker>(new TransformTicker([c](double v) { return symmetricLog(v, c); },
                                                               [c](double t) { return symmetricLogInverse(t, c); },
                                                               candidates));
}

bool exportPlot(QCustomPlot* plot, const QString& path, int w, int h, QString* error) {
    auto fail = [error](const QString& why) {
        if (error) *error = why;
        return false;
    };
    if (!plot) return fail(QStringLiteral("no plot to export"));
    if (w < 1 || w > 20000 || h < 1 || h > 20000)
        return fail(QStringLiteral("export size %1 x %2 is out of range: width and height must be 1..20000 pixels")
                        .arg(w)
                        .arg(h));
    const QString suffix = QFileInfo(path).suffix().toLower();
    bool ok = false;
    if (suffix == QLatin1String("png")) {
        ok = plot->savePng(path, w, h);
    } else if (suffix == QLatin1String("pdf")) {
        ok = plot->savePdf(path, w, h);
    } else if (suffix == QLatin1String("svg")) {
        QSvgGenerator generator;
        generator.setFileName(path);
        generator.setSize(QSize(w, h));
        generator.setViewBox(QRect(0, 0, w, h));
        generator.setTitle(QStringLiteral("Saddlewise plot"));
        QCPPainter painter;
        if (!painter.begin(&generator)) return fail(QStringLiteral("cannot write '%1'").arg(path));
        plot->toPainter(&painter, w, h);
        ok = painter.end();
    } else {
        return fail(QStringLiteral("unknown export format '.%1' for '%2': use .png, .svg or .pdf").arg(suffix, path));
    }
    if (!ok || QFileInfo(path).size() <= 0) return fail(QStringLiteral("cannot write '%1'").arg(path));
    if (error) error->clear();
    return true;
}

ElidedLegendItem::ElidedLegendItem(QCPLegend* legend, QCPAbstractPlottable* plottable)
    : QCPPlottableLegendItem(legend, plottable) {}

QString ElidedLegendItem::fullName() const { return mPlottable ? mPlottable->name() : QString(); }

QString ElidedLegendItem::shownName() const {
    const QString name = fullName();
    if (limit_ <= 0) return name;
    return QFontMetrics(getFont()).elidedText(name, Qt::ElideRight, limit_);
}

bool ElidedLegendItem::isElided() const { return shownName() != fullName(); }

// QCustomPlot draws and measures the plottable's name; for the few microseconds of drawing
// the name is swapped for its elided form (drawLegendIcon is not reachable from here, so the
// base class must do the drawing).
void ElidedLegendItem::draw(QCPPainter* painter) {
    if (!mPlottable || !isElided()) return QCPPlottableLegendItem::draw(painter);
    const QString full = mPlottable->name();
    mPlottable->setName(shownName());
    QCPPlottableLegendItem::draw(painter);
    mPlottable->setName(full);
}

QSize ElidedLegendItem::minimumOuterSizeHint() const {
    if (!mPlottable || !isElided()) return QCPPlottableLegendItem::minimumOuterSizeHint();
    const QString full = mPlottable->name();
    mPlottable->setName(shownName());
    const QSize size = QCPPlottableLegendItem::minimumOuterSizeHint();
    mPlottable->setName(full);
    return size;
}

void fitLegendToWidth(QCustomPlot* plot, int availableWidth, int maxColumns, int elidedColumnText) {
    QCPLegend* legend = plot->legend;
    // itemCount() counts the cells of the legend's grid; a cell past the last entry is empty.
    std::vector<QCPPlottableLegendItem*> entries;
    bool plain = false;
    for (int i = 0; i < legend->itemCount(); ++i) {
        auto* entry = qobject_cast<QCPPlottableLegendItem*>(legend->item(i));
        if (!entry) continue;
        entries.push_back(entry);
        if (!dynamic_cast<ElidedLegendItem*>(entry)) plain = true;
    }
    if (entries.empty()) return;
    std::vector<ElidedLegendItem*> items;
    if (plain) {
        std::vector<QCPAbstractPlottable*> plottables;
        for (QCPPlottableLegendItem* entry : entries) plottables.push_back(entry->plottable());
        legend->clearItems();
        for (QCPAbstractPlottable* p : plottables) {
            auto* item = new ElidedLegendItem(legend, p);
            legend->addItem(item);
            items.push_back(item);
        }
    } else {
        for (QCPPlottableLegendItem* entry : entries) items.push_back(static_cast<ElidedLegendItem*>(entry));
    }
    const int n = static_cast<int>(items.size());
    std::vector<int> widths;
    for (ElidedLegendItem* item : items) {
        item->setTextWidthLimit(0);
        widths.push_back(static_cast<QCPLayoutElement*>(item)->minimumOuterSizeHint().width());
    }
    const int room = availableWidth - legend->margins().left() - legend->margins().right();
    int columns = 1;
    auto decorationOf = [&](ElidedLegendItem* item) {
        return legend->iconSize().width() + legend->iconTextPadding() + item->margins().left() + item->margins().right();
    };
    for (int c = std::min(maxColumns, n); c >= 1; --c) {
        std::vector<int> columnWidth(static_cast<std::size_t>(c), 0);
        for (int i = 0; i < n; ++i)
            columnWidth[static_cast<std::size_t>(i % c)] =
                std::max(columnWidth[static_cast<std::size_t>(i % c)], widths[static_cast<std::size_t>(i)]);
        int total = (c - 1) * legend->columnSpacing();
        for (int w : columnWidth) total += w;
        if (total <= room) {
            columns = c;
            break;
        }
        // Too wide side by side: a compact legend keeps the columns and elides the names, as
        // long as each column keeps enough room to read them.
        const int perColumn = (room - (c - 1) * legend->columnSpacing()) / c;
        if (c > 1 && elidedColumnText > 0 && perColumn - decorationOf(items.front()) >= elidedColumnText) {
            columns = c;
            for (ElidedLegendItem* item : items) item->setTextWidthLimit(perColumn - decorationOf(item));
            break;
        }
        if (c == 1) {
            // One column is still too wide: elide each name to what is left beside its icon.
            for (ElidedLegendItem* item : items) item->setTextWidthLimit(std::max(24, room - decorationOf(item)));
            columns = 1;
        }
    }
    if (legend->wrap() != columns || plain) {
        legend->setWrap(columns);
        legend->setFillOrder(QCPLayoutGrid::foColumnsFirst, true);
    }
}

PlotView::PlotView(QWidget* parent) : QWidget(parent) {
    layout_ = new QVBoxLayout(this);
    layout_->setContentsMargins(0, 0, 0, 0);
    layout_->setSpacing(2);
    plot_ = new QCustomPlot(this);
    plot_->setMinimumSize(160, 120);
    plot_->setAntialiasedElements(QCP::aePlottables | QCP::aeItems | QCP::aeScatters);
    layout_->addWidget(plot_, 1);
    plot_->installEventFilter(this);
    connect(plot_, &QCustomPlot::mousePress, this, [this](QMouseEvent* event) { clickPressPixel_ = event->position(); });
    connect(plot_, &QCustomPlot::mouseRelease, this, [this](QMouseEvent* event) {
        if (event->button() != Qt::LeftButton || pickPoints_.empty()) return;
        if (QLineF(clickPressPixel_, event->position()).length() > 4.0) return;  // a drag, not a click
        const Selection hit = pickAt(event->position());
        if (hit.valid()) emit selectionRequested(hit);
    });
}

Selection PlotView::pickAt(const QPointF& pixel) const {
    Selection best;
    double bestDistance = 8.0;  // pixels
    for (const PickPoint& point : pickPoints_) {
        if (!point.xAxis || !point.yAxis || !std::isfinite(point.x) || !std::isfinite(point.y)) continue;
        const QPointF p(point.xAxis->coordToPixel(point.x), point.yAxis->coordToPixel(point.y));
        const double d = QLineF(p, pixel).length();
        if (d <= bestDistance) {
            bestDistance = d;
            best = point.selection;
        }
    }
    return best;
}

void PlotView::setSnapshot(std::shared_ptr<const Snapshot> snapshot) {
    snapshot_ = std::move(snapshot);
    rebuild();
}

void PlotView::setSelection(Selection selection) {
    if (selection == selection_) return;
    selection_ = selection;
    selectionChanged();
}

const solve::IterationRecord* PlotView::selectedRecord() const {
    if (!snapshot_ || !selection_.valid()) return nullptr;
    if (selection_.track >= static_cast<int>(snapshot_->tracks.size())) return nullptr;
    const RunTrack& track = snapshot_->tracks[static_cast<std::size_t>(selection_.track)];
    if (!track.run || selection_.iteration >= static_cast<int>(track.run->trace.size())) return nullptr;
    return &track.run->trace[static_cast<std::size_t>(selection_.iteration)];
}

void PlotView::changeEvent(QEvent* event) {
    if (event->type() == QEvent::PaletteChange || event->type() == QEvent::ApplicationPaletteChange) {
        plot_->setPalette(palette());
        rebuild();
    }
    QWidget::changeEvent(event);
}

void PlotView::queueReplot() { plot_->replot(QCustomPlot::rpQueuedReplot); }

QColor PlotView::trackColour(const RunTrack& track) const {
    return readableColour(track.colour, plot_->palette().color(QPalette::Base));
}

bool PlotView::exportFigure(const QString& path, int w, int h, const FigureLook& look, QString* error) {
    const bool ownPalette = testAttribute(Qt::WA_SetPalette);
    const QPalette before = palette();
    const bool repaint = look.light && isDarkPalette(before);
    exporting_ = true;
    if (repaint)
        setPalette(figurePalette());  // the palette change rebuilds the view in the figure's colours
    else
        rebuild();
    QCPTextElement* title = nullptr;
    if (!look.title.isEmpty()) {
        plot_->plotLayout()->insertRow(0);
        QFont font = QApplication::font();
        font.setBold(true);
        title = new QCPTextElement(plot_, look.title, font);
        title->setTextColor(plot_->palette().color(QPalette::WindowText));
        title->setMargins(QMargins(6, 6, 6, 2));
        plot_->plotLayout()->addElement(0, 0, title);
        plot_->plotLayout()->setRowStretchFactor(0, 0.001);
    }
    raiseFontSizes(plot_, look.minimumPointSize);
    if (legendReflow_) legendReflow_(w);
    const bool ok = exportPlot(plot_, path, w, h, error);
    if (title) {
        plot_->plotLayout()->remove(title);
        plot_->plotLayout()->simplify();
    }
    exporting_ = false;
    if (repaint)
        setPalette(ownPalette ? before : QPalette());  // back to the window's colours (and a rebuild)
    else
        rebuild();
    if (legendReflow_) legendReflow_(plot_->viewport().width());
    queueReplot();
    return ok;
}

void PlotView::enableLegendReflow(int maxColumns, std::function<int()> besideLegend, int elidedColumnText) {
    legendReflow_ = [this, maxColumns, besideLegend, elidedColumnText](int width) {
        if (!plot_->legend->visible()) return;
        // 8 px for the legend row's own margins.
        const int beside = besideLegend ? besideLegend() : 0;
        fitLegendToWidth(plot_, width - beside - 8, maxColumns, elidedColumnText);
    };
    // The viewport is already the new size when a resize replots (the last layout's rects are not).
    connect(plot_, &QCustomPlot::beforeReplot, this, [this] {
        if (!exporting_) legendReflow_(plot_->viewport().width());
    });
}

void PlotView::enableTickThinning(int pixelsPerTick) {
    connect(plot_, &QCustomPlot::beforeReplot, this, [this, pixelsPerTick] {
        for (QCPAxisRect* rect : plot_->axisRects()) {
            QCPAxis* axis = rect->axis(QCPAxis::atLeft);
            const int height = plot_->viewport().height() > 0 ? rect->outerRect().height() : 0;
            if (!axis || !axis->ticker() || height <= 0) continue;
            axis->ticker()->setTickCount(std::clamp(height / pixelsPerTick, 2, 6));
        }
    });
}

bool PlotView::eventFilter(QObject* watched, QEvent* event) {
    if (watched == plot_ && event->type() == QEvent::ToolTip) {
        auto* help = static_cast<QHelpEvent*>(event);
        if (auto* item = dynamic_cast<ElidedLegendItem*>(plot_->layoutElementAt(help->pos()))) {
            QToolTip::showText(help->globalPos(), item->fullName(), plot_);
            return true;
        }
    }
    return QWidget::eventFilter(watched, event);
}

}  // namespace sw::widgets
