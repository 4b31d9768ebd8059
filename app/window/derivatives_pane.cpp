// (Include order: core headers first, then Qt.)
#include "core/expr/expr.h"

#include "app/window/derivatives_pane.h"

#include <QFontDatabase>
#include <QPlainTextEdit>
#include <QTabWidget>
#include <QVBoxLayout>

namespace sw::window {

namespace {

// Derivative formulas get long; the panes show at most this much of each.
constexpr int kMaxShownFormula = 4000;

QString clipped(const std::string& text) {
    QString s = QString::fromStdString(text);
    if (s.size() > kMaxShownFormula) s = s.left(kMaxShownFormula) + QObject::tr(" … (%1 characters)").arg(text.size());
    return s;
}

QPlainTextEdit* makeReadOnlyPane(QWidget* parent, const QString& tip) {
    auto* pane = new QPlainTextEdit(parent);
    pane->setReadOnly(true);
    pane->setFont(QFontDatabase::systemFont(QFontDatabase::FixedFont));
    pane->setToolTip(tip);
    pane->setLineWrapMode(QPlainTextEdit::WidgetWidth);
    pane->setMinimumHeight(pane->fontMetrics().lineSpacing() * 2 + 12);
    return pane;
}

}  // namespace

DerivativesPane::DerivativesPane(QWidget* parent) : QWidget(parent) {
    gradient_ = makeReadOnlyPane(this, tr("The exact gradient, as formulas"));
    hessian_ = makeReadOnlyPane(this, tr("The exact Hessian (upper triangle), as formulas"));
    tabs_ = new QTabWidget(this);
    tabs_->addTab(gradient_, tr("Gradient"));
    tabs_->addTab(hessian_, tr("Hessian"));
    tabs_->setToolTip(tr("Exact derivatives, derived symbolically from the formula"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(4, 4, 4, 4);
    layout->addWidget(tabs_);
}

void DerivativesPane::clear() {
    gradient_->clear();
    hessian_->clear();
}

void DerivativesPane::showDerivatives(const study::Study& study, const std::vector<std::string>& columns) {
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
            std::vector<std::string> symbols = names;
            symbols.insert(symbols.end(), columns.begin(), columns.end());
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

QString DerivativesPane::gradientText() const { return gradient_->toPlainText(); }
QString DerivativesPane::hessianText() const { return hessian_->toPlainText(); }

}  // namespace sw::window
