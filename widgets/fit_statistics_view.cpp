#include "widgets/fit_statistics_view.h"

#include "core/study/provenance.h"
#include "widgets/theme.h"

#include <QEvent>
#include <QLabel>
#include <QScrollBar>
#include <QTextBrowser>
#include <QVBoxLayout>
#include <algorithm>
#include <charconv>
#include <cmath>

namespace sw::widgets {

namespace {

QString escaped(const std::string& text) { return QString::fromStdString(text).toHtmlEscaped(); }

// Significant digits, as the command line's text report prints them (app/cli/fit_report.cpp).
constexpr int kEstimateDigits = 10;
constexpr int kIntervalDigits = 6;
constexpr int kErrorDigits = 4;
constexpr int kRelativeDigits = 3;

QString mix(const QColor& a, const QColor& b, double t) {
    t = std::clamp(t, 0.0, 1.0);
    return QColor::fromRgbF(static_cast<float>(a.redF() * (1 - t) + b.redF() * t),
                            static_cast<float>(a.greenF() * (1 - t) + b.greenF() * t),
                            static_cast<float>(a.blueF() * (1 - t) + b.blueF() * t))
        .name();
}

QString correlationText(double r) {
    if (std::isnan(r)) return QStringLiteral("—");
    return QString::asprintf("%+.4f", r);
}

}  // namespace

QString FitStatisticsView::number(double value, int significant) {
    if (std::isnan(value)) return QStringLiteral("nan");
    if (std::isinf(value)) return value > 0 ? QStringLiteral("inf") : QStringLiteral("-inf");
    char buffer[64];
    auto [end, error] = std::to_chars(buffer, buffer + sizeof buffer, value, std::chars_format::general, significant);
    return error == std::errc() ? QString::fromLatin1(buffer, static_cast<int>(end - buffer)) : QStringLiteral("?");
}

FitStatisticsView::FitStatisticsView(QWidget* parent) : QWidget(parent) {
    setObjectName("fit-statistics-view");
    browser_ = new QTextBrowser(this);
    browser_->setObjectName("fit-statistics-text");
    browser_->setOpenLinks(false);
    browser_->setFrameShape(QFrame::NoFrame);
    browser_->setToolTip(tr("The selected run's fit statistics; select text to copy it"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->setSpacing(0);
    layout->addWidget(browser_, 1);
    message_ = tr("No run yet.");
    render();
}

void FitStatisticsView::setSnapshot(std::shared_ptr<const FitSnapshot> snapshot) {
    snapshot_ = std::move(snapshot);
    message_.clear();
    busy_ = false;
    render();
}

void FitStatisticsView::showMessage(const QString& message) {
    snapshot_.reset();
    message_ = message;
    busy_ = false;
    render();
}

void FitStatisticsView::setBusy(bool busy) {
    if (busy_ == busy) return;
    busy_ = busy;
    render();
}

QStringList FitStatisticsView::parameterCells(int parameter) const {
    if (!snapshot_ || parameter < 0) return {};
    const fit::FitStatistics& st = snapshot_->statistics;
    const auto k = static_cast<std::size_t>(parameter);
    if (k >= st.names.size() || st.estimates.size() <= parameter) return {};
    const auto i = static_cast<Eigen::Index>(parameter);
    const double estimate = st.estimates[i];
    const QString name = QString::fromStdString(st.names[k]);
    if (k < st.notDetermined.size() && st.notDetermined[k])
        return {name, number(estimate, kEstimateDigits), tr("not determined by the data")};
    const double se = st.standardErrors[i];
    QString relative = QStringLiteral("—");
    if (std::isfinite(se) && std::isfinite(estimate) && estimate != 0)
        relative = number(100 * se / std::fabs(estimate), kRelativeDigits) + QStringLiteral("%");
    return {name, number(estimate, kEstimateDigits), number(st.lower[i], kIntervalDigits),
            number(st.upper[i], kIntervalDigits), number(se, kErrorDigits), relative};
}

QString FitStatisticsView::text() const { return browser_->toPlainText(); }
QString FitStatisticsView::cautionText() const { return QString::fromStdString(study::cautionLine()); }

void FitStatisticsView::changeEvent(QEvent* event) {
    QWidget::changeEvent(event);
    if (event->type() == QEvent::PaletteChange || event->type() == QEvent::ApplicationPaletteChange) render();
}

void FitStatisticsView::render() {
    const QPalette pal = palette();
    const QString muted = mix(pal.color(QPalette::Text), pal.color(QPalette::Base), 0.4);
    const QString headerBackground = mix(pal.color(QPalette::Base), pal.color(QPalette::Text), 0.08);
    const QString warningColour = problemTextColour(pal).name();
    // The caution closes every page the panel shows (a fixed line under a short panel would
    // leave no room for the numbers).
    const QString caution = QStringLiteral("<p style=\"color: %1; margin-top: 8px;\"><i>%2</i></p>")
                                .arg(muted, cautionText().toHtmlEscaped());

    QString html = QStringLiteral("<html><body style=\"margin: 4px;\">");
    auto th = [&](const QString& text, bool left = false) {
        return QStringLiteral("<th align=\"%1\" style=\"background-color: %2; padding: 2px 6px; white-space: nowrap;\">%3</th>")
            .arg(left ? QStringLiteral("left") : QStringLiteral("right"), headerBackground, text);
    };
    auto td = [](const QString& text, bool left = false, const QString& extra = {}) {
        return QStringLiteral("<td align=\"%1\" style=\"padding: 2px 6px; white-space: nowrap;%2\">%3</td>")
            .arg(left ? QStringLiteral("left") : QStringLiteral("right"), extra, text);
    };

    if (!snapshot_) {
        html += QStringLiteral("<p style=\"color: %1;\">%2</p>").arg(muted, message_.toHtmlEscaped());
        html += caution + QStringLiteral("</body></html>");
        browser_->setHtml(html);
        return;
    }
    const FitSnapshot& s = *snapshot_;
    const fit::FitStatistics& st = s.statistics;
    const FitDefinition& def = s.definition;

    // Which run, and how it ended.
    QString state;
    if (!s.finished)
        state = tr("still running; the statistics describe iteration %1").arg(s.iteration);
    else if (solve::isConvergence(s.termination))
        state = tr("converged after %n iteration(s) (%1)", nullptr, s.iteration).arg(escaped(solve::toString(s.termination)));
    else
        state = tr("stopped after %n iteration(s) without converging (%1)", nullptr, s.iteration)
                    .arg(escaped(solve::toString(s.termination)));
    html += QStringLiteral("<p><b>%1</b> <span style=\"color: %2;\">(%3)</span> — %4%5</p>")
                .arg(s.runLabel.toHtmlEscaped(), muted, escaped(s.methodId), state,
                     busy_ ? QStringLiteral(" <i style=\"color: %1;\">%2</i>").arg(muted, tr("updating…")) : QString());
    html += QStringLiteral("<p style=\"margin-top: 0;\">%1<br>%2</p>")
                .arg(tr("Equation: %1").arg(s.equation.toHtmlEscaped()), tr("Loss: %1").arg(s.lossText.toHtmlEscaped()));

    if (!s.problem.isEmpty()) {
        html += QStringLiteral("<p style=\"color: %1;\">%2</p>%3</body></html>")
                    .arg(warningColour, tr("No statistics: %1").arg(s.problem.toHtmlEscaped()), caution);
        browser_->setHtml(html);
        return;
    }

    // Warnings first: they say how far to trust everything below.
    if (!s.warnings.empty()) {
        html += QStringLiteral("<p style=\"color: %1; margin-bottom: 0;\"><b>%2</b></p><ul style=\"margin-top: 0;\">")
                    .arg(warningColour, tr("Warnings"));
        for (const std::string& w : s.warnings) html += QStringLiteral("<li>%1</li>").arg(escaped(w));
        html += QStringLiteral("</ul>");
    }

    // Estimates.
    const int percent = static_cast<int>(std::lround(st.confidenceLevel * 100));
    const QString distribution = st.likelihood ? tr("the normal distribution")
                                               : tr("the t distribution with %1 degrees of freedom").arg(st.degreesOfFreedom);
    html += QStringLiteral("<p style=\"margin-bottom: 2px;\"><b>%1</b> %2</p>")
                .arg(tr("Estimates"), tr("with %1% intervals from %2").arg(percent).arg(distribution));
    html += QStringLiteral("<table cellspacing=\"0\" cellpadding=\"0\">");
    html += QStringLiteral("<tr>%1%2%3%4%5%6</tr>")
                .arg(th(tr("parameter"), true), th(tr("estimate")), th(tr("%1% interval from").arg(percent)), th(tr("to")),
                     th(tr("standard error")), th(tr("relative")));
    for (int k = 0; k < static_cast<int>(st.names.size()); ++k) {
        const QStringList cells = parameterCells(k);
        if (cells.size() == 3) {
            html += QStringLiteral("<tr>%1%2<td colspan=\"4\" align=\"left\" style=\"padding: 2px 6px; color: %3;\">"
                                   "<i>%4</i></td></tr>")
                        .arg(td(cells[0].toHtmlEscaped(), true), td(cells[1]), warningColour, cells[2].toHtmlEscaped());
            continue;
        }
        QString row = td(cells.value(0).toHtmlEscaped(), true);
        for (int c = 1; c < cells.size(); ++c) row += td(cells[c]);
        html += QStringLiteral("<tr>%1</tr>").arg(row);
    }
    html += QStringLiteral("</table>");
    for (const fit::DeterminedCombination& c : st.determinedCombinations)
        html += QStringLiteral("<p style=\"margin: 2px 0;\">%1</p>")
                    .arg(tr("Determined by the data: %1 = %2, standard error %3, interval [%4, %5]")
                             .arg(escaped(c.text), number(c.estimate, kEstimateDigits), number(c.standardError, kErrorDigits),
                                  number(c.lower, kIntervalDigits), number(c.upper, kIntervalDigits)));

    // Correlations (lower triangle) beside how well the model fits.
    QString correlations;
    const int p = static_cast<int>(st.names.size());
    if (p >= 2 && st.correlation.rows() == p) {
        const QColor base = pal.color(QPalette::Base), strong = pal.color(QPalette::Highlight);
        correlations = QStringLiteral("<p style=\"margin-bottom: 2px;\"><b>%1</b></p><table cellspacing=\"0\" "
                                      "cellpadding=\"0\"><tr>%2")
                           .arg(tr("Correlations between estimates"), th(QString()));
        for (int b = 0; b < p - 1; ++b) correlations += th(escaped(st.names[static_cast<std::size_t>(b)]));
        correlations += QStringLiteral("</tr>");
        for (int a = 1; a < p; ++a) {
            correlations += QStringLiteral("<tr>") + th(escaped(st.names[static_cast<std::size_t>(a)]), true);
            for (int b = 0; b < p - 1; ++b) {
                if (b >= a) {
                    correlations += td(QString());
                    continue;
                }
                const double r = st.correlation(a, b);
                // Strong correlations stand out: the cell is tinted by |r|^2 toward the highlight.
                const QString tint = std::isnan(r) ? QString()
                                                   : QStringLiteral(" background-color: %1;").arg(mix(base, strong, 0.6 * r * r));
                correlations += td(correlationText(r), false, tint);
            }
            correlations += QStringLiteral("</tr>");
        }
        correlations += QStringLiteral("</table><p style=\"margin-top: 2px; color: %1;\">%2</p>")
                            .arg(muted, tr("covariance: %1").arg(escaped(st.covarianceMethod)));
    }

    QString quality = QStringLiteral("<p style=\"margin-bottom: 2px;\"><b>%1</b></p><table cellspacing=\"0\" cellpadding=\"0\">")
                          .arg(tr("How well the model fits"));
    auto qualityRow = [&](const QString& label, const QString& value) {
        quality += QStringLiteral("<tr>%1%2</tr>").arg(td(label.toHtmlEscaped(), true), td(value));
    };
    qualityRow(tr("rows"), QString::number(st.rows));
    qualityRow(tr("parameters"), QString::number(st.parameters));
    qualityRow(tr("degrees of freedom"), QString::number(st.degreesOfFreedom));
    if (st.likelihood) {
        qualityRow(tr("deviance"), number(st.deviance, 8));
        qualityRow(tr("log-likelihood"), number(st.logLikelihood, 8));
        qualityRow(tr("AIC (2 × parameters − 2 × log-likelihood)"), number(2.0 * st.parameters - 2.0 * st.logLikelihood, 8));
        if (def.loss == Loss::PoissonLog && st.degreesOfFreedom > 0)
            qualityRow(tr("deviance / degrees of freedom (near 1 for Poisson counts)"), number(st.deviance / st.degreesOfFreedom, 4));
    } else {
        const bool weighted = !def.weights.empty() || !def.sigma.empty();
        if (def.loss == Loss::Huber || def.loss == Loss::Cauchy)
            qualityRow(tr("robust loss at the estimates"), number(st.objectiveValue, 8));
        qualityRow(weighted ? tr("weighted residual sum of squares") : tr("residual sum of squares"),
                   number(st.residualSumOfSquares, 8));
        qualityRow(weighted ? tr("residual standard deviation (weighted)") : tr("residual standard deviation"),
                   number(st.residualStandardDeviation, 6));
    }
    qualityRow(st.likelihood ? tr("rank of the information's square root") : tr("rank of the Jacobian"),
               tr("%1 of %2").arg(st.rank).arg(st.parameters));
    qualityRow(tr("condition number (unit-norm columns)"), number(st.scaledCondition, 4));
    quality += QStringLiteral("</table>");

    html += QStringLiteral("<table cellspacing=\"0\" cellpadding=\"0\" style=\"margin-top: 6px;\"><tr>"
                           "<td valign=\"top\" style=\"padding-right: 24px;\">%1</td><td valign=\"top\">%2</td></tr></table>")
                .arg(quality, correlations);
    html += caution + QStringLiteral("</body></html>");
    const int scroll = browser_->verticalScrollBar() ? browser_->verticalScrollBar()->value() : 0;
    browser_->setHtml(html);
    if (browser_->verticalScrollBar()) browser_->verticalScrollBar()->setValue(scroll);
}

}  // namespace sw::widgets
