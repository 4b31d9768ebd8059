// Bad input through makeSolver: every rejection is a sentence that names the problem.
// (Behaviour of this program; common practice, no published source.)

#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>

namespace sw::reference {
namespace {

using sw::solve::makeSolver;

Vector point(double a, double b) {
    Vector v(2);
    v << a, b;
    return v;
}

bool mentions(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

TEST(BadInput, AnUnknownMethodIdIsRejectedWithTheListOfIds) {
    const FormulaObjective f("(1 - x)^2 + 100*(y - x^2)^2", {"x", "y"});
    const sw::solve::SolverOrError made = makeSolver("trust-region-exakt", f, point(-1.2, 1));
    EXPECT_FALSE(made.solver);
    EXPECT_TRUE(mentions(made.error, "unknown method 'trust-region-exakt'")) << made.error;
    for (const char* id : {"trust-region-exact", "trust-region-dogleg", "cubic-regularization", "sr1"})
        EXPECT_TRUE(mentions(made.error, id)) << made.error;
}

TEST(BadInput, TheNewLineSearchOptionsAreCheckedByName) {
    const FormulaObjective f("(1 - x)^2 + 100*(y - x^2)^2", {"x", "y"});
    const auto sigma = makeSolver("cg-polak-ribiere", f, point(-1.2, 1), {{"descent_test", "1"}});
    EXPECT_FALSE(sigma.solver);
    EXPECT_TRUE(mentions(sigma.error, "descent_test")) << sigma.error;
    EXPECT_TRUE(mentions(sigma.error, "[0, 1)")) << sigma.error;
    const auto trial = makeSolver("bfgs", f, point(-1.2, 1), {{"first_trial", "half"}});
    EXPECT_FALSE(trial.solver);
    EXPECT_TRUE(mentions(trial.error, "first_trial")) << trial.error;
    EXPECT_TRUE(mentions(trial.error, "previous_decrease")) << trial.error;
}

TEST(BadInput, AnOptionOutsideItsRangeIsNamedWithTheRange) {
    const FormulaObjective f("(1 - x)^2 + 100*(y - x^2)^2", {"x", "y"});
    const auto made = makeSolver("trust-region-exact", f, point(-1.2, 1), {{"eta", "0.5"}});
    EXPECT_FALSE(made.solver);
    EXPECT_TRUE(mentions(made.error, "eta")) << made.error;
    EXPECT_TRUE(mentions(made.error, "[0, 0.25)")) << made.error;

    const auto notANumber = makeSolver("trust-region-cg", f, point(-1.2, 1), {{"initial_radius", "wide"}});
    EXPECT_FALSE(notANumber.solver);
    EXPECT_TRUE(mentions(notANumber.error, "initial_radius")) << notANumber.error;

    const auto unknownOption = makeSolver("cubic-regularization", f, point(-1.2, 1), {{"radius", "1"}});
    EXPECT_FALSE(unknownOption.solver);
    EXPECT_TRUE(mentions(unknownOption.error, "radius")) << unknownOption.error;
    EXPECT_TRUE(mentions(unknownOption.error, "initial_sigma")) << unknownOption.error;

    const auto crossed = makeSolver("trust-region-dogleg", f, point(-1.2, 1), {{"shrink_below", "0.8"}});
    EXPECT_FALSE(crossed.solver);
    EXPECT_TRUE(mentions(crossed.error, "shrink_below")) << crossed.error;
    EXPECT_TRUE(mentions(crossed.error, "expand_above")) << crossed.error;
}

TEST(BadInput, AStartOfTheWrongDimensionIsRejected) {
    const FormulaObjective f("(1 - x)^2 + 100*(y - x^2)^2", {"x", "y"});
    Vector start(3);
    start << 1, 2, 3;
    const auto made = makeSolver("trust-region-exact", f, start);
    EXPECT_FALSE(made.solver);
    EXPECT_TRUE(mentions(made.error, "3 values")) << made.error;
    EXPECT_TRUE(mentions(made.error, "2 variables")) << made.error;
}

TEST(BadInput, ANonFiniteStartIsRejectedNamingTheVariable) {
    const FormulaObjective f("(1 - x)^2 + 100*(y - x^2)^2", {"x", "y"});
    const auto made = makeSolver("sr1", f, point(1.0, std::numeric_limits<double>::quiet_NaN()));
    EXPECT_FALSE(made.solver);
    EXPECT_TRUE(mentions(made.error, "not finite")) << made.error;
    EXPECT_TRUE(mentions(made.error, "y")) << made.error;
}

TEST(BadInput, AFormulaThatIsNotFiniteAtTheStartIsRejected) {
    const FormulaObjective f("log(x) + y^2", {"x", "y"});
    const auto made = makeSolver("trust-region-exact", f, point(-1.0, 0.0));
    EXPECT_FALSE(made.solver);
    EXPECT_TRUE(mentions(made.error, "not finite at the start point")) << made.error;

    // The convenience solve() turns the same rejection into a failed run with the message.
    const sw::solve::Run run = sw::solve::solve("trust-region-exact", f, point(-1.0, 0.0));
    EXPECT_EQ(run.termination, sw::solve::Termination::Failed);
    EXPECT_TRUE(mentions(run.message, "not finite at the start point")) << run.message;
}

TEST(BadInput, ATrialPointWhereTheFormulaIsNotFiniteIsRejectedAndTheRunGoesOn) {
    // -log(x) + x is NaN for x < 0; a region of radius 10 (or a small sigma) from x = 3 first proposes such a
    // point. The trust-region methods must shrink and still reach the minimum x = 1 (worked by hand).
    const FormulaObjective f("-log(x) + x", {"x"});
    Vector start(1);
    start << 3.0;
    for (const char* method : {"trust-region-dogleg", "trust-region-cg", "trust-region-exact", "cubic-regularization", "sr1"}) {
        const bool cubic = method == std::string("cubic-regularization");
        const sw::solve::OptionValues options = cubic ? sw::solve::OptionValues{{"initial_sigma", "1e-3"}}
                                                      : sw::solve::OptionValues{{"initial_radius", "10"}};
        const sw::solve::Run run = sw::solve::solve(method, f, start, options);
        SCOPED_TRACE(method);
        EXPECT_TRUE(sw::solve::isConvergence(run.termination)) << run.message;
        EXPECT_NEAR(run.x[0], 1.0, 1e-8);
        bool sawRejectedNonFinite = false;
        for (const auto& r : run.trace) sawRejectedNonFinite |= !r.accepted && r.note.text().find("not finite") != std::string::npos;
        EXPECT_TRUE(sawRejectedNonFinite);
    }
}

}  // namespace
}  // namespace sw::reference
