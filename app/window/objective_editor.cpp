// (Include order: core headers first, then Qt.)
#include "core/expr/expr.h"

#include "app/window/objective_editor.h"
#include "core/objective/table.h"
#include "widgets/theme.h"

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
#include <QSplitter>
#include <QTabWidget>
#include <QTableWidget>
#include <QTextBlock>
#include <QVBoxLayout>
#include <cmath>

namespace sw::window {

namespace {

enum VariableColumn { NameColumn, StartColumn, LowerColumn, UpperColumn, VariableColumnCount };

QString numberText(double v) { return QString::number(v, 'g', 10); }

// Derivative formulas get long; the panes show at most this much of each.
constexpr int kMaxShownFormula = 4000;

QString clipped(const std::string& text) {
    QString s = QString::fromStdString(text);
    if (s.size() > kMaxShownFormula) s = s.left(kMaxShownFormula) + QObject::tr(" … (%1 characters)").arg(text.size());
    return s;
}

QPlainTextEdit* makeFormulaEdit(QWidget* parent, const QString& placeholder, const QString& tip) {
    auto* edit = new QPlainTextEdit(parent);
    edit->setPlaceholderText(placeholder);
    edit->setToolTip(tip);
    QFont mono = QFontDatabase::systemFont(QFontDatabase::FixedFont);
    edit->setFont(mono);
    edit->setTabChangesFocus(true);
    edit->setMaximumHeight(edit->fontMetrics().lineSpacing() * 5 + 12);
    return edit;
}

QPlainTextEdit* makeReadOnlyPane(QWidget* parent, const QString& tip) {
    auto* pane = new QPlainTextEdit(parent);
    pane->setReadOnly(true);
    pane->setFont(QFontDatabase::systemFont(QFontDatabase::FixedFont));
    pane->setToolTip(tip);
    pane->setLineWrapMode(QPlainTextEdit::WidgetWidth);
    return pane;
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

    variables_ = new QTableWidget(0, VariableColumnCount, this);
    variables_->setHorizontalHeaderLabels({tr("Name"), tr("Start"), tr("Plot from"), tr("Plot to")});
    variables_->horizontalHeader()->setSectionResizeMode(QHeaderView::Stretch);
    variables_->verticalHeader()->setVisible(false);
    // Room for four variables before scrolling.
    variables_->setMinimumHeight(variables_->horizontalHeader()->sizeHint().height() +
                                 4 * variables_->verticalHeader()->defaultSectionSize() + 4);
    variables_->setToolTip(tr("Variables (or fit parameters): name, start value and the range shown on the plots"));
    variables_->horizontalHeaderItem(NameColumn)->setToolTip(tr("Name used in the formula"));
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
    held_ = new QLabel(this);
    held_->setWordWrap(true);
    held_->setToolTip(tr("With more than two variables, the others are held at the selected iterate"));
    auto axisChanged = [this] {
        if (!loading_) emit plotAxesChanged();
    };
    connect(plotX_, &QComboBox::currentIndexChanged, this, axisChanged);
    connect(plotY_, &QComboBox::currentIndexChanged, this, axisChanged);

    gradient_ = makeReadOnlyPane(this, tr("The exact gradient, as formulas"));
    hessian_ = makeReadOnlyPane(this, tr("The exact Hessian (upper triangle), as formulas"));
    auto* derivatives = new QTabWidget(this);
    derivatives->addTab(gradient_, tr("Gradient"));
    derivatives->addTab(hessian_, tr("Hessian"));
    derivatives->setToolTip(tr("Exact derivatives, derived symbolically from the formula"));

    auto* buttons = new QHBoxLayout;
    buttons->addWidget(new QLabel(tr("Variables"), this));
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

    auto* top = new QWidget(this);
    auto* topLayout = new QVBoxLayout(top);
    topLayout->setContentsMargins(0, 0, 0, 0);
    modes_->setSizePolicy(QSizePolicy::Preferred, QSizePolicy::Maximum);
    topLayout->addWidget(modes_);
    topLayout->addWidget(message_);
    topLayout->addLayout(buttons);
    topLayout->addWidget(variables_, 1);
    topLayout->addLayout(axes);
    topLayout->addWidget(held_);
    auto* splitter = new QSplitter(Qt::Vertical, this);
    splitter->addWidget(top);
    splitter->addWidget(derivatives);
    splitter->setStretchFactor(0, 3);
    splitter->setStretchFactor(1, 1);
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addWidget(splitter);

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
        scheduleEdited();
    });
}

ObjectiveEditor::~ObjectiveEditor() = default;

