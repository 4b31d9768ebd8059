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

constexpr double kUnbounded = 1e300;

// How the start simplex grows from x0 along each axis i (vertex i+1 = x0 + h_i e_i).
enum class StartSimplex {
    Relative,  // h_i = size * x_i, or zeroSize when x_i = 0: the simplex follows the scale of x0
    Absolute,  // h_i = size * max(1, |x_i|): never smaller than size
};

struct NelderMeadOptions {
    double initialSize = 0.05;       // edge of the start simplex (see StartSimplex)
    StartSimplex startSimplex = StartSimplex::Relative;
    double zeroSize = 0.00025;       // Relative: the edge along a coordinate that is 0 in x0
    bool adaptive = false;           // Gao & Han (2012) parameters
    double simplexTolerance = 1e-8;  // converged when every vertex is this close to the best (max norm)...
    double valueTolerance = 1e-12;   // ...and every value is this close to the best
};

class NelderMead final : public MethodState {
public:
    explicit NelderMead(NelderMeadOptions o) : options_(o) {}

    void start(Evaluator& eval, State& state) override {
        const auto n = state.x.size();
        const double dn = static_cast<double>(n);
        // Lagarias et al. (1998): reflection 1, expansion 2, contraction 1/2, shrink 1/2.
        // Gao & Han (2012): 1, 1 + 2/n, 3/4 - 1/(2n), 1 - 1/n.
        reflection_ = 1;
        expansion_ = options_.adaptive ? 1 + 2 / dn : 2;
        contraction_ = options_.adaptive ? 0.75 - 1 / (2 * dn) : 0.5;
        shrink_ = options_.adaptive && n > 1 ? 1 - 1 / dn : 0.5;
        vertices_.assign(static_cast<std::size_t>(n + 1), state.x);
        values_.assign(static_cast<std::size_t>(n + 1), state.value);
        for (Eigen::Index i = 0; i < n; ++i) {
            Vector& v = vertices_[static_cast<std::size_t>(i + 1)];
            if (options_.startSimplex == StartSimplex::Absolute) v[i] += options_.initialSize * std::max(1.0, std::abs(v[i]));
            else if (v[i] != 0) v[i] = (1 + options_.initialSize) * v[i];
            else v[i] = options_.zeroSize;
            values_[static_cast<std::size_t>(i + 1)] = evaluate(eval, v);
        }
        order();
        measure();
        state.x = vertices_[0];
        state.value = values_[0];
    }

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        const std::size_t last = vertices_.size() - 1;
        const auto n = static_cast<double>(last);
        // Trial points live in members so an iteration allocates nothing; an accepted trial
        // is swapped into the simplex (the worst vertex's storage becomes the next trial's).
        Vector& centroid = centroid_;
        centroid.setZero(state.x.size());
        for (std::size_t i = 0; i < last; ++i) centroid += vertices_[i];
        centroid /= n;
        const Vector& worst = vertices_[last];
        const double best = values_[0], secondWorst = values_[last - 1], worstValue = values_[last];

        reflected_.noalias() = centroid + reflection_ * (centroid - worst);
        const double fr = evaluate(eval, reflected_);
        const char* move;
        if (fr < best) {
            trial_.noalias() = centroid + expansion_ * (reflected_ - centroid);
            const double fe = evaluate(eval, trial_);
            if (fe < fr) replaceWorst(trial_, fe), move = "expand";
            else replaceWorst(reflected_, fr), move = "reflect";
        } else if (fr < secondWorst) {
            replaceWorst(reflected_, fr), move = "reflect";
        } else if (fr < worstValue) {
            trial_.noalias() = centroid + contraction_ * (reflected_ - centroid);
            const double fc = evaluate(eval, trial_);
            if (fc <= fr) replaceWorst(trial_, fc), move = "contract outside";
            else shrinkToBest(eval), move = "shrink";
        } else {
            trial_.noalias() = centroid + contraction_ * (worst - centroid);
            const double fcc = evaluate(eval, trial_);
            if (fcc < worstValue) replaceWorst(trial_, fcc), move = "contract inside";
            else shrinkToBest(eval), move = "shrink";
        }
        order();
        measure();
        record.stepKind = StepKind::Simplex;
        record.stepLength = 1;
        record.note.reserve(64);
        record.note = move;
        record.note += "; simplex size ";
        record.note += shortNumber(size_);
        record.note += ", value spread ";
        record.note += shortNumber(spread_);
        state.x = vertices_[0];
        state.value = values_[0];
        return {};
    }

    bool ownConvergence(std::string* why) const override {
        const double size = size_, spread = spread_;
        if (size <= options_.simplexTolerance && spread <= options_.valueTolerance) {
            if (why)
                *why = "converged: simplex size " + shortNumber(size) + " <= " + shortNumber(options_.simplexTolerance) +
                       " and value spread " + shortNumber(spread) + " <= " + shortNumber(options_.valueTolerance);
            return true;
        }
        return false;
    }

