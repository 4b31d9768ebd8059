#pragma once
// Basins of attraction as small multiples: one panel per method over the same plane, each cell
// coloured by the critical point its run ended at (the colours of core/survey/picture.h, so the
// window, the command line's PNG and reports agree), darker for more iterations, neutral greys
// for runs that ended on no point (limit, diverged, failed, outside). The critical points are
// marked in every panel with the landscape's critical-point markers; one legend names them.
// Hovering reads out the cell; a click asks for the lineup to run from that cell's start.

#include "core/survey/survey.h"
#include "widgets/plot_style.h"

class QLabel;

namespace sw::widgets {

class BasinsView : public PlotView {
    Q_OBJECT
public:
    explicit BasinsView(QWidget* parent = nullptr);

    void setSurvey(std::shared_ptr<const survey::BasinSurvey> survey);
    std::shared_ptr<const survey::BasinSurvey> survey() const { return survey_; }
    // One axis rect per method, in order (for tests and exports).
    int panelCount() const { return static_cast<int>(panels_.size()); }
    QCPAxisRect* panel(int index) const;
    // The readout for a plot pixel ("" outside every panel), and what the view shows under it.
    QString readoutAt(const QPointF& pixel) const;
    QString readoutText() const;
    // Which method and cell a pixel falls in; false outside every panel.
    bool cellAt(const QPointF& pixel, int& method, long& cell) const;
    // A message in place of the maps (e.g. why there are none); empty clears it.
    void setMessage(const QString& message);

signals:
    // A click on a cell: the start of that cell's runs (full n-vector).
    void cellClicked(sw::Vector start);

protected:
    void rebuild() override;
    bool eventFilter(QObject* watched, QEvent* event) override;

private:
    void ensurePanels(int count);

    std::shared_ptr<const survey::BasinSurvey> survey_;
    QCPLayoutGrid* titleRow_ = nullptr;
    QCPLayoutGrid* panelRow_ = nullptr;
    std::vector<QCPAxisRect*> panels_;
    std::vector<QCPTextElement*> titles_;
    QString message_;
    QLabel* readout_ = nullptr;
    QPointF pressPixel_;
};

}  // namespace sw::widgets
