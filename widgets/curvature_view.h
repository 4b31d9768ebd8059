#pragma once
// Curvature along each track: the Hessian's eigenvalues at every iterate on a symmetric log
// scale (so signs show), and below it the condition number on a log scale. Iterates with
// negative curvature stand out (filled markers on a shaded band below zero).

#include "widgets/plot_style.h"

class QLabel;

namespace sw::widgets {

class ElidedLabel;

class CurvatureView : public PlotView {
    Q_OBJECT
public:
    explicit CurvatureView(QWidget* parent = nullptr);

    // Where the symmetric log scale turns linear (|lambda| below c); chosen from the data.
    double linearZone() const { return c_; }
    QCPAxisRect* eigenvalueRect() const { return eigenRect_; }
    QCPAxisRect* conditionRect() const { return conditionRect_; }
    // Number of iterates (over all tracks) with a negative eigenvalue, for tests.
    int negativeCurvatureCount() const { return negativeCount_; }
    // Graphs for a track: one per eigenvalue index, and its condition number graph.
    std::vector<QCPGraph*> eigenvalueGraphs(int track) const;
    QCPGraph* conditionGraph(int track) const;
    QPointF highlightPosition() const;  // in plot coordinates of the eigenvalue panel
    QString caption() const;

protected:
    void rebuild() override;
    void selectionChanged() override;

private:
    void updateHighlight();
    double c_ = 1.0;
    ElidedLabel* caption_ = nullptr;
    QCPAxisRect* eigenRect_ = nullptr;
    QCPAxisRect* conditionRect_ = nullptr;
    std::vector<std::vector<QCPGraph*>> eigenGraphs_;
    std::vector<QCPGraph*> conditionGraphs_;
    QCPGraph* highlight_ = nullptr;
    QCPGraph* conditionHighlight_ = nullptr;
    int negativeCount_ = 0;
};

}  // namespace sw::widgets