void ObjectiveEditor::buildFormulaPage(QWidget* page) {
    formula_ = makeFormulaEdit(page, tr("e.g. (1 - a)^2 + 40*(b - a^2)^2"),
                               tr("The objective as a formula; + - * / ^, functions such as exp, log, sin, sqrt, "
                                  "min, max and c ? a : b are allowed. Errors are marked as you type."));
    connect(formula_, &QPlainTextEdit::textChanged, this, [this] { scheduleEdited(); });
    auto* layout = new QVBoxLayout(page);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addWidget(formula_);
    layout->addStretch(1);
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
    tableInfo_->setToolTip(tr("Rows, columns and the separator found in the table"));
    preview_ = new QTableWidget(page);
    preview_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    preview_->setToolTip(tr("The first rows of the table, as read"));
    preview_->setMaximumHeight(140);
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

    for (QObject* w : {static_cast<QObject*>(response_), static_cast<QObject*>(loss_),
                       static_cast<QObject*>(weights_), static_cast<QObject*>(weightsKind_)})
        connect(qobject_cast<QComboBox*>(w), &QComboBox::currentIndexChanged, this, [this] { scheduleEdited(); });
    connect(lossScale_, &QDoubleSpinBox::valueChanged, this, [this] { scheduleEdited(); });
    // Controls that do nothing in the current choice are greyed out rather than left to puzzle.
    auto greyOutUnused = [this] {
        const QString loss = loss_->currentData().toString().isEmpty() ? loss_->currentText() : loss_->currentData().toString();
        lossScale_->setEnabled(loss.contains("huber", Qt::CaseInsensitive) || loss.contains("cauchy", Qt::CaseInsensitive));
        weightsKind_->setEnabled(weights_->currentIndex() > 0);
    };
    connect(loss_, &QComboBox::currentIndexChanged, this, greyOutUnused);
    connect(weights_, &QComboBox::currentIndexChanged, this, greyOutUnused);
    greyOutUnused();
    connect(model_, &QPlainTextEdit::textChanged, this, [this] { scheduleEdited(); });

    auto* file = new QHBoxLayout;
    file->addWidget(dataPath_, 1);
    file->addWidget(browse_);
    auto* form = new QFormLayout;
    form->addRow(tr("Table"), file);
    form->addRow(QString(), tableInfo_);
    form->addRow(preview_);
    form->addRow(tr("Response"), response_);
    form->addRow(tr("Model"), model_);
    form->addRow(tr("Loss"), loss_);
    form->addRow(tr("Loss scale"), lossScale_);
    auto* weightRow = new QHBoxLayout;
    weightRow->addWidget(weights_, 1);
    weightRow->addWidget(weightsKind_);
    form->addRow(tr("Weights"), weightRow);
    page->setLayout(form);
}

void ObjectiveEditor::scheduleEdited() {
    if (loading_) return;
    debounce_.start();
}

bool ObjectiveEditor::fitMode() const { return modes_->currentIndex() == 1; }

QPlainTextEdit* ObjectiveEditor::activeFormulaEdit() const { return fitMode() ? model_ : formula_; }

void ObjectiveEditor::setStudy(const study::Study& study, const QString& baseDirectory) {
    loading_ = true;
    baseDirectory_ = baseDirectory;
    fit_ = study.fit;
    formula_->setPlainText(QString::fromStdString(study.formula));
    variables_->setRowCount(0);
    for (const auto& v : study.variables) {
        const int row = variables_->rowCount();
        variables_->insertRow(row);
        variables_->setItem(row, NameColumn, new QTableWidgetItem(QString::fromStdString(v.name)));
        variables_->setItem(row, StartColumn, new QTableWidgetItem(numberText(v.start)));
        variables_->setItem(row, LowerColumn, new QTableWidgetItem(numberText(v.lower)));
        variables_->setItem(row, UpperColumn, new QTableWidgetItem(numberText(v.upper)));
    }
    if (study.fit) {
        modes_->setCurrentIndex(1);
        dataPath_->setText(QString::fromStdString(study.fit->dataPath));
        model_->setPlainText(QString::fromStdString(study.fit->model));
        loss_->setCurrentIndex(std::max(0, loss_->findData(QString::fromStdString(study.fit->loss))));
        lossScale_->setValue(study.fit->lossScale);
        weightsKind_->setCurrentIndex(std::max(0, weightsKind_->findData(QString::fromStdString(study.fit->weightsKind))));
        loadTablePreview();
        response_->setCurrentIndex(std::max(0, response_->findText(QString::fromStdString(study.fit->response))));
        weights_->setCurrentIndex(std::max(0, weights_->findText(QString::fromStdString(study.fit->weights))));
    } else {
        modes_->setCurrentIndex(0);
        dataPath_->clear();
        model_->clear();
        table_.reset();
        preview_->clear();
        preview_->setRowCount(0);
        tableInfo_->clear();
    }
    refreshAxisChoices();
    plotX_->setCurrentIndex(std::min(study.view.plotX, plotX_->count() - 1));
    plotY_->setCurrentIndex(std::min(study.view.plotY, plotY_->count() - 1));
    clearProblem();
    loading_ = false;
}

