// (Include order: core headers first, then Qt.)
#include "core/expr/expr.h"

#include "app/window/objective_editor.h"
#include "app/window/file_dialogs.h"
#include "core/objective/table.h"
#include "widgets/theme.h"

#include <QCheckBox>
#include <QComboBox>
#include <QDir>
#include <QDoubleSpinBox>
#include <QEvent>
#include <QFileDialog>
#include <QFileInfo>
#include <QFontDatabase>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QRegularExpression>
#include <QTabWidget>
#include <QTableWidget>
#include <QVBoxLayout>
#include <cmath>

namespace sw::window {

namespace {

enum VariableColumn { NameColumn, StartColumn, LowerColumn, UpperColumn, VariableColumnCount };
enum HeldColumn { HeldName, HeldValue, HeldColumnCount };

// Numbers as the tables show them. The exact value rides along in the item (Qt::UserRole), so
// a value the user did not retype keeps every bit (a dragged start, a value read from a file).
QString numberText(double v) { return QString::number(v, 'g', 10); }

QTableWidgetItem* numberItem(double value) {
    auto* item = new QTableWidgetItem(numberText(value));
    item->setData(Qt::UserRole, value);
    return item;
}

// The number in a cell: the exact value behind it when its text is still the value's own,
// else the text read as a number (ok = false when it does not read as one).
double cellNumber(const QTableWidgetItem* item, bool* ok) {
    *ok = false;
    if (!item) return std::nan("");
    const QString text = item->text().trimmed();
    const QVariant exact = item->data(Qt::UserRole);
    if (exact.isValid() && exact.canConvert<double>() && numberText(exact.toDouble()) == text) {
        *ok = true;
        return exact.toDouble();
    }
    const double value = text.toDouble(ok);  // C locale: the decimal point is '.'
    return *ok ? value : std::nan("");
}

QPlainTextEdit* makeFormulaEdit(QWidget* parent, const QString& placeholder, const QString& tip) {
    auto* edit = new QPlainTextEdit(parent);
    edit->setPlaceholderText(placeholder);
    edit->setToolTip(tip);
    edit->setFont(QFontDatabase::systemFont(QFontDatabase::FixedFont));
    edit->setTabChangesFocus(true);
    const int line = edit->fontMetrics().lineSpacing();
    edit->setMinimumHeight(line * 2 + 12);
    edit->setMaximumHeight(line * 4 + 12);
    edit->setSizePolicy(QSizePolicy::Expanding, QSizePolicy::Preferred);
    return edit;
}

// A table that asks for `rows` rows of height and may be squeezed to `fewest`.
void sizeTableForRows(QTableWidget* table, int rows, int fewest) {
    const int header = table->horizontalHeader()->isVisible() ? table->horizontalHeader()->sizeHint().height() : 0;
    const int row = table->verticalHeader()->defaultSectionSize();
    table->setMinimumHeight(header + fewest * row + 4);
    table->setMaximumHeight(header + rows * row + 4);
}

bool isIdentifier(const QString& name) {
    static const QRegularExpression identifier(QStringLiteral("^[A-Za-z_][A-Za-z0-9_]*$"));
    return identifier.match(name).hasMatch();
}

}  // namespace

ObjectiveEditor::ObjectiveEditor(QWidget* parent) : QWidget(parent) {
    modes_ = new QTabWidget(this);
    modes_->setToolTip(tr("Minimise a formula, or fit a model to a data table"));
    auto* formulaPage = new QWidget(modes_);
    auto* fitPage = new QWidget(modes_);
    buildFormulaPage(formulaPage);
    buildFitPage(fitPage);
    modes_->addTab(formulaPage, tr("Formula"));
    modes_->addTab(fitPage, tr("Fit to data"));
    modes_->setTabToolTip(0, tr("The objective is a formula in the variables below"));
    modes_->setTabToolTip(1, tr("The objective is a loss over the rows of a CSV table"));

    message_ = new QLabel(this);
    message_->setWordWrap(true);
    message_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    message_->setToolTip(tr("What is wrong with the objective as typed; the last good one stays on screen"));
    message_->setVisible(false);
    fix_ = new QPushButton(this);
    fix_->setToolTip(tr("Fix the problem above in one step"));
    fix_->setVisible(false);
    connect(fix_, &QPushButton::clicked, this, &ObjectiveEditor::applyFix);

    variables_ = new QTableWidget(0, VariableColumnCount, this);
    variables_->setHorizontalHeaderLabels({tr("Name"), tr("Start"), tr("Plot from"), tr("Plot to")});
    variables_->horizontalHeader()->setSectionResizeMode(QHeaderView::Stretch);
    variables_->verticalHeader()->setVisible(false);
    sizeTableForRows(variables_, 6, 2);
    variables_->setSizePolicy(QSizePolicy::Expanding, QSizePolicy::MinimumExpanding);
    variables_->setToolTip(tr("Variables (or fit parameters): name, start value and the range shown on the plots"));
    variables_->horizontalHeaderItem(StartColumn)->setToolTip(tr("Where every method starts"));
    variables_->horizontalHeaderItem(LowerColumn)->setToolTip(tr("Lower end of the plotted range"));
    variables_->horizontalHeaderItem(UpperColumn)->setToolTip(tr("Upper end of the plotted range"));
    auto* add = new QPushButton(tr("Add"), this);
    add->setToolTip(tr("Add a variable"));
    auto* remove = new QPushButton(tr("Remove"), this);
    remove->setToolTip(tr("Remove the selected variable"));
    connect(add, &QPushButton::clicked, this, &ObjectiveEditor::addVariable);
    connect(remove, &QPushButton::clicked, this, &ObjectiveEditor::removeVariable);
    connect(variables_, &QTableWidget::itemChanged, this, [this] { onVariablesChanged(); });

    plotX_ = new QComboBox(this);
    plotX_->setToolTip(tr("Variable along the horizontal axis of the landscape"));
    plotY_ = new QComboBox(this);
    plotY_->setToolTip(tr("Variable along the vertical axis of the landscape"));
    auto axisChanged = [this] {
        if (loading_) return;
        refreshHeldRows();
        refreshNotices();
        emit changed();
        emit plotAxesChanged();
    };
    connect(plotX_, &QComboBox::currentIndexChanged, this, axisChanged);
    connect(plotY_, &QComboBox::currentIndexChanged, this, axisChanged);

    notice_ = new QLabel(this);
    notice_->setWordWrap(true);
    notice_->setToolTip(tr("Things worth knowing about the values above (not errors)"));
    notice_->setVisible(false);

    // Held values of the variables that are not plotted (n > 2).
    heldBox_ = new QWidget(this);
    follow_ = new QCheckBox(tr("Hold the others at the selected iterate"), heldBox_);
    follow_->setChecked(true);
    follow_->setToolTip(tr("The landscape is a slice through the other variables: at the selected iterate, "
                           "or at the values typed below"));
    held_ = new QTableWidget(0, HeldColumnCount, heldBox_);
    held_->setHorizontalHeaderLabels({tr("Held variable"), tr("Value")});
    held_->horizontalHeader()->setSectionResizeMode(QHeaderView::Stretch);
    held_->verticalHeader()->setVisible(false);
    sizeTableForRows(held_, 3, 1);
    held_->setToolTip(tr("Values of the variables that are not plotted; type a value to hold it there"));
    connect(follow_, &QCheckBox::toggled, this, [this] {
        if (!loading_) emit heldValuesEdited();
    });
    connect(held_, &QTableWidget::itemChanged, this, [this](QTableWidgetItem* item) {
        if (loading_ || !item || item->column() != HeldValue) return;
        loading_ = true;
        follow_->setChecked(false);  // a typed value holds still
        loading_ = false;
        emit heldValuesEdited();
    });
    auto* heldLayout = new QVBoxLayout(heldBox_);
    heldLayout->setContentsMargins(0, 0, 0, 0);
    heldLayout->addWidget(follow_);
    heldLayout->addWidget(held_);
    heldBox_->setVisible(false);

    auto* buttons = new QHBoxLayout;
    variablesLabel_ = new QLabel(tr("Variables"), this);
    buttons->addWidget(variablesLabel_);
    buttons->addStretch(1);
    buttons->addWidget(add);
    buttons->addWidget(remove);
    auto* axes = new QHBoxLayout;
    auto* plotLabel = new QLabel(tr("Horizontal"), this);
    plotLabel->setToolTip(plotX_->toolTip());
    axes->addWidget(plotLabel);
    axes->addWidget(plotX_, 1);
    auto* against = new QLabel(tr("vertical"), this);
    against->setToolTip(plotY_->toolTip());
    axes->addWidget(against);
    axes->addWidget(plotY_, 1);
    auto* problem = new QHBoxLayout;
    problem->addWidget(message_, 1);
    problem->addWidget(fix_, 0, Qt::AlignTop);

    modes_->setSizePolicy(QSizePolicy::Preferred, QSizePolicy::Maximum);
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addWidget(modes_);
    layout->addLayout(problem);
    layout->addLayout(buttons);
    layout->addWidget(variables_);
    layout->addLayout(axes);
    layout->addWidget(notice_);
    layout->addWidget(heldBox_);
    layout->addStretch(1);

    debounce_.setSingleShot(true);
    debounce_.setInterval(250);
    connect(&debounce_, &QTimer::timeout, this, [this] { emit edited(); });
    // Only the current page counts for the tab widget's size, so the short formula page
    // does not inherit the fit page's height.
    auto fitPages = [this] {
        for (int i = 0; i < modes_->count(); ++i)
            modes_->widget(i)->setSizePolicy(QSizePolicy::Preferred,
                                             i == modes_->currentIndex() ? QSizePolicy::Preferred : QSizePolicy::Ignored);
        modes_->updateGeometry();
    };
    fitPages();
    connect(modes_, &QTabWidget::currentChanged, this, [this, fitPages] {
        fitPages();
        refreshLabels();
        userEdit();
    });
    refreshLabels();
}

ObjectiveEditor::~ObjectiveEditor() = default;

void ObjectiveEditor::buildFormulaPage(QWidget* page) {
    formula_ = makeFormulaEdit(page, tr("e.g. (1 - a)^2 + 40*(b - a^2)^2"),
                               tr("The objective as a formula; + - * / ^, functions such as exp, log, sin, sqrt, "
                                  "min, max and c ? a : b are allowed (Help ▸ Formula syntax). Errors are marked "
                                  "as you type."));
    connect(formula_, &QPlainTextEdit::textChanged, this, [this] { userEdit(); });
    auto* layout = new QVBoxLayout(page);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addWidget(formula_);
}

void ObjectiveEditor::buildFitPage(QWidget* page) {
    dataPath_ = new QLineEdit(page);
    dataPath_->setReadOnly(true);
    dataPath_->setPlaceholderText(tr("no table chosen"));
    dataPath_->setToolTip(tr("The CSV table, relative to the study file"));
    browse_ = new QPushButton(tr("Choose…"), page);
    browse_->setToolTip(tr("Choose the CSV table to fit"));
    connect(browse_, &QPushButton::clicked, this, &ObjectiveEditor::chooseDataFile);
    tableInfo_ = new QLabel(page);
    tableInfo_->setWordWrap(true);
    tableInfo_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    tableInfo_->setToolTip(tr("Rows, columns and the separator found in the table"));
    preview_ = new QTableWidget(page);
    preview_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    preview_->setToolTip(tr("The first rows of the table, as read"));
    preview_->verticalHeader()->setDefaultSectionSize(preview_->fontMetrics().height() + 6);
    sizeTableForRows(preview_, 5, 2);
    separator_ = new QComboBox(page);
    for (const auto& [id, text] : {std::pair{"auto", QT_TR_NOOP("found in the header")},
                                   std::pair{"comma", QT_TR_NOOP("comma")}, std::pair{"semicolon", QT_TR_NOOP("semicolon")},
                                   std::pair{"tab", QT_TR_NOOP("tab")}})
        separator_->addItem(tr(text), QString::fromLatin1(id));
    separator_->setToolTip(tr("How the table's cells are separated; by default the header row tells"));
    dropIncomplete_ = new QCheckBox(tr("skip rows with missing values"), page);
    dropIncomplete_->setToolTip(tr("Leave out rows with empty or NA cells (the count is shown); otherwise such a "
                                   "row is an error naming its line"));
    response_ = new QComboBox(page);
    response_->setToolTip(tr("The column the model should reproduce"));
    model_ = makeFormulaEdit(page, tr("e.g. a + b*exp(-t/c)"),
                             tr("Model formula in the table's columns and the parameters below; every name that "
                                "is not a parameter must be a column"));
    loss_ = new QComboBox(page);
    const std::pair<const char*, const char*> losses[] = {
        {"least-squares", QT_TR_NOOP("½ Σ r² (ordinary least squares)")},
        {"weighted", QT_TR_NOOP("½ Σ w r² (weights or standard deviations from a column)")},
        {"huber", QT_TR_NOOP("Huber: quadratic near zero, linear beyond the scale")},
        {"cauchy", QT_TR_NOOP("Cauchy: grows like log(1 + (r/scale)²)")},
        {"logistic", QT_TR_NOOP("Logistic: the model is the log-odds of a 0/1 response")},
        {"poisson", QT_TR_NOOP("Poisson: the model is the log of the mean count")}};
    for (const auto& [id, tip] : losses) {
        loss_->addItem(QString::fromLatin1(id), QString::fromLatin1(id));
        loss_->setItemData(loss_->count() - 1, tr(tip), Qt::ToolTipRole);
    }
    loss_->setToolTip(tr("How residuals r = response − model add up to the objective"));
    lossScale_ = new QDoubleSpinBox(page);
    lossScale_->setRange(1e-9, 1e9);
    lossScale_->setDecimals(6);
    lossScale_->setValue(1.0);
    lossScale_->setToolTip(tr("Scale of the Huber or Cauchy loss (residuals beyond it count less)"));
    weights_ = new QComboBox(page);
    weights_->setToolTip(tr("Column with weights (or standard deviations) for the weighted loss"));
    weightsKind_ = new QComboBox(page);
    weightsKind_->addItem(tr("weights"), "weights");
    weightsKind_->addItem(tr("standard deviations"), "sigma");
    weightsKind_->setToolTip(tr("Whether the column holds weights w, or standard deviations σ (w = 1/σ²)"));

    for (QComboBox* box : {response_, loss_, weights_, weightsKind_})
        connect(box, &QComboBox::currentIndexChanged, this, [this] { userEdit(); });
    connect(lossScale_, &QDoubleSpinBox::valueChanged, this, [this] { userEdit(); });
    // Reading options change what the table is: read it again.
    auto reread = [this] {
        if (loading_) return;
        loading_ = true;
        loadTablePreview();
        loading_ = false;
        userEdit();
    };
    connect(separator_, &QComboBox::currentIndexChanged, this, reread);
    connect(dropIncomplete_, &QCheckBox::toggled, this, reread);
    // Controls that do nothing in the current choice are greyed out rather than left to puzzle.
    auto greyOutUnused = [this] {
        const QString loss = loss_->currentData().toString();
        lossScale_->setEnabled(loss == QLatin1String("huber") || loss == QLatin1String("cauchy"));
        weightsKind_->setEnabled(weights_->currentIndex() > 0);
    };
    connect(loss_, &QComboBox::currentIndexChanged, this, greyOutUnused);
    connect(weights_, &QComboBox::currentIndexChanged, this, greyOutUnused);
    greyOutUnused();
    connect(model_, &QPlainTextEdit::textChanged, this, [this] { userEdit(); });

    // One control per row, so the page stays narrow enough for a side panel.
    auto* file = new QHBoxLayout;
    file->addWidget(dataPath_, 1);
    file->addWidget(browse_);
    for (QComboBox* box : {separator_, response_, loss_, weights_, weightsKind_}) {
        box->setSizeAdjustPolicy(QComboBox::AdjustToMinimumContentsLengthWithIcon);
        box->setMinimumContentsLength(8);
    }
    auto* form = new QFormLayout;
    form->setContentsMargins(4, 4, 4, 4);
    form->setRowWrapPolicy(QFormLayout::DontWrapRows);
    form->setFieldGrowthPolicy(QFormLayout::AllNonFixedFieldsGrow);
    form->addRow(tr("Table"), file);
    form->addRow(tableInfo_);
    form->addRow(preview_);
    form->addRow(tr("Separator"), separator_);
    form->addRow(QString(), dropIncomplete_);
    form->addRow(tr("Response"), response_);
    form->addRow(tr("Model"), model_);
    form->addRow(tr("Loss"), loss_);
    auto* scaleLabel = new QLabel(tr("Loss scale"), page);
    scaleLabel->setToolTip(lossScale_->toolTip());
    form->addRow(scaleLabel, lossScale_);
    form->addRow(tr("Weights"), weights_);
    form->addRow(tr("Weights are"), weightsKind_);
    page->setLayout(form);
}

void ObjectiveEditor::userEdit() {
    if (loading_) return;
    emit changed();
    debounce_.start();
}

bool ObjectiveEditor::fitMode() const { return modes_->currentIndex() == 1; }

void ObjectiveEditor::setFitMode(bool fit) { modes_->setCurrentIndex(fit ? 1 : 0); }

QPlainTextEdit* ObjectiveEditor::activeFormulaEdit() const { return fitMode() ? model_ : formula_; }

void ObjectiveEditor::refreshLabels() {
    const bool fit = fitMode();
    variablesLabel_->setText(fit ? tr("Parameters") : tr("Variables"));
    variables_->horizontalHeaderItem(NameColumn)->setText(fit ? tr("Parameter") : tr("Variable"));
    variables_->horizontalHeaderItem(NameColumn)
        ->setToolTip(fit ? tr("Parameter of the model, estimated by the fit") : tr("Name used in the formula"));
}

void ObjectiveEditor::setStudy(const study::Study& study, const QString& baseDirectory) {
    loading_ = true;
    debounce_.stop();
    baseDirectory_ = baseDirectory;
    fit_ = study.fit;
    formula_->setPlainText(QString::fromStdString(study.formula));
    variables_->setRowCount(0);
    for (std::size_t k = 0; k < study.variables.size(); ++k) {
        const study::Variable& v = study.variables[k];
        const int row = variables_->rowCount();
        variables_->insertRow(row);
        variables_->setItem(row, NameColumn, new QTableWidgetItem(QString::fromStdString(v.name)));
        const std::string place = "variables[" + std::to_string(k) + "].";
        auto cell = [&](const char* key, double value) {
            const auto typed = study.unparsed.find(place + key);
            return typed == study.unparsed.end() ? numberItem(value)
                                                 : new QTableWidgetItem(QString::fromStdString(typed->second));
        };
        variables_->setItem(row, StartColumn, cell("start", v.start));
        variables_->setItem(row, LowerColumn, cell("plot_from", v.lower));
        variables_->setItem(row, UpperColumn, cell("plot_to", v.upper));
    }
    // Every fit control is set (or cleared) on every study, so nothing of the last one stays.
    const study::DataFit fit = study.fit.value_or(study::DataFit{});
    modes_->setCurrentIndex(study.fit ? 1 : 0);
    dataPath_->setText(QString::fromStdString(fit.dataPath));
    model_->setPlainText(QString::fromStdString(fit.model));
    loss_->setCurrentIndex(std::max(0, loss_->findData(QString::fromStdString(fit.loss))));
    lossScale_->setValue(std::isfinite(fit.lossScale) && fit.lossScale > 0 ? fit.lossScale : 1.0);
    weightsKind_->setCurrentIndex(std::max(0, weightsKind_->findData(QString::fromStdString(fit.weightsKind))));
    separator_->setCurrentIndex(std::max(0, separator_->findData(QString::fromStdString(fit.separator))));
    dropIncomplete_->setChecked(fit.dropIncompleteRows);
    response_->clear();
    weights_->clear();
    loadTablePreview();
    if (study.fit) {
        const int response = response_->findText(QString::fromStdString(fit.response));
        if (response >= 0) response_->setCurrentIndex(response);
        weights_->setCurrentIndex(std::max(0, weights_->findText(QString::fromStdString(fit.weights))));
    }
    refreshAxisChoices();
    plotX_->setCurrentIndex(std::min(study.view.plotX, plotX_->count() - 1));
    plotY_->setCurrentIndex(std::min(study.view.plotY, plotY_->count() - 1));
    follow_->setChecked(true);
    refreshHeldRows();
    refreshLabels();
    clearProblem();
    refreshNotices();
    loading_ = false;
}

QString ObjectiveEditor::dataPathFor(const QString& absolutePath) const {
    if (baseDirectory_.isEmpty()) return QDir::cleanPath(absolutePath);
    return QDir(baseDirectory_).relativeFilePath(absolutePath);
}

void ObjectiveEditor::setBaseDirectory(const QString& baseDirectory) {
    if (baseDirectory == baseDirectory_) return;
    const QString data = dataPath_->text();
    if (!data.isEmpty()) {
        const QString absolute = QDir(baseDirectory_).absoluteFilePath(data);
        const bool wasLoading = loading_;
        loading_ = true;
        baseDirectory_ = baseDirectory;
        dataPath_->setText(dataPathFor(absolute));
        loading_ = wasLoading;
    }
    baseDirectory_ = baseDirectory;
}

std::vector<study::Variable> ObjectiveEditor::variablesFromTable(std::map<std::string, std::string>* unparsed) const {
    std::vector<study::Variable> out;
    for (int row = 0; row < variables_->rowCount(); ++row) {
        const QTableWidgetItem* nameItem = variables_->item(row, NameColumn);
        study::Variable v;
        v.name = nameItem ? nameItem->text().trimmed().toStdString() : std::string();
        // Text that does not read as a number is kept as typed (for Save) and the value is NaN
        // (so the window's check names the cell).
        auto number = [&](int column, const char* key) {
            const QTableWidgetItem* item = variables_->item(row, column);
            bool ok = false;
            const double value = cellNumber(item, &ok);
            if (!ok && unparsed)
                (*unparsed)["variables[" + std::to_string(row) + "]." + key] =
                    item ? item->text().trimmed().toStdString() : std::string();
            return value;
        };
        v.start = number(StartColumn, "start");
        v.lower = number(LowerColumn, "plot_from");
        v.upper = number(UpperColumn, "plot_to");
        out.push_back(v);
    }
    return out;
}

void ObjectiveEditor::apply(study::Study& study) const {
    study.unparsed.clear();
    study.variables = variablesFromTable(&study.unparsed);
    if (fitMode()) {
        study::DataFit fit = fit_.value_or(study::DataFit{});
        fit.dataPath = dataPath_->text().toStdString();
        fit.model = model_->toPlainText().toStdString();
        fit.response = response_->currentText().toStdString();
        fit.loss = loss_->currentData().toString().toStdString();
        fit.lossScale = lossScale_->value();
        fit.weights = weights_->currentIndex() <= 0 ? std::string() : weights_->currentText().toStdString();
        fit.weightsKind = weightsKind_->currentData().toString().toStdString();
        fit.separator = separator_->currentData().toString().toStdString();
        fit.dropIncompleteRows = dropIncomplete_->isChecked();
        study.fit = fit;
        study.formula.clear();
    } else {
        study.fit.reset();
        study.formula = formula_->toPlainText().toStdString();
    }
    study.view.plotX = std::max(0, plotX_->currentIndex());
    study.view.plotY = std::max(0, plotY_->currentIndex());
}

void ObjectiveEditor::markError(QPlainTextEdit* edit, int position) {
    QList<QTextEdit::ExtraSelection> marks;
    const int length = edit->document()->characterCount() - 1;
    if (position >= 0 && length > 0) {
        QTextEdit::ExtraSelection mark;
        QTextCursor cursor(edit->document());
        const int at = std::min(position, length - 1);
        cursor.setPosition(at);
        cursor.setPosition(at + 1, QTextCursor::KeepAnchor);
        mark.cursor = cursor;
        const QColor problem = widgets::problemTextColour(palette());
        mark.format.setUnderlineStyle(QTextCharFormat::WaveUnderline);
        mark.format.setUnderlineColor(problem);
        QColor background = problem;
        background.setAlpha(60);
        mark.format.setBackground(background);
        marks.append(mark);
    }
    edit->setExtraSelections(marks);
}

void ObjectiveEditor::offerFix(const QString& text, std::function<void()> fix) {
    fixAction_ = std::move(fix);
    fix_->setText(text);
    fix_->setVisible(!text.isEmpty() && fixAction_ != nullptr);
}

QString ObjectiveEditor::fixText() const { return fix_->isVisible() ? fix_->text() : QString(); }

void ObjectiveEditor::applyFix() {
    if (!fixAction_) return;
    const auto fix = fixAction_;  // the fix may clear the problem and with it fixAction_
    fix();
}

void ObjectiveEditor::showFormulaError(const QString& message, int position, const QStringList& unknownNames) {
    markedPosition_ = position;
    markError(activeFormulaEdit(), position);
    markError(fitMode() ? formula_ : model_, -1);
    showProblem(position >= 0 ? tr("Column %1: %2").arg(position + 1).arg(message) : message);
    QStringList names;
    for (const QString& name : unknownNames)
        if (isIdentifier(name)) names << name;
    if (!names.isEmpty()) {
        const QString list = names.join(QStringLiteral(", "));
        const QStringList unused = fitMode() ? unusedParameters() : QStringList();
        if (!unused.isEmpty())  // a new fit: the model's names replace the ones it does not use
            offerFix(tr("Use %1 as the parameters (drop %2)").arg(list, unused.join(QStringLiteral(", "))),
                     [this, names, unused] { replaceParameters(unused, names); });
        else
            offerFix(fitMode() ? tr("Add %1 as parameter(s)", nullptr, static_cast<int>(names.size())).arg(list)
                               : tr("Add %1 as variable(s)", nullptr, static_cast<int>(names.size())).arg(list),
                     [this, names] { addVariablesNamed(names); });
    }
    markedPosition_ = position;
}

void ObjectiveEditor::showProblem(const QString& message, const QString& place) {
    message_->setText(message);
    message_->setStyleSheet(widgets::problemTextStyle(palette()));
    message_->setVisible(!message.isEmpty());
    offerFix({}, nullptr);
    if (place == QLatin1String("objective.checksum") && fitMode())
        offerFix(tr("Use the table as it is now"), [this] { acceptDataAsItIsNow(); });
    if (fitMode() && message.contains(QLatin1String("does not appear in the model")))
        if (const QStringList unused = unusedParameters(); !unused.isEmpty() && unused.size() < variables_->rowCount())
            offerFix(tr("Remove %1 (not in the model)").arg(unused.join(QStringLiteral(", "))),
                     [this, unused] { replaceParameters(unused, {}); });
}

QStringList ObjectiveEditor::unusedParameters() const {
    QStringList unused;
    if (!fitMode()) return unused;
    const QString model = model_->toPlainText();
    for (int row = 0; row < variables_->rowCount(); ++row) {
        const QTableWidgetItem* item = variables_->item(row, NameColumn);
        if (!item || item->text().isEmpty()) continue;
        // A whole word in the model text (a name is letters, digits and underscores).
        const QRegularExpression word(QStringLiteral("(^|[^A-Za-z0-9_])%1($|[^A-Za-z0-9_])")
                                          .arg(QRegularExpression::escape(item->text())));
        if (!word.match(model).hasMatch()) unused << item->text();
    }
    return unused;
}

void ObjectiveEditor::replaceParameters(const QStringList& drop, const QStringList& add) {
    loading_ = true;
    for (int row = variables_->rowCount() - 1; row >= 0; --row)
        if (const QTableWidgetItem* item = variables_->item(row, NameColumn); item && drop.contains(item->text()))
            variables_->removeRow(row);
    loading_ = false;
    if (add.isEmpty()) onVariablesChanged();
    else addVariablesNamed(add);  // ends with onVariablesChanged(): one edit
}

void ObjectiveEditor::clearProblem() {
    markedPosition_ = -1;
    markError(formula_, -1);
    markError(model_, -1);
    message_->clear();
    message_->setVisible(false);
    offerFix({}, nullptr);
}

QString ObjectiveEditor::problemText() const { return message_->text(); }

void ObjectiveEditor::parseActiveFormula(const study::Study& study) const {
    std::vector<std::string> symbols;
    for (const auto& v : study.variables) symbols.push_back(v.name);
    if (!study.fit) {
        (void)expr::Expression::parse(study.formula, symbols);
        return;
    }
    if (!table_) return;  // without the table the study's own check reports the problem
    for (const auto& c : table_->columnNames) symbols.push_back(c);
    (void)expr::Expression::parse(study.fit->model, symbols);
}

std::vector<std::string> ObjectiveEditor::columnNames() const {
    return table_ && fitMode() ? table_->columnNames : std::vector<std::string>{};
}

void ObjectiveEditor::setStart(const Vector& start) {
    const bool wasLoading = loading_;
    loading_ = true;
    for (int row = 0; row < variables_->rowCount() && row < start.size(); ++row)
        variables_->setItem(row, StartColumn, numberItem(start(row)));
    refreshNotices();
    loading_ = wasLoading;
}

void ObjectiveEditor::refreshHeldRows() {
    const bool wasLoading = loading_;
    loading_ = true;
    const int x = plotX_->currentIndex(), y = plotY_->currentIndex();
    // Keep typed values by name across a change of the plotted pair.
    std::map<QString, QString> typed;
    for (int row = 0; row < held_->rowCount(); ++row)
        if (held_->item(row, HeldName) && held_->item(row, HeldValue))
            typed[held_->item(row, HeldName)->text()] = held_->item(row, HeldValue)->text();
    held_->setRowCount(0);
    for (int i = 0; i < variables_->rowCount(); ++i) {
        if (i == x || i == y) continue;
        const QTableWidgetItem* nameItem = variables_->item(i, NameColumn);
        const QString name = nameItem ? nameItem->text() : QString();
        const int row = held_->rowCount();
        held_->insertRow(row);
        auto* label = new QTableWidgetItem(name);
        label->setFlags(label->flags() & ~Qt::ItemIsEditable);
        label->setData(Qt::UserRole, i);
        held_->setItem(row, HeldName, label);
        const auto it = typed.find(name);
        auto* value = new QTableWidgetItem(it != typed.end() ? it->second : QString());
        if (it == typed.end())
            if (const QTableWidgetItem* start = variables_->item(i, StartColumn)) value->setText(start->text());
        held_->setItem(row, HeldValue, value);
    }
    heldBox_->setVisible(held_->rowCount() > 0);
    loading_ = wasLoading;
}

void ObjectiveEditor::setHeldValues(const Vector& values) {
    if (!follow_->isChecked()) return;
    const bool wasLoading = loading_;
    loading_ = true;
    for (int row = 0; row < held_->rowCount(); ++row) {
        const int i = held_->item(row, HeldName)->data(Qt::UserRole).toInt();
        if (i < values.size()) {
            QTableWidgetItem* item = numberItem(values(i));
            item->setText(QString::number(values(i), 'g', 6));  // a readout; the exact value rides along
            held_->setItem(row, HeldValue, item);
        }
    }
    loading_ = wasLoading;
}

bool ObjectiveEditor::heldFollowsSelection() const { return follow_->isChecked(); }

Vector ObjectiveEditor::typedHeldValues() const {
    Vector values = Vector::Constant(variables_->rowCount(), std::nan(""));
    for (int row = 0; row < held_->rowCount(); ++row) {
        const int i = held_->item(row, HeldName)->data(Qt::UserRole).toInt();
        const QTableWidgetItem* item = held_->item(row, HeldValue);
        if (!item || i >= values.size()) continue;
        const QString text = item->text().trimmed();
        const QVariant exact = item->data(Qt::UserRole);
        if (exact.isValid() && QString::number(exact.toDouble(), 'g', 6) == text) {
            values(i) = exact.toDouble();  // shown rounded; the exact value rides along
            continue;
        }
        bool ok = false;
        const double typed = text.toDouble(&ok);
        values(i) = ok ? typed : std::nan("");
    }
    return values;
}

void ObjectiveEditor::refreshNotices() {
    // A start outside its plot range is allowed, but the path then starts off the landscape.
    QStringList outside;
    for (int row = 0; row < variables_->rowCount(); ++row) {
        bool okStart = false, okLower = false, okUpper = false;
        const double start = cellNumber(variables_->item(row, StartColumn), &okStart);
        const double lower = cellNumber(variables_->item(row, LowerColumn), &okLower);
        const double upper = cellNumber(variables_->item(row, UpperColumn), &okUpper);
        if (!(okStart && okLower && okUpper) || !(lower < upper)) continue;
        if (start < lower || start > upper) {
            const QTableWidgetItem* name = variables_->item(row, NameColumn);
            outside << tr("%1 starts at %2, outside its plot range %3 … %4")
                           .arg(name ? name->text() : QString(), numberText(start), numberText(lower), numberText(upper));
        }
    }
    const QString text = outside.isEmpty() ? QString()
                                            : tr("Note: %1; the paths start off the landscape (widen the range to see "
                                                 "them).")
                                                  .arg(outside.join(QStringLiteral("; ")));
    notice_->setText(text);
    notice_->setVisible(!text.isEmpty());
}

QString ObjectiveEditor::noticeText() const { return notice_->isVisible() ? notice_->text() : QString(); }

void ObjectiveEditor::onVariablesChanged() {
    if (loading_) return;
    refreshAxisChoices();
    refreshHeldRows();
    refreshNotices();
    userEdit();
}

void ObjectiveEditor::refreshAxisChoices() {
    const bool wasLoading = loading_;
    loading_ = true;
    const int x = plotX_->currentIndex(), y = plotY_->currentIndex();
    plotX_->clear();
    plotY_->clear();
    for (int row = 0; row < variables_->rowCount(); ++row) {
        const QTableWidgetItem* item = variables_->item(row, NameColumn);
        const QString name = item ? item->text() : QString();
        plotX_->addItem(name);
        plotY_->addItem(name);
    }
    const int n = variables_->rowCount();
    plotX_->setCurrentIndex(x >= 0 && x < n ? x : 0);
    plotY_->setCurrentIndex(y >= 0 && y < n ? y : std::min(1, n - 1));
    loading_ = wasLoading;
}

void ObjectiveEditor::addVariablesNamed(const QStringList& names) {
    loading_ = true;
    const bool fit = fitMode();
    for (const QString& name : names) {
        const int row = variables_->rowCount();
        variables_->insertRow(row);
        variables_->setItem(row, NameColumn, new QTableWidgetItem(name));
        // A parameter starts at 1 (0 would divide by zero in a rate or a scale); a variable at 0.
        variables_->setItem(row, StartColumn, numberItem(fit ? 1.0 : 0.0));
        variables_->setItem(row, LowerColumn, numberItem(fit ? 0.0 : -2.0));
        variables_->setItem(row, UpperColumn, numberItem(2.0));
    }
    loading_ = false;
    onVariablesChanged();
}

void ObjectiveEditor::addVariable() {
    const QString stem = fitMode() ? QStringLiteral("p") : QStringLiteral("x");
    QStringList taken;
    for (int row = 0; row < variables_->rowCount(); ++row)
        if (const QTableWidgetItem* item = variables_->item(row, NameColumn)) taken << item->text();
    int k = variables_->rowCount() + 1;
    while (taken.contains(stem + QString::number(k))) ++k;
    addVariablesNamed({stem + QString::number(k)});
}

void ObjectiveEditor::removeVariable() {
    const int row = variables_->currentRow();
    if (row < 0) return;
    variables_->removeRow(row);
    onVariablesChanged();
}

void ObjectiveEditor::chooseDataFile() {
    const QString title = tr("Choose a data table");
    const QString filter = tr("CSV tables (*.csv *.txt *.tsv);;All files (*)");
    const QString file = fileChooser_ ? fileChooser_(this, title, lastUsedFolder(), filter)
                                      : QFileDialog::getOpenFileName(this, title, lastUsedFolder(), filter);
    if (file.isEmpty()) return;
    rememberFolder(file);
    setDataFile(file);
}

bool ObjectiveEditor::setDataFile(const QString& path) {
    const QString absolute = QDir(baseDirectory_).absoluteFilePath(path);
    if (!fit_) fit_ = study::DataFit{};
    try {
        fit_->checksum = study::fileChecksum(absolute.toStdString());
    } catch (const std::exception& e) {
        fit_->checksum.clear();
        showProblem(tr("Cannot use %1: %2").arg(absolute, QString::fromUtf8(e.what())));
        return false;
    }
    loading_ = true;
    modes_->setCurrentIndex(1);
    dataPath_->setText(dataPathFor(absolute));
    response_->clear();  // a new table: its own response (the last column unless chosen)
    loadTablePreview();
    loading_ = false;
    refreshLabels();
    userEdit();
    return table_ != nullptr;
}

void ObjectiveEditor::acceptDataAsItIsNow() {
    if (dataPath_->text().isEmpty()) return;
    setDataFile(QDir(baseDirectory_).absoluteFilePath(dataPath_->text()));
}

void ObjectiveEditor::loadTablePreview() {
    table_.reset();
    preview_->clear();
    preview_->setRowCount(0);
    preview_->setColumnCount(0);
    const QString keepResponse = response_->currentText(), keepWeights = weights_->currentText();
    response_->clear();
    weights_->clear();
    weights_->addItem(tr("(none)"));
    tableInfo_->clear();
    tableInfo_->setStyleSheet(QString());
    if (dataPath_->text().isEmpty()) return;
    const QString path = QDir(baseDirectory_).absoluteFilePath(dataPath_->text());
    TableReadOptions options;
    parseSeparator(separator_->currentData().toString().toStdString(), options.separator);
    options.dropIncompleteRows = dropIncomplete_->isChecked();
    try {
        table_ = std::make_shared<Table>(readTable(path.toStdString(), options));
    } catch (const std::exception& e) {
        tableInfo_->setText(QString::fromUtf8(e.what()));
        tableInfo_->setStyleSheet(widgets::problemTextStyle(palette()));
        return;
    }
    tableInfo_->setText(QString::fromStdString(table_->summary()));
    const int columns = table_->columnCount();
    const int rows = static_cast<int>(std::min<std::size_t>(table_->rowCount(), 50));
    preview_->setColumnCount(columns);
    preview_->setRowCount(rows);
    QStringList headers;
    for (const auto& name : table_->columnNames) headers << QString::fromStdString(name);
    preview_->setHorizontalHeaderLabels(headers);
    for (int c = 0; c < columns; ++c)
        for (int r = 0; r < rows; ++r)
            preview_->setItem(r, c, new QTableWidgetItem(QString::number(table_->columns[static_cast<std::size_t>(c)]
                                                                                   [static_cast<std::size_t>(r)], 'g', 8)));
    response_->addItems(headers);
    weights_->addItems(headers);
    // The response is usually the last column (inputs first, the measured outcome last).
    if (response_->findText(keepResponse) >= 0)
        response_->setCurrentText(keepResponse);
    else
        response_->setCurrentIndex(response_->count() - 1);
    if (weights_->findText(keepWeights) >= 0) weights_->setCurrentText(keepWeights);
}

QString ObjectiveEditor::tableSummary() const { return tableInfo_->text(); }

void ObjectiveEditor::changeEvent(QEvent* event) {
    if (event->type() == QEvent::PaletteChange || event->type() == QEvent::ApplicationPaletteChange)
        message_->setStyleSheet(widgets::problemTextStyle(palette()));
    QWidget::changeEvent(event);
}

}  // namespace sw::window
