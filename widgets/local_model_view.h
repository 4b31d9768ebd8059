#pragma once
// The local model at the selected iterate: contours of the quadratic model
// m(p) = f + g'p + 1/2 p'Hp drawn over the true contours of f, the Newton point (the model's
// stationary point), the Hessian's eigenvector axes labelled with their eigenvalues, the
// trust-region boundary when the track's method has one, and the model's one-line verdict.

#include "widgets/plot_style.h"

class QLabel;

namespace sw::widgets {

class LocalModelView : public PlotView {
    Q_OBJECT
public:
    explicit LocalModelView(QWidget* parent = nullptr);

    // The verdict line shown under the plot ("" when nothing is selected).
    QString verdict() const;
    // Half-width of the plotted window around the iterate (0 = automatic from the step,
    // trust radius and Newton point).
    void setHalfWidth(double halfWidth);
    // What is drawn, for tests.
    int modelContourCount() const { return modelCurves_; }
    int trueContourCount() const { return trueCurves_; }
    bool showsNewtonPoint() const;
    bool showsTrustRegion() const;
    int eigenAxisCount() const { return eigenAxes_; }
    // Time of the last true-field sampling, in milliseconds (the brief asks < 10 ms).
    double lastSampleMilliseconds() const { return sampleMs_; }
    // Half-width of the window drawn around the selected iterate (before equal axis scaling).
    double shownHalfWidth() const { return shownHalfWidth_; }
    // The window's half-width from the model's curvature (see local_model_view.cpp).
    static double curvatureReach(const Eigen::Matrix2d& h2, const Eigen::Vector2d& g2, double f, const solve::Run& run,
                                 double x, double y);

protected:
    void rebuild() override;

private:
    void settingRangeFor(const analyze::Box& box);
    double halfWidth_ = 0;
    double shownHalfWidth_ = 0;
    QLabel* verdict_ = nullptr;
    QCPCurve* newton_ = nullptr;
    QCPCurve* trust_ = nullptr;
    int modelCurves_ = 0;
    int trueCurves_ = 0;
    int eigenAxes_ = 0;
    double sampleMs_ = 0;
};

}  // namespace sw::widgets
