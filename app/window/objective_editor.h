#pragma once
// The objective editor: a formula in named variables, or a model fitted to a CSV table,
// with live validation (the error position marked in the text and the message shown),
// the variables (or fit parameters) with their plot ranges and starts, the two plotted
// variables, and read-only panes with the gradient and Hessian as formula text.
//
// The editor edits part of a study::Study. It does not build objectives: the window does
// (study::makeObjective) and reports problems back with showFormulaError / showProblem,
// so the last good objective and its runs stay on screen while the text is bad.

#include "core/study/study.h"

#include <QString>
#include <QTimer>
#include <QWidget>
#include <memory>
#include <optional>

class QComboBox;
class QDoubleSpinBox;
class QLabel;
class QLineEdit;
class QPlainTextEdit;
class QPushButton;
class QTableWidget;
class QTabWidget;

namespace sw {
struct Table;
}

namespace sw::window {

class ObjectiveEditor : public QWidget {
    Q_OBJECT
public:
    explicit ObjectiveEditor(QWidget* parent = nullptr);
    ~ObjectiveEditor() override;

    void setStudy(const study::Study& study, const QString& baseDirectory);
    // Writes formula or fit, variables and the plotted pair into `study`.
    void apply(study::Study& study) const;
    bool fitMode() const;

    // Problem reports from the window. position: 0-based offset into the active formula
    // (the formula, or the model in fit mode); -1 marks nothing.
    void showFormulaError(const QString& message, int position);
    void showProblem(const QString& message);
    void clearProblem();
    QString problemText() const;
    int markedPosition() const { return markedPosition_; }

    // Parses the active formula (the formula, or the model over parameters and columns) so
    // a problem comes back with its position; throws expr::FormulaError.
    void parseActiveFormula(const study::Study& study) const;

    // Derivative panes for the current (valid) study.
    void showDerivatives(const study::Study& study);
    QString gradientText() const;
    QString hessianText() const;

    // Start values after a drag on the landscape (does not emit edited()).
    void setStart(const Vector& start);
    void setHeldText(const QString& text);

    QPlainTextEdit* formulaEdit() const { return formula_; }
    QPlainTextEdit* modelEdit() const { return model_; }
    QTableWidget* variableTable() const { return variables_; }
    // Data-fit mode: the table's summary line (rows, columns, separator) and its first rows.
    QString tableSummary() const;
    QTableWidget* tablePreview() const { return preview_; }

signals:
    // The objective or its variables changed (debounced while typing).
    void edited();
    // Only the plotted pair changed.
    void plotAxesChanged();

protected:
    void changeEvent(QEvent* event) override;

private:
    void buildFormulaPage(QWidget* page);
    void buildFitPage(QWidget* page);
    void scheduleEdited();
    void onVariablesChanged();
    void addVariable();
    void removeVariable();
    void chooseDataFile();
    void loadTablePreview();
    void refreshAxisChoices();
    void markError(QPlainTextEdit* edit, int position);
    QPlainTextEdit* activeFormulaEdit() const;
    std::vector<study::Variable> variablesFromTable() const;

    QTabWidget* modes_ = nullptr;
    QPlainTextEdit* formula_ = nullptr;
    // Fit page.
    QLineEdit* dataPath_ = nullptr;
    QPushButton* browse_ = nullptr;
    QLabel* tableInfo_ = nullptr;
    QTableWidget* preview_ = nullptr;
    QComboBox* response_ = nullptr;
    QPlainTextEdit* model_ = nullptr;
    QComboBox* loss_ = nullptr;
    QDoubleSpinBox* lossScale_ = nullptr;
    QComboBox* weights_ = nullptr;
    QComboBox* weightsKind_ = nullptr;
    // Shared.
    QLabel* message_ = nullptr;
    QTableWidget* variables_ = nullptr;
    QComboBox* plotX_ = nullptr;
    QComboBox* plotY_ = nullptr;
    QLabel* held_ = nullptr;
    QPlainTextEdit* gradient_ = nullptr;
    QPlainTextEdit* hessian_ = nullptr;

    QTimer debounce_;
    QString baseDirectory_;
    std::optional<study::DataFit> fit_;  // the fit settings not shown as widgets (checksum)
    std::shared_ptr<Table> table_;
    bool loading_ = false;
    int markedPosition_ = -1;
};

}  // namespace sw::window