private:
    // A value that is not finite counts as +inf, so the simplex moves away from it.
    static double evaluate(Evaluator& eval, const Vector& x) {
        const double f = eval.value(x);
        if (std::isfinite(f)) return f;
        eval.clearNonFinite();
        return std::numeric_limits<double>::infinity();
    }

    // Takes x's storage (x gets the old worst vertex's, to be overwritten by the next trial).
    void replaceWorst(Vector& x, double f) {
        vertices_.back().swap(x);
        values_.back() = f;
    }

    void shrinkToBest(Evaluator& eval) {
        for (std::size_t i = 1; i < vertices_.size(); ++i) {
            vertices_[i] = vertices_[0] + shrink_ * (vertices_[i] - vertices_[0]);
            values_[i] = evaluate(eval, vertices_[i]);
        }
    }

    // Sorts by value; ties keep their order (Lagarias et al.'s tie-breaking: a new vertex goes after equals).
    // Insertion sort (stable), swapping vertices rather than copying them: the simplex is
    // sorted but for its new vertex, so this is one pass.
    void order() {
        for (std::size_t i = 1; i < values_.size(); ++i)
            for (std::size_t j = i; j > 0 && values_[j] < values_[j - 1]; --j) {
                std::swap(values_[j], values_[j - 1]);
                vertices_[j].swap(vertices_[j - 1]);
            }
    }

    // Size and value spread of the simplex, once per iteration (the note and the convergence
    // test both read them).
    void measure() {
        size_ = simplexSize();
        spread_ = valueSpread();
    }

    double simplexSize() const {
        double size = 0;
        for (std::size_t i = 1; i < vertices_.size(); ++i)
            size = std::max(size, (vertices_[i] - vertices_[0]).cwiseAbs().maxCoeff());
        return size;
    }

    double valueSpread() const {
        double spread = 0;
        for (std::size_t i = 1; i < values_.size(); ++i) spread = std::max(spread, std::abs(values_[i] - values_[0]));
        return spread;
    }

    NelderMeadOptions options_;
    double reflection_ = 1, expansion_ = 2, contraction_ = 0.5, shrink_ = 0.5;
    std::vector<Vector> vertices_;
    std::vector<double> values_;
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
                   0.05, 0, kUnbounded, true, false),
        choiceOption("start_simplex", "relative: the edges scale with x0 (a zero coordinate moves by zero_size); absolute: never below initial_size",
                     {"relative", "absolute"}, 0),
        realOption("zero_size", "relative start simplex: the edge along a coordinate that is 0 in x0", 0.00025, 0,
                   kUnbounded, true, false),
        flagOption("adaptive", "dimension-dependent expansion/contraction/shrink (Gao & Han 2012)", false),
        realOption("simplex_tolerance", "converged when all vertices are this close to the best (max norm)", 1e-8, 0,
                   kUnbounded, false, false),
        realOption("value_tolerance", "... and all their values this close to the best value", 1e-12, 0, kUnbounded,
                   false, false),
    };
    const std::vector<OptionSpec> specs = info.options;
    return {{info,
             [specs](const OptionValues& v) {
                 NelderMeadOptions o;
                 o.initialSize = optionNumber(specs, v, "initial_size");
                 o.startSimplex = optionChoice(specs, v, "start_simplex") == "absolute" ? StartSimplex::Absolute
                                                                                        : StartSimplex::Relative;
                 o.zeroSize = optionNumber(specs, v, "zero_size");
                 o.adaptive = optionFlag(specs, v, "adaptive");
                 o.simplexTolerance = optionNumber(specs, v, "simplex_tolerance");
                 o.valueTolerance = optionNumber(specs, v, "value_tolerance");
                 return std::make_unique<NelderMead>(o);
             },
             {}}};
}

}  // namespace sw::solve
