#include "app/window/icons.h"

#include <QGuiApplication>
#include <QPainter>
#include <QPainterPath>
#include <QPixmap>

namespace sw::window {

namespace {

// Draws the glyph into a 24 x 24 unit box.
bool drawGlyph(QPainter& p, const QString& name, const QColor& ink) {
    QPen pen(ink, 2.0, Qt::SolidLine, Qt::RoundCap, Qt::RoundJoin);
    p.setPen(pen);
    p.setBrush(Qt::NoBrush);
    auto triangle = [&](double left, double right) {
        QPainterPath path;
        path.moveTo(left, 5);
        path.lineTo(right, 12);
        path.lineTo(left, 19);
        path.closeSubpath();
        p.fillPath(path, ink);
        p.drawPath(path);
    };
    if (name == "new") {
        QPainterPath page;
        page.moveTo(6, 3);
        page.lineTo(14, 3);
        page.lineTo(19, 8);
        page.lineTo(19, 21);
        page.lineTo(6, 21);
        page.closeSubpath();
        p.drawPath(page);
        p.drawPolyline(QPolygonF({{14, 3}, {14, 8}, {19, 8}}));
    } else if (name == "open") {
        QPainterPath folder;
        folder.moveTo(3, 6);
        folder.lineTo(9, 6);
        folder.lineTo(11, 8);
        folder.lineTo(21, 8);
        folder.lineTo(21, 19);
        folder.lineTo(3, 19);
        folder.closeSubpath();
        p.drawPath(folder);
        p.drawLine(QPointF(3, 11), QPointF(21, 11));
    } else if (name == "save") {
        p.drawLine(QPointF(12, 3), QPointF(12, 14));
        p.drawPolyline(QPolygonF({{7.5, 9.5}, {12, 14}, {16.5, 9.5}}));
        p.drawPolyline(QPolygonF({{4, 14}, {4, 20}, {20, 20}, {20, 14}}));
    } else if (name == "run-all") {
        triangle(3.5, 11.5);
        triangle(12, 20);
    } else if (name == "step-all") {
        triangle(5, 15);
        p.drawLine(QPointF(19, 5), QPointF(19, 19));
    } else if (name == "play") {
        triangle(7, 19);
    } else if (name == "pause") {
        p.fillRect(QRectF(6.5, 5, 4, 14), ink);
        p.fillRect(QRectF(13.5, 5, 4, 14), ink);
    } else if (name == "reset") {
        p.drawLine(QPointF(5, 5), QPointF(5, 19));
        QPainterPath back;
        back.moveTo(19, 5);
        back.lineTo(9, 12);
        back.lineTo(19, 19);
        back.closeSubpath();
        p.fillPath(back, ink);
        p.drawPath(back);
    } else if (name == "cancel") {
        p.fillRect(QRectF(6, 6, 12, 12), ink);
    } else if (name == "export-view") {
        p.drawPolyline(QPolygonF({{10, 5}, {4, 5}, {4, 20}, {19, 20}, {19, 14}}));
        p.drawLine(QPointF(10, 14), QPointF(20, 4));
        p.drawPolyline(QPolygonF({{14, 4}, {20, 4}, {20, 10}}));
    } else {
        return false;
    }
    return true;
}

}  // namespace

QIcon toolIcon(const QString& name, const QPalette& palette) {
    QIcon icon;
    const double ratio = std::max(1.0, qGuiApp ? qGuiApp->devicePixelRatio() : 1.0);
    for (const QIcon::Mode mode : {QIcon::Normal, QIcon::Disabled}) {
        QColor ink = palette.color(mode == QIcon::Disabled ? QPalette::Disabled : QPalette::Active, QPalette::ButtonText);
        for (const int size : {16, 24, 32}) {
            QPixmap pixmap(QSize(size, size) * ratio);
            pixmap.setDevicePixelRatio(ratio);
            pixmap.fill(Qt::transparent);
            QPainter p(&pixmap);
            p.setRenderHint(QPainter::Antialiasing);
            p.scale(size / 24.0, size / 24.0);
            if (!drawGlyph(p, name, ink)) return {};
            p.end();
            icon.addPixmap(pixmap, mode);
        }
    }
    return icon;
}

}  // namespace sw::window
