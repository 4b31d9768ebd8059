#include "widgets/elided_label.h"

#include <QResizeEvent>

namespace sw::widgets {

ElidedLabel::ElidedLabel(QWidget* parent) : QLabel(parent) {
    setWordWrap(false);
    setSizePolicy(QSizePolicy::Ignored, QSizePolicy::Fixed);
}

void ElidedLabel::setFullText(const QString& text) {
    full_ = text;
    refresh();
}

QSize ElidedLabel::minimumSizeHint() const { return {0, QLabel::minimumSizeHint().height()}; }

QSize ElidedLabel::sizeHint() const { return {fontMetrics().horizontalAdvance(full_) + 8, QLabel::sizeHint().height()}; }

void ElidedLabel::resizeEvent(QResizeEvent* event) {
    QLabel::resizeEvent(event);
    refresh();
}

void ElidedLabel::refresh() {
    const QMargins m = contentsMargins();
    const int room = std::max(0, width() - m.left() - m.right() - 2);
    const QString shown = fontMetrics().elidedText(full_, Qt::ElideRight, room);
    if (text() != shown) setText(shown);
    setToolTip(shown == full_ ? QString() : full_);
}

}  // namespace sw::widgets