std::vector<study::Variable> ObjectiveEditor::variablesFromTable() const {
    std::vector<study::Variable> out;
    for (int row = 0; row < variables_->rowCount(); ++row) {
        auto text = [&](int column) {
            const QTableWidgetItem* item = variables_->item(row, column);
            return item ? item->text().trimmed() : QString();
        };
        study::Variable v;
        v.name = text(NameColumn).toStdString();
        // Unreadable numbers become NaN so the study's validation names the cell.
        auto number = [&](int column) {
            bool ok = false;
            const double value = text(column).toDouble(&ok);
            return ok ? value : std::nan("");
        };
        v.start = number(StartColumn);
        v.lower = number(LowerColumn);
        v.upper = number(UpperColumn);
        out.push_back(v);
    }
    return out;
}

void ObjectiveEditor::apply(study::Study& study) const {
    study.variables = variablesFromTable();
    if (fitMode()) {
        study::DataFit fit = fit_.value_or(study::DataFit{});
        const std::string path = dataPath_->text().toStdString();
        if (path != fit.dataPath) fit.checksum.clear();
        fit.dataPath = path;
        fit.model = model_->toPlainText().toStdString();
        fit.response = response_->currentText().toStdString();
        fit.loss = loss_->currentData().toString().toStdString();
        fit.lossScale = lossScale_->value();
        fit.weights = weights_->currentIndex() <= 0 ? std::string() : weights_->currentText().toStdString();
        fit.weightsKind = weightsKind_->currentData().toString().toStdString();
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
        mark.format.setUnderlineStyle(QTextCharFormat::WaveUnderline);
        mark.format.setUnderlineColor(QColor(0xd0, 0x10, 0x10));
        mark.format.setBackground(QColor(0xff, 0x40, 0x40, 60));
        marks.append(mark);
    }
    edit->setExtraSelections(marks);
}

void ObjectiveEditor::showFormulaError(const QString& message, int position) {
    markedPosition_ = position;
    markError(activeFormulaEdit(), position);
    markError(fitMode() ? formula_ : model_, -1);
    showProblem(position >= 0 ? tr("Column %1: %2").arg(position + 1).arg(message) : message);
    markedPosition_ = position;
}

void ObjectiveEditor::showProblem(const QString& message) {
    message_->setText(message);
    message_->setStyleSheet(widgets::problemTextStyle(palette()));
    message_->setVisible(!message.isEmpty());
}

