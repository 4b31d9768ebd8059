#pragma once
// The fit view: for the selected run of a data-fit study, what `saddlewise fit` reports —
// the estimates with their standard errors and confidence intervals, the combinations the data
// determine when single parameters are not determined, the correlations between estimates, how
// well the model fits in the terms of its loss (sums of squares, or deviance and
// log-likelihood), the rows, parameters and degrees of freedom, and the fit's warnings — and,
// closing every page it shows, the caution that a fit is only as good as its model and data.
//
// It draws only from an immutable FitSnapshot (widgets/fit_snapshot.h); numbers are printed
// with the command line's significant digits (estimates 10, intervals 6, standard errors 4),
// in the C locale. The text can be selected and copied.

#include "widgets/fit_snapshot.h"

#include <QStringList>
#include <QWidget>
#include <memory>

class QTextBrowser;

namespace sw::widgets {

class FitStatisticsView : public QWidget {
    Q_OBJECT
public:
    explicit FitStatisticsView(QWidget* parent = nullptr);

    // Shows a run's statistics.
    void setSnapshot(std::shared_ptr<const FitSnapshot> snapshot);
    // Shows a sentence instead of statistics (not a fit, no run selected, ...).
    void showMessage(const QString& message);
    // While statistics are being computed the shown ones stay, marked as being replaced.
    void setBusy(bool busy);

    std::shared_ptr<const FitSnapshot> snapshot() const { return snapshot_; }
    bool busy() const { return busy_; }
    // The cells of one parameter's row as shown: name, estimate, interval from, to, standard
    // error, relative error; a parameter the data do not determine has its estimate and then
    // the single cell "not determined by the data".
    QStringList parameterCells(int parameter) const;
    // The shown document as plain text, and the caution line that closes it.
    QString text() const;
    QString cautionText() const;

    // Number text as the view prints it (C locale, `significant` digits, "nan"/"inf" spelled
    // out as the command line's text report does).
    static QString number(double value, int significant);

protected:
    void changeEvent(QEvent* event) override;

private:
    void render();

    std::shared_ptr<const FitSnapshot> snapshot_;
    QString message_;
    bool busy_ = false;
    QTextBrowser* browser_ = nullptr;
};

}  // namespace sw::widgets
