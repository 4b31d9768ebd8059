// Nelder-Mead simplex search (Nelder & Mead 1965), in the form analysed by Lagarias, Reeds,
// Wright & Wright (1998), optionally with the dimension-dependent parameters of Gao & Han
// (2012). Derivative-free: it reads values only; the framework shows the gradient in the
// records without counting it.
#include "core/solve/method.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

namespace sw::solve {

namespace {

constexpr double kUnbounded = std::numeric_limits<double>::infinity();  // no upper bound

// How the start simplex grows from x0 along each axis i (vertex i+1 = x0 + h_i e_i).
enum class StartSimplex {
    Relative,  // h_i = size * x_i, or zeroSize when x_i = 0: the simplex follows the scale of x0
    Absolute,  // h_i = size * max(1, |x_i|): never smaller than size
};

struct NelderMeadOptions {
    // The two defaults are our own, measured on the Moré-Garbow-Hillstrom catalogue (fewest value
    // evaluations over all eleven problems, smoothed over neighbouring settings; docs/BENCHMARKS.md,
    // "Nelder-Mead start simplex"; pinned by Catalogue.NelderMeadStartSimplexDefaultsAreTheMeasuredBest).
    double initialSize = 0.3;        // edge of the start simplex (see StartSimplex)
    StartSimplex startSimplex = StartSimplex::Relative;
    double zeroSize = 0.1;           // Relative: the edge along a coordinate that is 0 in x0
    bool dimensionScaledMoves = false;  // Gao & Han (2012) parameters
    double simplexSizeBelow = 1e-8;     // converged when every vertex is this close to the best (max norm)...
    double valueSpreadBelow = 1e-12;    // ...and every value is this close to the best
};

// What each move adds to the record's note (the numbers are formatted only when it is read).
constexpr const char* kExpand = "expand; simplex size {}, value spread {}";
constexpr const char* kReflect = "reflect; simplex size {}, value spread {}";
constexpr const char* kContractOutside = "contract outside; simplex size {}, value spread {}";
constexpr const char* kContractInside = "contract inside; simplex size {}, value spread {}";
constexpr const char* kShrink = "shrink; simplex size {}, value spread {}";

class NelderMead final : public MethodState {
public:
    explicit NelderMead(NelderMeadOptions o) : options_(o) {}

    void start(Evaluator& eval, State& state) override {
        const auto n = state.x.size();
        const double dn = static_cast<double>(n);
        // Lagarias et al. (1998): reflection 1, expansion 2, contraction 1/2, shrink 1/2.
        // Gao & Han (2012): 1, 1 + 2/n, 3/4 - 1/(2n), 1 - 1/n.
        reflection_ = 1;
        expansion_ = options_.dimensionScaledMoves ? 1 + 2 / dn : 2;
        contraction_ = options_.dimensionScaledMoves ? 0.75 - 1 / (2 * dn) : 0.5;
        shrink_ = options_.dimensionScaledMoves && n > 1 ? 1 - 1 / dn : 0.5;
        simplex_ = state.x.replicate(1, n + 1);
        values_.assign(static_cast<std::size_t>(n + 1), state.value);
        order_.resize(static_cast<std::size_t>(n + 1));
        std::iota(order_.begin(), order_.end(), 0);
        for (Eigen::Index i = 0; i < n; ++i) {
            auto v = simplex_.col(i + 1);
            if (options_.startSimplex == StartSimplex::Absolute) v[i] += options_.initialSize * std::max(1.0, std::abs(v[i]));
            else if (v[i] != 0) v[i] = (1 + options_.initialSize) * v[i];
            else v[i] = options_.zeroSize;
            trial_ = v;
            values_[static_cast<std::size_t>(i + 1)] = evaluate(eval, trial_);
        }
        centroid_.resize(n);
        reflected_.resize(n);
        trial_.resize(n);
        order();
        measure();
        state.x = simplex_.col(order_[0]);
        state.value = values_[static_cast<std::size_t>(order_[0])];
    }