void ObjectiveEditor::clearProblem() {
    markedPosition_ = -1;
    markError(formula_, -1);
    markError(model_, -1);
    message_->clear();
    message_->setVisible(false);
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

void ObjectiveEditor::showDerivatives(const study::Study& study) {
    QString gradientText, hessianText;
    try {
        std::vector<std::string> names;
        for (const auto& v : study.variables) names.push_back(v.name);
        if (!study.fit) {
            expr::DerivativeSet set(study.formula, names, 2);
            const int n = set.dimension();
            for (int i = 0; i < n; ++i)
                gradientText += QStringLiteral("∂f/∂%1 = %2\n").arg(QString::fromStdString(names[static_cast<std::size_t>(i)]),
                                                                     clipped(set.gradient()[static_cast<std::size_t>(i)].toText()));
            for (int i = 0; i < n; ++i)
                for (int j = i; j < n; ++j)
                    hessianText += QStringLiteral("∂²f/∂%1∂%2 = %3\n")
                                       .arg(QString::fromStdString(names[static_cast<std::size_t>(i)]),
                                            QString::fromStdString(names[static_cast<std::size_t>(j)]),
                                            clipped(set.hessianUpper()[expr::DerivativeSet::hessianIndex(i, j, n)].toText()));
        } else {
            // The fit's objective sums over rows; what reads well is the model's own derivatives.
            std::vector<std::string> symbols = names;
            if (table_)
                for (const auto& c : table_->columnNames) symbols.push_back(c);
            const auto model = expr::Expression::parse(study.fit->model, symbols);
            std::vector<int> wrt;
            for (int i = 0; i < static_cast<int>(names.size()); ++i) wrt.push_back(i);
            const auto g = expr::gradient(model, wrt);
            const auto h = expr::hessianUpper(model, wrt);
            const int n = static_cast<int>(names.size());
            gradientText = tr("Derivatives of the model in its parameters:\n");
            for (int i = 0; i < n; ++i)
                gradientText += QStringLiteral("∂model/∂%1 = %2\n")
                                    .arg(QString::fromStdString(names[static_cast<std::size_t>(i)]),
                                         clipped(g[static_cast<std::size_t>(i)].toText()));
            hessianText = tr("Second derivatives of the model:\n");
            for (int i = 0; i < n; ++i)
                for (int j = i; j < n; ++j)
                    hessianText += QStringLiteral("∂²model/∂%1∂%2 = %3\n")
                                       .arg(QString::fromStdString(names[static_cast<std::size_t>(i)]),
                                            QString::fromStdString(names[static_cast<std::size_t>(j)]),
                                            clipped(h[expr::DerivativeSet::hessianIndex(i, j, n)].toText()));
        }
    } catch (const std::exception& e) {
        gradientText = tr("(not available: %1)").arg(QString::fromUtf8(e.what()));
        hessianText = gradientText;
    }
    gradient_->setPlainText(gradientText.trimmed());
    hessian_->setPlainText(hessianText.trimmed());
}

QString ObjectiveEditor::gradientText() const { return gradient_->toPlainText(); }
QString ObjectiveEditor::hessianText() const { return hessian_->toPlainText(); }

void ObjectiveEditor::setStart(const Vector& start) {
    const bool wasLoading = loading_;
    loading_ = true;
    for (int row = 0; row < variables_->rowCount() && row < start.size(); ++row) {
        QTableWidgetItem* item = variables_->item(row, StartColumn);
        if (!item) variables_->setItem(row, StartColumn, item = new QTableWidgetItem);
        item->setText(QString::number(start(row), 'g', 6));
    }
    loading_ = wasLoading;
}

void ObjectiveEditor::setHeldText(const QString& text) {
    held_->setText(text);
    held_->setVisible(!text.isEmpty());
}

void ObjectiveEditor::onVariablesChanged() {
    if (loading_) return;
    refreshAxisChoices();
    scheduleEdited();
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

void ObjectiveEditor::addVariable() {
    const int row = variables_->rowCount();
    loading_ = true;
    variables_->insertRow(row);
    QString name = fitMode() ? QStringLiteral("p%1").arg(row + 1) : QStringLiteral("x%1").arg(row + 1);
    variables_->setItem(row, NameColumn, new QTableWidgetItem(name));
    variables_->setItem(row, StartColumn, new QTableWidgetItem("0"));
    variables_->setItem(row, LowerColumn, new QTableWidgetItem("-2"));
    variables_->setItem(row, UpperColumn, new QTableWidgetItem("2"));
    loading_ = false;
    onVariablesChanged();
}

void ObjectiveEditor::removeVariable() {
    const int row = variables_->currentRow();
    if (row < 0) return;
    variables_->removeRow(row);
    onVariablesChanged();
}

void ObjectiveEditor::chooseDataFile() {
    const QString file = QFileDialog::getOpenFileName(this, tr("Choose a data table"), baseDirectory_,
                                                      tr("CSV tables (*.csv *.txt *.tsv);;All files (*)"));
    if (file.isEmpty()) return;
    const QString relative = baseDirectory_.isEmpty() ? file : QDir(baseDirectory_).relativeFilePath(file);
    dataPath_->setText(relative);
    if (fit_) fit_->checksum.clear();
    loading_ = true;
    loadTablePreview();
    loading_ = false;
    scheduleEdited();
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
    if (dataPath_->text().isEmpty()) {
        tableInfo_->clear();
        return;
    }
    const QString path = QDir(baseDirectory_).absoluteFilePath(dataPath_->text());
    try {
        table_ = std::make_shared<Table>(readTable(path.toStdString()));
    } catch (const std::exception& e) {
        tableInfo_->setText(QString::fromUtf8(e.what()));
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
    if (response_->findText(keepResponse) >= 0) response_->setCurrentText(keepResponse);
    if (weights_->findText(keepWeights) >= 0) weights_->setCurrentText(keepWeights);
}

QString ObjectiveEditor::tableSummary() const { return tableInfo_->text(); }

void ObjectiveEditor::changeEvent(QEvent* event) {
    if (event->type() == QEvent::PaletteChange || event->type() == QEvent::ApplicationPaletteChange)
        message_->setStyleSheet(widgets::problemTextStyle(palette()));
    QWidget::changeEvent(event);
}

}  // namespace sw::window
