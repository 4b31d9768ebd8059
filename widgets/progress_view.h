#pragma once
// Progress of every track: f - f_best (f_best: the lowest finite f over all tracks) and
// |grad f|, both on log scales, against iteration or against evaluations.

#include "widgets/plot_style.h"

class QComboBox;

namespace sw::widgets {

class ProgressView : public PlotView {
    Q_OBJECT
public:
    explicit ProgressView(QWidget* parent = nullptr);

    // false: x = iteration (default); true: x = cumulative evaluations (value+gradient+Hessian).
    void setAgainstEvaluations(bool on);
    bool againstEvaluations() const { return againstEvaluations_; }
    double bestValue() const { return best_; }
    QCPGraph* gapGraph(int track) const;
    QCPGraph* gradientGraph(int track) const;
    QCPAxisRect* gapRect() const { return gapRect_; }
    QCPAxisRect* gradientRect() const { return gradientRect_; }
    QPointF highlightPosition() const;  // in the f - f_best panel
    QString bestNoteText() const;       // "f_best = ... (the lowest f of any method) ..."

signals:
    void againstEvaluationsChanged(bool on);

protected:
    void rebuild() override;
    void selectionChanged() override;

private:
    void updateHighlight();
    double xOf(const solve::IterationRecord& record) const;
    double gapOf(double value) const;
    bool againstEvaluations_ = false;
    double best_ = 0;
    double floor_ = 1e-16;
    QComboBox* axisChoice_ = nullptr;
    QCPTextElement* bestNote_ = nullptr;  // f_best and the floor, above the plots
    QString bestLong_, bestShort_;  // the note above the plots, and its one-line form for short panels
    QCPAxisRect* gapRect_ = nullptr;
    QCPAxisRect* gradientRect_ = nullptr;
    std::vector<QCPGraph*> gapGraphs_;
    std::vector<QCPGraph*> gradientGraphs_;
    QCPGraph* gapHighlight_ = nullptr;
    QCPGraph* gradientHighlight_ = nullptr;
};

}  // namespace sw::widgets