    // The simplex lives in the columns of one matrix, ranked through order_, and every loop
    // is plain: with the few variables typical here, per-vertex vector objects and Eigen's
    // per-call set-up cost more than the arithmetic of a move.
    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        const Eigen::Index n = simplex_.rows();
        const std::size_t last = order_.size() - 1;
        double* c = centroid_.data();
        const double dn = static_cast<double>(last);
        const double* base = simplex_.data();
        for (Eigen::Index k = 0; k < n; ++k) {  // each coordinate summed in rank order, in a register
            double sum = 0;
            for (std::size_t i = 0; i < last; ++i) sum += base[static_cast<Eigen::Index>(order_[i]) * n + k];
            c[k] = sum / dn;
        }
        const double* worst = vertex(last);
        const double best = value(0), secondWorst = value(last - 1), worstValue = value(last);

        awayFrom(reflected_, reflection_, worst);
        const double fr = evaluate(eval, reflected_);
        const char* move;
        if (fr < best) {
            toward(trial_, expansion_, reflected_.data());
            const double fe = evaluate(eval, trial_);
            if (fe < fr) replaceWorst(trial_, fe), move = kExpand;
            else replaceWorst(reflected_, fr), move = kReflect;
        } else if (fr < secondWorst) {
            replaceWorst(reflected_, fr), move = kReflect;
        } else if (fr < worstValue) {
            toward(trial_, contraction_, reflected_.data());
            const double fc = evaluate(eval, trial_);
            if (fc <= fr) replaceWorst(trial_, fc), move = kContractOutside;
            else shrinkToBest(eval), move = kShrink;
        } else {
            toward(trial_, contraction_, worst);
            const double fcc = evaluate(eval, trial_);
            if (fcc < worstValue) replaceWorst(trial_, fcc), move = kContractInside;
            else shrinkToBest(eval), move = kShrink;
        }
        order();
        measure();
        record.stepKind = StepKind::Simplex;
        record.stepLength = 1;
        record.note.add(move, size_, spread_);
        state.x = simplex_.col(order_[0]);
        state.value = value(0);
        return {};
    }

    Termination ownConvergence(std::string* why) const override {
        const double size = size_, spread = spread_;
        if (size <= options_.simplexSizeBelow && spread <= options_.valueSpreadBelow) {
            if (why)
                *why = "converged: simplex size " + shortNumber(size) + " <= simplex_size_below " +
                       shortNumber(options_.simplexSizeBelow) + " and value spread " + shortNumber(spread) +
                       " <= value_spread_below " + shortNumber(options_.valueSpreadBelow);
            return Termination::SimplexSizeBelow;
        }
        return Termination::Running;
    }

private:
    const double* vertex(std::size_t rank) const { return simplex_.col(order_[rank]).data(); }
    double value(std::size_t rank) const { return values_[static_cast<std::size_t>(order_[rank])]; }

    // Points on the line through the centroid c and a point p: c + t (c - p), on the far side of
    // c (reflection), and c + t (p - c), toward p (expansion past the reflected point, contractions).
    void awayFrom(Vector& out, double t, const double* p) const {
        const double* c = centroid_.data();
        double* o = out.data();
        for (Eigen::Index k = 0; k < out.size(); ++k) o[k] = c[k] + t * (c[k] - p[k]);
    }
    void toward(Vector& out, double t, const double* p) const {
        const double* c = centroid_.data();
        double* o = out.data();
        for (Eigen::Index k = 0; k < out.size(); ++k) o[k] = c[k] + t * (p[k] - c[k]);
    }

    // A value that is not finite counts as +inf, so the simplex moves away from it.
    static double evaluate(Evaluator& eval, const Vector& x) {
        const double f = eval.value(x);
        if (std::isfinite(f)) return f;
        eval.clearNonFinite();
        return std::numeric_limits<double>::infinity();
    }

    void replaceWorst(const Vector& x, double f) {
        const int column = order_.back();
        simplex_.col(column) = x;
        values_[static_cast<std::size_t>(column)] = f;
    }

    void shrinkToBest(Evaluator& eval) {
        const Eigen::Index n = simplex_.rows();
        const double* b = vertex(0);
        for (std::size_t i = 1; i < order_.size(); ++i) {
            double* v = simplex_.col(order_[i]).data();
            for (Eigen::Index k = 0; k < n; ++k) v[k] = b[k] + shrink_ * (v[k] - b[k]);
            trial_ = simplex_.col(order_[i]);
            values_[static_cast<std::size_t>(order_[i])] = evaluate(eval, trial_);
        }
    }

