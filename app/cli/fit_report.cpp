// The fit verb's text report (see fit_report.h). The JSON document is written by verb_fit.cpp.
#include "app/cli/fit_report.h"

#include "app/cli/cli.h"
#include "app/cli/run_report.h"
#include "core/study/provenance.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <ostream>
#include <string>
#include <vector>

namespace sw::cli {

namespace {

std::string num(double v, int significant = 6) { return formatNumber(v, significant); }

std::size_t columns(const std::string& text) {
    std::size_t n = 0;
    for (unsigned char c : text) n += (c & 0xC0) != 0x80;
    return n;
}

// Rows of cells printed with each column as wide as its widest cell; the first column is
// left-aligned, the others right-aligned.
void printAligned(std::ostream& out, const std::vector<std::vector<std::string>>& rows, const std::string& indent) {
    std::vector<std::size_t> width;
    for (const auto& row : rows) {
        width.resize(std::max(width.size(), row.size()), 0);
        for (std::size_t c = 0; c < row.size(); ++c) width[c] = std::max(width[c], columns(row[c]));
    }
    for (const auto& row : rows) {
        std::string line = indent;
        for (std::size_t c = 0; c < row.size(); ++c) {
            const std::string pad(width[c] - columns(row[c]), ' ');
            line += c == 0 ? row[c] + pad : "   " + pad + row[c];
        }
        while (!line.empty() && line.back() == ' ') line.pop_back();
        out << line << '\n';
    }
}

}  // namespace

void printFitReport(std::ostream& out, const Table& table, const FitDefinition& def, const fit::FitResult& result,
                    bool withTrace, const std::function<void(std::ostream&)>& afterSummary) {
    const fit::FitStatistics& st = result.statistics;
    const solve::Run& run = result.run;
    const std::vector<std::string>& names = def.parameters;

    out << "Data:      " << table.source << ": " << table.summary() << '\n';
    out << "Equation:  " << modelEquation(def) << '\n';
    out << "Loss:      " << lossInWords(def) << '\n';
    out << "Method:    " << run.methodId << "\n\n";
    if (withTrace) {
        printTrace(out, run, names);
        out << '\n';
    }
    printSummary(out, run, names);
    out << '\n';
    if (afterSummary) afterSummary(out);

    // Estimates: interval next to the estimate, then the standard error and its size relative
    // to the estimate (the first thing to read when a parameter is poorly determined).
    const int percent = static_cast<int>(std::lround(st.confidenceLevel * 100));
    out << "Estimates, with " << percent << "% intervals from the "
        << (st.likelihood ? std::string("normal distribution")
                          : "t distribution with " + std::to_string(st.degreesOfFreedom) + " degrees of freedom")
        << ":\n";
    std::vector<std::vector<std::string>> rows = {
        {"parameter", "estimate", "interval from", "to", "standard error", "relative"}};
    for (std::size_t k = 0; k < names.size(); ++k) {
        const auto i = static_cast<Eigen::Index>(k);
        const double estimate = st.estimates[i], se = st.standardErrors[i];
        if (k < st.notDetermined.size() && st.notDetermined[k]) {
            rows.push_back({names[k], num(estimate, 10), "-", "-", "-", "not determined by the data"});
            continue;
        }
        std::string relative = "-";
        if (std::isfinite(se) && std::isfinite(estimate) && estimate != 0)
            relative = num(100 * se / std::fabs(estimate), 3) + "%";
        rows.push_back({names[k], num(estimate, 10), num(st.lower[i]), num(st.upper[i]), num(se, 4), relative});
    }
    printAligned(out, rows, "  ");
    for (const fit::DeterminedCombination& c : st.determinedCombinations)
        out << "  Determined by the data: " << c.text << " = " << num(c.estimate, 10) << ", standard error "
            << num(c.standardError, 4) << ", interval [" << num(c.lower) << ", " << num(c.upper) << "]\n";

    if (names.size() >= 2) {
        struct PairCorrelation {
            std::size_t a, b;
            double r;
        };
        std::vector<PairCorrelation> pairs;
        for (std::size_t a = 0; a < names.size(); ++a)
            for (std::size_t b = a + 1; b < names.size(); ++b)
                pairs.push_back({a, b, st.correlation(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b))});
        std::stable_sort(pairs.begin(), pairs.end(), [](const PairCorrelation& x, const PairCorrelation& y) {
            const double ax = std::isnan(x.r) ? 2 : std::fabs(x.r), ay = std::isnan(y.r) ? 2 : std::fabs(y.r);
            return ax > ay;
        });
        constexpr std::size_t kShown = 10;
        out << "\nCorrelations between estimates, strongest first (covariance " << st.covarianceMethod << "):\n";
        std::vector<std::vector<std::string>> lines;
        for (std::size_t k = 0; k < pairs.size() && k < kShown; ++k) {
            char value[32];
            std::snprintf(value, sizeof value, "%+.4f", pairs[k].r);
            lines.push_back({names[pairs[k].a] + " and " + names[pairs[k].b], std::isnan(pairs[k].r) ? "nan" : value});
        }
        printAligned(out, lines, "  ");
        if (pairs.size() > kShown)
            out << "  (" << pairs.size() - kShown << " weaker pairs; --json gives the whole matrix)\n";
    }

    out << "\nHow well the model fits (" << st.rows << " rows, " << st.parameters << " parameters, "
        << st.degreesOfFreedom << " degrees of freedom):\n";
    std::vector<std::vector<std::string>> fitRows;
    if (st.likelihood) {
        // For 0/1 outcomes and counts, the deviance and the log-likelihood measure the fit; a
        // sum of squared differences from the linear predictor would mean nothing.
        fitRows.push_back({"deviance", num(st.deviance, 8)});
        fitRows.push_back({"log-likelihood", num(st.logLikelihood, 8)});
        fitRows.push_back({"AIC (2 x parameters - 2 x log-likelihood)", num(2.0 * st.parameters - 2.0 * st.logLikelihood, 8)});
        if (def.loss == Loss::PoissonLog && st.degreesOfFreedom > 0)
            fitRows.push_back({"deviance / degrees of freedom (near 1 for Poisson counts)",
                               num(st.deviance / st.degreesOfFreedom, 4)});
    } else {
        const bool weighted = !def.weights.empty() || !def.sigma.empty();
        if (def.loss == Loss::Huber || def.loss == Loss::Cauchy)
            fitRows.push_back({"robust loss at the estimates", num(st.objectiveValue, 8)});
        fitRows.push_back({weighted ? "weighted residual sum of squares" : "residual sum of squares",
                           num(st.residualSumOfSquares, 8)});
        fitRows.push_back({weighted ? "residual standard deviation (weighted)" : "residual standard deviation",
                           num(st.residualStandardDeviation, 6)});
    }
    printAligned(out, fitRows, "  ");
    out << "  " << (st.likelihood ? "square root of the Fisher information" : "Jacobian")
        << " with unit-norm columns: rank " << st.rank << " of " << st.parameters << ", condition number "
        << num(st.scaledCondition, 4) << '\n';

    if (!result.warnings.empty()) {
        out << "\nWarnings:\n";
        for (const auto& w : result.warnings) out << "  - " << w << '\n';
    }
    out << '\n' << wrapText(study::cautionLine(), 100);
}

}  // namespace sw::cli
