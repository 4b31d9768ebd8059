#pragma once
// A 1-D slice at the selected iterate: f along the step's search direction (or along one
// of the Hessian's eigenvectors), the quadratic model along that line, the accepted step,
// the line-search trials and the sufficient-decrease (Armijo) line f + c1 alpha g'd.

#include "widgets/plot_style.h"

class QCheckBox;
class QComboBox;
class QLabel;

namespace sw::widgets {

class ElidedLabel;

class SliceView : public PlotView {
    Q_OBJECT
public:
    explicit SliceView(QWidget* parent = nullptr);

    // -1: the step's search direction (default); i >= 0: the i-th Hessian eigenvector
    // (eigenvalues ascending). Falls back to the steepest-descent direction when the
    // selected record has no step.
    void setDirection(int eigenvectorIndex);
    int direction() const { return direction_; }
    // The sufficient-decrease constant used for the drawn line (default 1e-4).
    void setArmijoConstant(double c1);

    // What is drawn, for tests.
    QCPGraph* trueGraph() const { return trueGraph_; }
    QCPGraph* modelGraph() const { return modelGraph_; }
    QCPGraph* armijoGraph() const { return armijoGraph_; }
    QCPGraph* trialGraph() const { return trialGraph_; }
    QCPGraph* acceptedGraph() const { return acceptedGraph_; }
    QString caption() const;
    // Step lengths on a log scale (chosen by itself when the trials span more than two decades).
    QCheckBox* logScaleBox() const { return logScale_; }

protected:
    void rebuild() override;

private:
    int direction_ = -1;
    double c1_ = 1e-4;
    QComboBox* directionChoice_ = nullptr;
    QCheckBox* logScale_ = nullptr;
    bool logScaleChosen_ = false;  // the user ticked or cleared "log α": keep their choice
    ElidedLabel* caption_ = nullptr;
    QCPGraph* trueGraph_ = nullptr;
    QCPGraph* modelGraph_ = nullptr;
    QCPGraph* armijoGraph_ = nullptr;
    QCPGraph* trialGraph_ = nullptr;
    QCPGraph* rejectedGraph_ = nullptr;
    QCPGraph* acceptedGraph_ = nullptr;
};

}  // namespace sw::widgets
