#pragma once
// The exact derivatives of the objective as formula text: the gradient and the Hessian (upper
// triangle) of a formula, or the derivatives of a fit's model in its parameters (the fit's
// objective sums over rows; the model's own derivatives are what reads well). Read-only; its
// own dock, so the objective editor keeps its height for what is typed.

#include "core/study/study.h"

#include <QWidget>

class QPlainTextEdit;
class QTabWidget;

namespace sw::window {

class DerivativesPane : public QWidget {
    Q_OBJECT
public:
    explicit DerivativesPane(QWidget* parent = nullptr);

    // columns: the fit table's column names (the model's other symbols); unused for formulas.
    void showDerivatives(const study::Study& study, const std::vector<std::string>& columns);
    void clear();
    QString gradientText() const;
    QString hessianText() const;

private:
    QTabWidget* tabs_ = nullptr;
    QPlainTextEdit* gradient_ = nullptr;
    QPlainTextEdit* hessian_ = nullptr;
};

}  // namespace sw::window
