#pragma once
// A one-line caption that shortens itself with "…" to the width it gets, the whole text in its
// tooltip: a panel's caption never takes the plot's height in a short dock (1280 x 800).

#include <QLabel>

namespace sw::widgets {

class ElidedLabel : public QLabel {
public:
    explicit ElidedLabel(QWidget* parent = nullptr);
    void setFullText(const QString& text);
    QString fullText() const { return full_; }
    QSize minimumSizeHint() const override;
    QSize sizeHint() const override;

protected:
    void resizeEvent(QResizeEvent* event) override;

private:
    void refresh();
    QString full_;
};

}  // namespace sw::widgets