    // Ranks by value; ties keep their order (Lagarias et al.'s tie-breaking: a new vertex goes
    // after equals). A stable insertion sort of the ranks: the simplex is sorted but for its
    // new vertex, so this is one pass. Each entry is moved into place, not swapped along.
    void order() {
        for (std::size_t i = 1; i < order_.size(); ++i) {
            const int column = order_[i];
            const double f = values_[static_cast<std::size_t>(column)];
            std::size_t j = i;
            for (; j > 0 && f < values_[static_cast<std::size_t>(order_[j - 1])]; --j) order_[j] = order_[j - 1];
            order_[j] = column;
        }
    }

    // Size (largest max-norm distance to the best vertex) and value spread of the simplex, once
    // per iteration (the note and the convergence test both read them).
    void measure() {
        const Eigen::Index n = simplex_.rows();
        const double* b = vertex(0);
        const double fb = value(0);
        double size = 0, spread = 0;
        for (std::size_t i = 1; i < order_.size(); ++i) {
            const double* v = vertex(i);
            double far = 0;  // this vertex's own maximum: the vertices' maxima do not wait on one another
            for (Eigen::Index k = 0; k < n; ++k) far = std::max(far, std::abs(v[k] - b[k]));
            size = std::max(size, far);
            spread = std::max(spread, std::abs(value(i) - fb));
        }
        size_ = size;
        spread_ = spread;
    }

    NelderMeadOptions options_;
    double reflection_ = 1, expansion_ = 2, contraction_ = 0.5, shrink_ = 0.5;
    Matrix simplex_;             // vertex j in column j
    std::vector<double> values_; // by column
    std::vector<int> order_;     // columns ranked by value, best first
    Vector centroid_, reflected_, trial_;
    double size_ = 0, spread_ = 0;  // of the current simplex (measure())
};

}  // namespace

std::vector<MethodRegistration> derivativeFreeMethods() {
    MethodInfo info;
    info.id = "nelder-mead";
    info.family = "derivative-free";
    info.summary = "Nelder-Mead simplex search on values only (Lagarias et al. 1998)";
    info.needsGradient = false;
    info.options = {
        realOption("initial_size", "edge of the start simplex along axis i: this times x_i (relative) or times max(1, |x_i|) (absolute)",
                   0.3, 0, kUnbounded, true, false),
        choiceOption("start_simplex", "relative: the edges scale with x0 (a zero coordinate moves by zero_size); absolute: never below initial_size",
                     {"relative", "absolute"}, 0),
        realOption("zero_size", "relative start simplex: the edge along a coordinate that is 0 in x0", 0.1, 0,
                   kUnbounded, true, false),
        formerlyNamed(flagOption("dimension_scaled_moves",
                                 "expansion, contraction and shrink depend on the dimension n (Gao & Han 2012)", false),
                      "adaptive"),
        formerlyNamed(realOption("simplex_size_below",
                                 "converged when every vertex is at most this far from the best (max norm)...", 1e-8,
                                 0, kUnbounded, false, false),
                      "simplex_tolerance"),
        formerlyNamed(realOption("value_spread_below", "... and every vertex's value at most this far from the best",
                                 1e-12, 0, kUnbounded, false, false),
                      "value_tolerance"),
    };
    const std::vector<OptionSpec> specs = info.options;
    return {{info,
             [specs](const OptionValues& v) {
                 NelderMeadOptions o;
                 o.initialSize = optionNumber(specs, v, "initial_size");
                 o.startSimplex = optionChoice(specs, v, "start_simplex") == "absolute" ? StartSimplex::Absolute
                                                                                        : StartSimplex::Relative;
                 o.zeroSize = optionNumber(specs, v, "zero_size");
                 o.dimensionScaledMoves = optionFlag(specs, v, "dimension_scaled_moves");
                 o.simplexSizeBelow = optionNumber(specs, v, "simplex_size_below");
                 o.valueSpreadBelow = optionNumber(specs, v, "value_spread_below");
                 return std::make_unique<NelderMead>(o);
             },
             {}}};
}

}  // namespace sw::solve
