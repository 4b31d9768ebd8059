#pragma once
// The objective editor: a formula in named variables, or a model fitted to a CSV table,
// with live validation (the error position marked in the text and the message shown, with a
// one-click fix where there is one), the variables (or fit parameters) with their starts and
// plot ranges, the two plotted variables, and the values the other variables are held at.
//
// The editor edits part of a study::Study. It does not build objectives: the window does
// (study::makeObjective) and reports problems back with showFormulaError / showProblem, so the
// last good objective and its runs stay on screen while the text is bad. apply() writes what
// is on screen, including text that does not parse yet (a number typed as "1.2." goes into
// Study::unparsed), so Save writes exactly what the user sees.
//
// Signals: changed() at once on every user edit (the document is modified, even when the edit
// does not parse); edited() 250 ms after typing pauses (time to rebuild the objective).

#include "core/study/study.h"

#include <QString>
#include <QStringList>
#include <QTimer>
#include <QWidget>
#include <functional>
#include <memory>
#include <optional>

class QCheckBox;
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

    // Shows `study`. baseDirectory is the study file's folder (data paths are relative to it);
    // empty for a study that has no folder yet (a chosen table is then kept by its full path).
    void setStudy(const study::Study& study, const QString& baseDirectory);
    // The study moved to another folder (Save As): the data path keeps naming the same file.
    void setBaseDirectory(const QString& baseDirectory);
    QString baseDirectory() const { return baseDirectory_; }
    // Writes formula or fit, variables (text that is not a number yet into study.unparsed)
    // and the plotted pair into `study`.
    void apply(study::Study& study) const;
    bool fitMode() const;
    void setFitMode(bool fit);

    // Data-fit mode: uses the CSV table at `path` (absolute, or relative to the base folder).
    // The table is what the user chose, so its checksum is recorded now (a study opened from
    // disk keeps the checksum it was saved with, and a table changed since is reported).
    // Returns false with the reason shown when the file cannot be read.
    bool setDataFile(const QString& path);
    // Records the current checksum of the chosen table (the user accepts a changed table).
    void acceptDataAsItIsNow();
    // How Choose… asks for a table: by default Qt's open-file dialog. Tests (and a future
    // drop target) answer with a path; an empty answer means the user cancelled.
    using FileChooser = std::function<QString(QWidget* parent, const QString& title, const QString& folder,
                                              const QString& filter)>;
    void setFileChooser(FileChooser chooser) { fileChooser_ = std::move(chooser); }

    // Problem reports from the window. position: 0-based offset into the active formula
    // (the formula, or the model in fit mode); -1 marks nothing. unknownNames: names the
    // formula uses that are neither variables nor columns; they are offered as variables (or
    // parameters) in one click.
    void showFormulaError(const QString& message, int position, const QStringList& unknownNames = {});
    // A problem with its place in the study ("objective.checksum", "variables[1].start", ...).
    void showProblem(const QString& message, const QString& place = QString());
    void clearProblem();
    QString problemText() const;
    int markedPosition() const { return markedPosition_; }
    // The one-click fix offered with the problem ("" when none).
    QString fixText() const;
    void applyFix();

    // Parses the active formula (the formula, or the model over parameters and columns) so
    // a problem comes back with its position; throws expr::FormulaError.
    void parseActiveFormula(const study::Study& study) const;
    // Column names of the chosen table (empty in formula mode or when it cannot be read).
    std::vector<std::string> columnNames() const;

    // Start values after a drag on the landscape (does not emit edited()).
    void setStart(const Vector& start);

    // Values of the variables that are not plotted (n > 2). While "follow" is on they show
    // the selected iterate (setHeldValues); typing a value turns it off and heldValuesEdited()
    // asks the window to resample.
    void setHeldValues(const Vector& values);
    bool heldFollowsSelection() const;
    // The typed held values (NaN where a cell does not read as a number); size n.
    Vector typedHeldValues() const;
    QTableWidget* heldTable() const { return held_; }

    QPlainTextEdit* formulaEdit() const { return formula_; }
    QPlainTextEdit* modelEdit() const { return model_; }
    QTableWidget* variableTable() const { return variables_; }
    // Data-fit mode: the table's summary line (rows, columns, separator) and its first rows.
    QString tableSummary() const;
    QTableWidget* tablePreview() const { return preview_; }
    QComboBox* responseBox() const { return response_; }
    QComboBox* separatorBox() const { return separator_; }
    QCheckBox* dropIncompleteBox() const { return dropIncomplete_; }
    // Notes that are not errors (a start outside its plot range).
    QString noticeText() const;

signals:
    // Every user edit, at once (the study on screen differs from the saved one).
    void changed();
    // The objective or its variables changed (debounced while typing).
    void edited();
    // Only the plotted pair changed.
    void plotAxesChanged();
    // The user typed a held value, or turned "follow the selected iterate" on or off.
    void heldValuesEdited();

protected:
    void changeEvent(QEvent* event) override;

private:
    FileChooser fileChooser_;
    void buildFormulaPage(QWidget* page);
    void buildFitPage(QWidget* page);
    void userEdit();  // changed() now and edited() after the pause
    void onVariablesChanged();
    void addVariable();
    void addVariablesNamed(const QStringList& names);
    // Fit mode: the parameters in the table that the model text does not use (e.g. the x, y a
    // new study starts with, once a table and a model are chosen).
    QStringList unusedParameters() const;
    void replaceParameters(const QStringList& drop, const QStringList& add);
    void removeVariable();
    void chooseDataFile();
    void loadTablePreview();
    void refreshAxisChoices();
    void refreshHeldRows();
    void refreshNotices();
    void refreshLabels();
    void markError(QPlainTextEdit* edit, int position);
    void offerFix(const QString& text, std::function<void()> fix);
    QPlainTextEdit* activeFormulaEdit() const;
    std::vector<study::Variable> variablesFromTable(std::map<std::string, std::string>* unparsed = nullptr) const;
    QString dataPathFor(const QString& absolutePath) const;

    QTabWidget* modes_ = nullptr;
    QPlainTextEdit* formula_ = nullptr;
    // Fit page.
    QLineEdit* dataPath_ = nullptr;
    QPushButton* browse_ = nullptr;
    QLabel* tableInfo_ = nullptr;
    QTableWidget* preview_ = nullptr;
    QComboBox* separator_ = nullptr;
    QCheckBox* dropIncomplete_ = nullptr;
    QComboBox* response_ = nullptr;
    QPlainTextEdit* model_ = nullptr;
    QComboBox* loss_ = nullptr;
    QDoubleSpinBox* lossScale_ = nullptr;
    QComboBox* weights_ = nullptr;
    QComboBox* weightsKind_ = nullptr;
    // Shared.
    QLabel* message_ = nullptr;
    QPushButton* fix_ = nullptr;
    std::function<void()> fixAction_;
    QLabel* variablesLabel_ = nullptr;
    QTableWidget* variables_ = nullptr;
    QComboBox* plotX_ = nullptr;
    QComboBox* plotY_ = nullptr;
    QLabel* notice_ = nullptr;
    QWidget* heldBox_ = nullptr;
    QCheckBox* follow_ = nullptr;
    QTableWidget* held_ = nullptr;

    QTimer debounce_;
    QString baseDirectory_;
    std::optional<study::DataFit> fit_;  // the fit settings not shown as widgets (checksum)
    std::shared_ptr<Table> table_;
    bool loading_ = false;
    int markedPosition_ = -1;
};

}  // namespace sw::window
