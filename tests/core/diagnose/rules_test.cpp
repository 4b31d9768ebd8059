// Every finding: an objective built to trigger it, and a healthy control where it stays silent.
// The objectives are invented for these tests; where a rule rests on a published result, the
// result is named beside its check.
#include "core/diagnose/diagnose.h"
#include "core/fit/run_fit.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

#include <Eigen/Eigenvalues>
#include <cmath>

namespace sw::diagnose {
namespace {

Vector vec(std::initializer_list<double> v) {
    Vector x(static_cast<Eigen::Index>(v.size()));
    Eigen::Index i = 0;
    for (double d : v) x[i++] = d;
    return x;
}

struct Diagnosed {
    solve::Run run;
    Findings findings;
    const Finding* get(FindingId id) const { return findById(findings, id); }
    std::string list() const {
        std::string text = std::string(solve::toString(run.termination)) + ":";
        for (const Finding& f : findings) text += std::string(" ") + toString(f.id) + "(" + toString(f.severity) + ")";
        return text;
    }
};

Diagnosed diagnosed(const Objective& objective, const Vector& start, const std::string& method,
                    solve::OptionValues options = {}, int maxIterations = 200, bool remedies = true) {
    solve::StoppingRules rules;
    rules.maxIterations = maxIterations;
    Diagnosed d;
    d.run = solve::solve(method, objective, start, options, rules);
    d.findings = diagnose::diagnose(d.run, objective, RunSetup{method, options, rules, start}, remedies);
    return d;
}

const char* kTwoValves = "(valve_a^2 - 1)^2 + (valve_b^2 - 1)^2 + 0.5*valve_a*valve_b";
const char* kPumpFlow = "(speed*opening - 2)^2 + 0.01*(speed - opening)^2";
const char* kHeater = "((power - 1200)/400)^2 + 50*(duty - 0.00025*power - 0.05)^2";

void expectRemedyHelped(const Finding* f) {
    ASSERT_NE(f, nullptr);
    ASSERT_TRUE(f->remedy.has_value()) << toString(f->id);
    ASSERT_TRUE(f->remedy->outcome.has_value()) << toString(f->id);
    EXPECT_TRUE(f->remedy->outcome->helped) << f->remedy->change.text << ": " << f->remedy->outcome->text;
    EXPECT_NE(f->remedy->outcome->text.find("it helped"), std::string::npos) << f->remedy->outcome->text;
}

// ---- saddle-end: second-order necessary condition for a minimum, the Hessian is positive
// semidefinite there (Nocedal & Wright 2006, Theorem 2.3).

TEST(SaddleEnd, PureNewtonStopsOnAPassBetweenTwoWells) {
    const FormulaObjective f(kTwoValves, {"valve_a", "valve_b"});
    const Diagnosed d = diagnosed(f, vec({0.3, 1.1}), "newton");
    const Finding* saddle = d.get(FindingId::SaddleEnd);
    ASSERT_NE(saddle, nullptr) << d.list();
    EXPECT_TRUE(saddle->isProblem());
    EXPECT_EQ(saddle->number("negative_eigenvalues"), 1);
    EXPECT_LT(saddle->number("smallest_eigenvalue"), 0);
    // The escape direction is the eigenvector of the negative eigenvalue: H v = lambda v.
    ASSERT_EQ(saddle->mark.directions.size(), 1u);
    const Vector v = saddle->mark.directions[0];
    Vector g;
    Matrix h;
    f.valueGradientHessian(d.run.x, g, h);
    EXPECT_NEAR((h * v - saddle->number("smallest_eigenvalue") * v).norm(), 0, 1e-9);
    EXPECT_NEAR(saddle->number("escape_valve_a"), v[0], 1e-15);
    // The remedy was rerun from the same start and reached a minimum.
    expectRemedyHelped(saddle);
    EXPECT_EQ(saddle->remedy->outcome->endKind, solve::PointKind::Minimum);
}

TEST(SaddleEnd, ASaddleOfIndexTwoGivesBothEscapeDirections) {
    // f = x^2 + (y^2 - 1)^2 + (z^2 - 1)^2 has a critical point at the origin with Hessian
    // diag(2, -4, -4): a saddle of index 2 (worked by hand). Pure Newton from near it goes there.
    const FormulaObjective f("x^2 + (y^2 - 1)^2 + (z^2 - 1)^2", {"x", "y", "z"});
    const Diagnosed d = diagnosed(f, vec({0.3, 0.2, 0.1}), "newton");
    const Finding* saddle = d.get(FindingId::SaddleEnd);
    ASSERT_NE(saddle, nullptr) << d.list();
    EXPECT_EQ(saddle->number("negative_eigenvalues"), 2);
    EXPECT_NEAR(saddle->number("smallest_eigenvalue"), -4, 1e-6);
    EXPECT_NEAR(saddle->number("eigenvalue_2"), -4, 1e-6);
    // The two escape directions span the y-z plane and are orthogonal.
    const double e1[3] = {saddle->number("escape_x"), saddle->number("escape_y"), saddle->number("escape_z")};
    const double e2[3] = {saddle->number("escape2_x"), saddle->number("escape2_y"), saddle->number("escape2_z")};
    EXPECT_NEAR(e1[0], 0, 1e-9);
    EXPECT_NEAR(e2[0], 0, 1e-9);
    EXPECT_NEAR(e1[1] * e2[1] + e1[2] * e2[2], 0, 1e-9);
    EXPECT_NE(saddle->message.find("2 negative eigenvalues"), std::string::npos) << saddle->message;
    EXPECT_NE(saddle->message.find("curvature -4"), std::string::npos) << saddle->message;
    EXPECT_EQ(saddle->mark.directions.size(), 2u);
}

TEST(SaddleEnd, SilentWhereNewtonReachesAWell) {
    const FormulaObjective f(kTwoValves, {"valve_a", "valve_b"});
    const Diagnosed d = diagnosed(f, vec({0.9, -1.1}), "newton");
    EXPECT_EQ(d.run.endPoint.kind, solve::PointKind::Minimum);
    EXPECT_EQ(d.get(FindingId::SaddleEnd), nullptr) << d.list();
    EXPECT_FALSE(hasProblem(d.findings)) << d.list();
}

TEST(SaddleEnd, ASaddleAwareMethodIsRestartedAlongTheEscapeDirection) {
    // Started exactly on the saddle of x^2 - y^2 + y^4/4 (gradient zero), trust-region-exact has
    // nothing to do; its remedy is a start moved along the escape direction.
    const FormulaObjective f("x^2 - y^2 + y^4/4", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({0, 0}), "trust-region-exact");
    const Finding* saddle = d.get(FindingId::SaddleEnd);
    ASSERT_NE(saddle, nullptr) << d.list();
    ASSERT_TRUE(saddle->remedy);
    EXPECT_EQ(saddle->remedy->change.kind, Change::Kind::StartPoint);
    EXPECT_GT(std::abs(saddle->remedy->change.start[1]), 0);
    expectRemedyHelped(saddle);
}

// ---- maximum-end

TEST(MaximumEnd, NewtonClimbsToTheTopOfADome) {
    const FormulaObjective f("-(x^2+y^2) + 0.1*(x^4+y^4)", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({0.3, 0.2}), "newton");
    const Finding* top = d.get(FindingId::MaximumEnd);
    ASSERT_NE(top, nullptr) << d.list();
    EXPECT_EQ(top->number("negative_eigenvalues"), 2);
    EXPECT_EQ(d.get(FindingId::SaddleEnd), nullptr);
    expectRemedyHelped(top);
    // Minima at x^2 = y^2 = 5, f = -5 (solved by hand).
    EXPECT_NEAR(top->remedy->outcome->value, -5, 1e-9);
}

TEST(MaximumEnd, SilentOnAMinimumOfTheSameFunction) {
    const FormulaObjective f("-(x^2+y^2) + 0.1*(x^4+y^4)", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({2, 2}), "newton");
    EXPECT_EQ(d.get(FindingId::MaximumEnd), nullptr) << d.list();
    EXPECT_FALSE(hasProblem(d.findings)) << d.list();
}

// ---- flat-direction

TEST(FlatDirection, AFormulaWithALineOfMinimaGetsANote) {
    const FormulaObjective f("(x + y - 2)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({0, 0}), "newton");
    const Finding* flat = d.get(FindingId::FlatDirection);
    ASSERT_NE(flat, nullptr) << d.list();
    EXPECT_EQ(flat->severity, Severity::Note);
    EXPECT_NEAR(std::abs(flat->number("direction_x")), std::sqrt(0.5), 1e-9);
    EXPECT_NEAR(flat->number("direction_x"), -flat->number("direction_y"), 1e-9);
}

std::shared_ptr<Table> table(std::vector<std::string> names, std::vector<std::vector<double>> columns) {
    auto t = std::make_shared<Table>();
    t->columnNames = std::move(names);
    t->columns = std::move(columns);
    return t;
}

Diagnosed diagnosedFit(const std::shared_ptr<Table>& t, const std::string& model, std::vector<std::string> parameters,
                       std::vector<double> start) {
    fit::FitRequest request;
    request.definition.model = model;
    request.definition.response = "y";
    request.definition.parameters = parameters;
    request.start = start;
    const fit::FitResult r = fit::runFit(t, request);
    Diagnosed d;
    d.run = r.run;
    RunSetup setup{r.run.methodId, {}, request.rules,
                   Eigen::Map<const Vector>(start.data(), static_cast<Eigen::Index>(start.size()))};
    d.findings = diagnose::diagnose(d.run, *r.objective, setup, true);
    return d;
}

TEST(FlatDirection, AFitNamesTheCombinationTheDataDoNotDetermine) {
    // y = a x + b x: only a + b is determined; a - b is not.
    const Diagnosed d = diagnosedFit(table({"x", "y"}, {{1, 2, 3, 4, 5}, {1.1, 1.9, 3.2, 3.9, 5.1}}), "a*x + b*x",
                                     {"a", "b"}, {0.5, 0.3});
    const Finding* flat = d.get(FindingId::FlatDirection);
    ASSERT_NE(flat, nullptr) << d.list();
    EXPECT_TRUE(flat->isProblem());
    EXPECT_NE(flat->message.find("a - b is not determined by the data"), std::string::npos) << flat->message;
    EXPECT_FALSE(flat->remedy.has_value());
}

TEST(FlatDirection, SilentOnAWellDeterminedFitAndABowl) {
    const Diagnosed fit = diagnosedFit(table({"t", "y"}, {{0, 1, 2, 3, 4, 5}, {5.0, 3.1, 1.8, 1.2, 0.7, 0.4}}),
                                       "a*exp(-k*t)", {"a", "k"}, {4, 0.3});
    EXPECT_EQ(fit.get(FindingId::FlatDirection), nullptr) << fit.list();
    EXPECT_FALSE(hasProblem(fit.findings)) << fit.list();
    const FormulaObjective bowl("(x - 1)^2 + (y - 2)^2", {"x", "y"});
    EXPECT_EQ(diagnosed(bowl, vec({0, 0}), "newton").get(FindingId::FlatDirection), nullptr);
}

// ---- narrow-valley: steepest descent's linear rate, N&W Theorem 3.3.

TEST(NarrowValley, SteepestDescentZigZagsAlongThePumpValley) {
    const FormulaObjective f(kPumpFlow, {"speed", "opening"});
    const Diagnosed d = diagnosed(f, vec({3.6, 0.3}), "gradient-descent", {{"line_search", "armijo"}}, 400);
    const Finding* valley = d.get(FindingId::NarrowValley);
    ASSERT_NE(valley, nullptr) << d.list();
    EXPECT_TRUE(valley->isProblem());
    EXPECT_GE(valley->number("condition_number"), 100);
    EXPECT_GE(valley->number("zig_zag_fraction"), 0.6);
    EXPECT_GE(valley->number("rate"), 0.9);
    EXPECT_LT(valley->number("rate"), 1.0);
    EXPECT_EQ(valley->remedy->change.method, "bfgs");
    expectRemedyHelped(valley);
}

TEST(NarrowValley, SilentForBfgsInTheSameValleyAndForARoundBowl) {
    const FormulaObjective f(kPumpFlow, {"speed", "opening"});
    const Diagnosed bfgs = diagnosed(f, vec({3.6, 0.3}), "bfgs", {}, 400);
    EXPECT_EQ(bfgs.get(FindingId::NarrowValley), nullptr) << bfgs.list();
    EXPECT_FALSE(hasProblem(bfgs.findings)) << bfgs.list();
    const FormulaObjective bowl("x^2 + y^2", {"x", "y"});
    EXPECT_EQ(diagnosed(bowl, vec({3, 1}), "gradient-descent").get(FindingId::NarrowValley), nullptr);
}

// ---- poor-scaling

TEST(PoorScaling, WattsAndADutyFractionGiveRescalingFactorsThatWork) {
    const FormulaObjective f(kHeater, {"power", "duty"});
    const Diagnosed d = diagnosed(f, vec({300, 0.9}), "gradient-descent", {{"line_search", "armijo"}}, 300);
    const Finding* scaling = d.get(FindingId::PoorScaling);
    ASSERT_NE(scaling, nullptr) << d.list();
    EXPECT_GE(scaling->number("diagonal_spread"), 1e4);
    EXPECT_EQ(scaling->number("scale_power"), 100);
    EXPECT_EQ(scaling->number("scale_duty"), 0.1);
    ASSERT_TRUE(scaling->remedy);
    EXPECT_EQ(scaling->remedy->change.kind, Change::Kind::RescaleVariables);
    expectRemedyHelped(scaling);
    // The rerun's result is in watts and duty: the minimum at power 1200, duty 0.35 (by hand).
    EXPECT_NEAR(scaling->remedy->outcome->x[0], 1200, 1e-3);
    EXPECT_NEAR(scaling->remedy->outcome->x[1], 0.35, 1e-6);
    // The narrow valley here is only the units: not reported as one.
    EXPECT_EQ(d.get(FindingId::NarrowValley), nullptr) << d.list();
}

TEST(PoorScaling, SilentInKilowattsAndForBfgs) {
    // The same heater with power in kilowatts and the duty in tenths.
    const FormulaObjective kw("((kw - 1.2)/0.4)^2 + 50*(0.1*tenths - 0.25*kw - 0.05)^2", {"kw", "tenths"});
    const Diagnosed scaled = diagnosed(kw, vec({0.3, 9}), "gradient-descent", {{"line_search", "armijo"}}, 300);
    EXPECT_EQ(scaled.get(FindingId::PoorScaling), nullptr) << scaled.list();
    const FormulaObjective f(kHeater, {"power", "duty"});
    const Diagnosed bfgs = diagnosed(f, vec({300, 0.9}), "bfgs", {}, 300);
    EXPECT_EQ(bfgs.get(FindingId::PoorScaling), nullptr) << bfgs.list();
    EXPECT_FALSE(hasProblem(bfgs.findings)) << bfgs.list();
}

// ---- uphill-newton: a descent direction needs g'p < 0 (N&W sec. 3.1).

TEST(UphillNewton, AnIndefiniteHessianTurnsTheNewtonStepUphill) {
    const FormulaObjective f("x^2 - y^2 + y^4/4", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({0.1, 0.5}), "newton");
    const Finding* uphill = d.get(FindingId::UphillNewton);
    ASSERT_NE(uphill, nullptr) << d.list();
    EXPECT_EQ(uphill->iterations.focus, 0);
    EXPECT_GT(uphill->number("directional_derivative"), 0);
    EXPECT_GT(uphill->number("angle_to_steepest_descent"), 90);
    EXPECT_LT(uphill->number("smallest_eigenvalue"), 0);
    // g'p by hand at (0.1, 0.5): g = (0.2, -0.875), p = -H^-1 g = (-0.1, -0.7), g'p = 0.5925.
    EXPECT_NEAR(uphill->number("directional_derivative"), 0.5925, 1e-12);
    EXPECT_EQ(uphill->remedy->change.method, "saddle-free-newton");
    expectRemedyHelped(uphill);
}

TEST(UphillNewton, SilentForDampedNewtonWhichFallsBackToDescent) {
    const FormulaObjective f("x^2 - y^2 + y^4/4", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({0.1, 0.5}), "damped-newton");
    EXPECT_EQ(d.get(FindingId::UphillNewton), nullptr) << d.list();
}

// ---- line-search-collapse

TEST(LineSearchCollapse, ASearchThatRunsOutOfTrialsIsAProblemWithARemedy) {
    // Three trials from alpha = 1000 cannot find a decrease on this bowl.
    const FormulaObjective f("x^2 + 4*y^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({3, 1}), "gradient-descent",
                                  {{"line_search", "armijo"}, {"max_trials", "3"}, {"initial_step", "1000"}});
    ASSERT_EQ(d.run.termination, solve::Termination::LineSearchFailed);
    const Finding* collapse = d.get(FindingId::LineSearchCollapse);
    ASSERT_NE(collapse, nullptr) << d.list();
    EXPECT_TRUE(collapse->isProblem());
    expectRemedyHelped(collapse);
}

TEST(LineSearchCollapse, AtTheKinkOfANonSmoothMinimumItIsOnlyANote) {
    const FormulaObjective f("abs(x) + 10*abs(y)", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1.3, 0.7}), "bfgs");
    const Finding* collapse = d.get(FindingId::LineSearchCollapse);
    ASSERT_NE(collapse, nullptr) << d.list();
    EXPECT_EQ(collapse->severity, Severity::Note);
    EXPECT_FALSE(collapse->remedy.has_value());
}

TEST(LineSearchCollapse, SilentOnASmoothRun) {
    const FormulaObjective f("100*(y-x^2)^2+(1-x)^2", {"x", "y"});
    EXPECT_EQ(diagnosed(f, vec({-1.2, 1}), "bfgs").get(FindingId::LineSearchCollapse), nullptr);
}

// ---- radius-collapse

TEST(RadiusCollapse, ATrustRegionShrinksAcrossAKinkAndNelderMeadGetsThrough) {
    const FormulaObjective f("abs(x - y) + 0.01*(x + y)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1.3, 0.7}), "trust-region-exact");
    ASSERT_EQ(d.run.termination, solve::Termination::TrustRegionCollapsed);
    const Finding* collapse = d.get(FindingId::RadiusCollapse);
    ASSERT_NE(collapse, nullptr) << d.list();
    EXPECT_TRUE(collapse->isProblem());
    EXPECT_LT(collapse->number("last_radius"), 1e-6 * collapse->number("largest_radius"));
    EXPECT_EQ(collapse->remedy->change.method, "nelder-mead");
    expectRemedyHelped(collapse);
}

TEST(RadiusCollapse, SilentOnASmoothRun) {
    const FormulaObjective f("100*(y-x^2)^2+(1-x)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({-1.2, 1}), "trust-region-exact");
    EXPECT_EQ(d.get(FindingId::RadiusCollapse), nullptr) << d.list();
    EXPECT_FALSE(hasProblem(d.findings)) << d.list();
}

// ---- stagnation

TEST(Stagnation, AVanishingStepLeavesFUnchangedWithALargeGradient) {
    const FormulaObjective f("x^2 + y^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1, 1}), "momentum", {{"step_size", "1e-13"}});
    const Finding* stuck = d.get(FindingId::Stagnation);
    ASSERT_NE(stuck, nullptr) << d.list();
    EXPECT_TRUE(stuck->isProblem());
    EXPECT_GT(stuck->number("gradient_norm"), 1);
    expectRemedyHelped(stuck);
}

TEST(Stagnation, AKinkMinimumIsANoteWithoutARemedy) {
    const FormulaObjective f("abs(x - 1) + 2*abs(y + 0.5) + 0.1*(x^2+y^2)", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1.3, 0.7}), "bfgs");
    const Finding* stuck = d.get(FindingId::Stagnation);
    ASSERT_NE(stuck, nullptr) << d.list();
    EXPECT_EQ(stuck->severity, Severity::Note);
    EXPECT_EQ(stuck->number("kink_minimum"), 1);
    EXPECT_FALSE(stuck->remedy.has_value());
}

TEST(Stagnation, SilentWhenTheRunConverges) {
    const FormulaObjective f("x^2 + y^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1, 1}), "momentum", {{"step_size", "0.1"}}, 1000);
    EXPECT_EQ(d.get(FindingId::Stagnation), nullptr) << d.list();
    EXPECT_FALSE(hasProblem(d.findings)) << d.list();
}

// ---- divergence

TEST(Divergence, ATooLongFixedStepBlowsUpAndASmallerOneConverges) {
    const FormulaObjective f("x^2 + y^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1, 1}), "momentum", {{"step_size", "2"}});
    const Finding* blowUp = d.get(FindingId::Divergence);
    ASSERT_NE(blowUp, nullptr) << d.list();
    ASSERT_TRUE(blowUp->remedy);
    EXPECT_EQ(blowUp->remedy->change.kind, Change::Kind::SetOptions);
    EXPECT_EQ(blowUp->remedy->change.options.at("step_size"), "0.2");
    expectRemedyHelped(blowUp);
}

TEST(NarrowValley, SilentWhenTheRunBlowsUpInAValley) {
    // A fixed step of 0.05 on curvature 300 multiplies the across-valley error by 14 per
    // iteration: the run diverges, and "a slow rate in a narrow valley" would be wrong.
    const FormulaObjective f("0.5*(x^2 + 300*y^2)", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1, 0.1}), "gradient-descent", {{"step_size", "0.05"}, {"line_search", "fixed"}});
    EXPECT_TRUE(d.get(FindingId::Divergence) || d.get(FindingId::NonFinite)) << d.list();
    EXPECT_EQ(d.get(FindingId::NarrowValley), nullptr) << d.list();
}

TEST(Divergence, ADriftToInfinityAlongAFlatValleyIsNamed) {
    // exp(-x) has no minimum: x grows step after step while f levels off toward 0.
    const FormulaObjective f("exp(-x) + y^2", {"x", "y"});
    for (const char* method : {"trust-region-exact", "bfgs"}) {
        const Diagnosed d = diagnosed(f, vec({0, 1}), method);
        const Finding* drift = d.get(FindingId::Divergence);
        ASSERT_NE(drift, nullptr) << method << " " << d.list();
        EXPECT_NE(drift->message.find("asymptote"), std::string::npos) << drift->message;
        EXPECT_GT(drift->number("x_norm_end"), 10);
        EXPECT_FALSE(drift->remedy.has_value());
    }
}

TEST(Divergence, AnEndlessSlopeIsNamed) {
    const FormulaObjective f("-x + y^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({0, 1}), "gradient-descent");
    const Finding* slope = d.get(FindingId::Divergence);
    ASSERT_NE(slope, nullptr) << d.list();
    EXPECT_NE(slope->message.find("no minimum in that direction"), std::string::npos) << slope->message;
}

TEST(Divergence, SilentForACrawlTowardAFarMinimum) {
    // Steepest descent crawls toward (100, 100) along a narrow valley: |x| grows all the way,
    // but the curvature along the valley stays, so this is no drift.
    const FormulaObjective f("(x - 100)^2 + 100*(y - x)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({0, 0}), "gradient-descent", {{"line_search", "armijo"}}, 200);
    EXPECT_EQ(d.get(FindingId::Divergence), nullptr) << d.list();
    const Diagnosed far = diagnosed(f, vec({0, 0}), "bfgs");
    EXPECT_EQ(far.get(FindingId::Divergence), nullptr) << far.list();
}

// ---- non-finite

TEST(NonFinite, NewtonStepsOutOfTheLogarithmsDomain) {
    const FormulaObjective f("x - ln(x) + (y - 1)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({3, 0}), "newton");
    ASSERT_EQ(d.run.termination, solve::Termination::NonFinite);
    const Finding* bad = d.get(FindingId::NonFinite);
    ASSERT_NE(bad, nullptr) << d.list();
    EXPECT_EQ(bad->number("iteration"), 1);
    EXPECT_EQ(bad->number("last_finite_iteration"), 0);
    EXPECT_NE(bad->message.find("value is nan"), std::string::npos) << bad->message;
    // Which output: f (log of a negative number), named as evidence and in the sentence.
    EXPECT_EQ(bad->number("non_finite_value"), 1);
    EXPECT_EQ(bad->number("non_finite_x"), 0);
    EXPECT_NE(bad->message.find("not finite: f"), std::string::npos) << bad->message;
    expectRemedyHelped(bad);
    EXPECT_NEAR(bad->remedy->outcome->x[0], 1, 1e-8);  // minimum at x = 1, y = 1 (by hand)
}

TEST(NonFinite, SilentWhenTheLineSearchBacksOffFromTheBadPoint) {
    const FormulaObjective f("x - ln(x) + (y - 1)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({3, 0}), "damped-newton");
    EXPECT_EQ(d.get(FindingId::NonFinite), nullptr) << d.list();
    EXPECT_FALSE(hasProblem(d.findings)) << d.list();
}

// ---- budget-exhausted

TEST(BudgetExhausted, TenIterationsOfBfgsOnRosenbrockAreNotEnough) {
    const FormulaObjective f("100*(y-x^2)^2+(1-x)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({-1.2, 1}), "bfgs", {}, 10);
    const Finding* budget = d.get(FindingId::BudgetExhausted);
    ASSERT_NE(budget, nullptr) << d.list();
    EXPECT_GT(budget->number("more_iterations"), 0);
    ASSERT_TRUE(budget->remedy);
    EXPECT_EQ(budget->remedy->change.kind, Change::Kind::RaiseIterationLimit);
    EXPECT_GT(budget->remedy->change.maxIterations, 10);
    expectRemedyHelped(budget);
}

TEST(BudgetExhausted, SilentWhenTheLimitIsNotReached) {
    const FormulaObjective f("100*(y-x^2)^2+(1-x)^2", {"x", "y"});
    EXPECT_EQ(diagnosed(f, vec({-1.2, 1}), "bfgs").get(FindingId::BudgetExhausted), nullptr);
}

// ---- method-failed: a run that ended by an error still gets a finding that explains it.

TEST(MethodFailed, ARejectedMethodIsExplainedAndASuitableOneIsTried) {
    const FormulaObjective f("100*(y-x^2)^2+(1-x)^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({-1.2, 1}), "levenberg-marquardt");
    ASSERT_EQ(d.run.termination, solve::Termination::Failed);
    const Finding* failed = d.get(FindingId::MethodFailed);
    ASSERT_NE(failed, nullptr) << d.list();
    EXPECT_NE(failed->message.find("least-squares"), std::string::npos) << failed->message;
    expectRemedyHelped(failed);
}

TEST(MethodFailed, AnUnknownMethodIsExplainedWithoutARemedy) {
    const FormulaObjective f("x^2 + y^2", {"x", "y"});
    const Diagnosed d = diagnosed(f, vec({1, 1}), "no-such-method");
    const Finding* failed = d.get(FindingId::MethodFailed);
    ASSERT_NE(failed, nullptr) << d.list();
    EXPECT_NE(failed->message.find("unknown method"), std::string::npos) << failed->message;
    EXPECT_FALSE(failed->remedy.has_value());
}

TEST(MethodFailed, SilentOnARunThatWorked) {
    const FormulaObjective f("x^2 + y^2", {"x", "y"});
    EXPECT_EQ(diagnosed(f, vec({1, 1}), "bfgs").get(FindingId::MethodFailed), nullptr);
}

// ---- convergence-rate: Newton quadratic (N&W Thm 3.5), BFGS superlinear (N&W Thm 6.6),
// steepest descent linear (N&W Thm 3.3).

TEST(ConvergenceRate, NamesTheRateEachMethodShows) {
    const FormulaObjective f("100*(y-x^2)^2+(1-x)^2", {"x", "y"});
    const Finding* newton = nullptr;
    const Diagnosed n = diagnosed(f, vec({-1.2, 1}), "damped-newton");
    newton = n.get(FindingId::ConvergenceRate);
    ASSERT_NE(newton, nullptr) << n.list();
    EXPECT_NE(newton->message.find("quadratically"), std::string::npos) << newton->message;
    const Diagnosed b = diagnosed(f, vec({-1.2, 1}), "bfgs");
    ASSERT_NE(b.get(FindingId::ConvergenceRate), nullptr);
    EXPECT_NE(b.get(FindingId::ConvergenceRate)->message.find("superlinearly"), std::string::npos)
        << b.get(FindingId::ConvergenceRate)->message;
    const FormulaObjective bowl("0.5*(x^2 + 10*y^2)", {"x", "y"});
    const Diagnosed g = diagnosed(bowl, vec({10, 1}), "gradient-descent", {{"line_search", "wolfe"}}, 1000);
    ASSERT_NE(g.get(FindingId::ConvergenceRate), nullptr) << g.list();
    EXPECT_NE(g.get(FindingId::ConvergenceRate)->message.find("linearly"), std::string::npos);
    EXPECT_EQ(g.get(FindingId::ConvergenceRate)->severity, Severity::Note);
    // The evidence agrees with the verdict: an order only where one is credible.
    EXPECT_TRUE(std::isnan(g.get(FindingId::ConvergenceRate)->number("order")));
    EXPECT_GE(newton->number("order"), 1.8);
    const double bfgsOrder = b.get(FindingId::ConvergenceRate)->number("order");
    EXPECT_TRUE(std::isnan(bfgsOrder) || (bfgsOrder >= 1.2 && bfgsOrder <= 3.5)) << bfgsOrder;
}

TEST(ConvergenceRate, SilentOnAOneStepRun) {
    const FormulaObjective bowl("(x - 1)^2 + (y - 2)^2", {"x", "y"});
    EXPECT_EQ(diagnosed(bowl, vec({0, 0}), "newton").get(FindingId::ConvergenceRate), nullptr);
}

// ---- reruns can be skipped, and share work

TEST(Remedies, WithoutRerunsTheChangeIsProposedButNotTried) {
    const FormulaObjective f(kTwoValves, {"valve_a", "valve_b"});
    const Diagnosed d = diagnosed(f, vec({0.3, 1.1}), "newton", {}, 200, false);
    const Finding* saddle = d.get(FindingId::SaddleEnd);
    ASSERT_NE(saddle, nullptr);
    ASSERT_TRUE(saddle->remedy);
    EXPECT_FALSE(saddle->remedy->outcome.has_value());
}

TEST(Remedies, ARemedyThatDoesNotHelpSaysSo) {
    // Heavy ball with a fixed step tuned for watts is still slow in rescaled units: the rescale is
    // tried and reported as not helping.
    const FormulaObjective f(kHeater, {"power", "duty"});
    const Diagnosed d = diagnosed(f, vec({300, 0.9}), "momentum", {{"step_size", "0.005"}, {"momentum", "0.9"}}, 300);
    const Finding* scaling = d.get(FindingId::PoorScaling);
    ASSERT_NE(scaling, nullptr) << d.list();
    ASSERT_TRUE(scaling->remedy && scaling->remedy->outcome);
    EXPECT_FALSE(scaling->remedy->outcome->helped);
    EXPECT_NE(scaling->remedy->outcome->text.find("did not help"), std::string::npos) << scaling->remedy->outcome->text;
}

TEST(Remedies, ACancelledRerunDoesNotCountAsHelping) {
    const FormulaObjective f(kTwoValves, {"valve_a", "valve_b"});
    solve::StoppingRules rules;
    const solve::Run run = solve::solve("newton", f, vec({0.3, 1.1}), {}, rules);
    Findings found = findFindings(run, f, RunSetup{"newton", {}, rules, vec({0.3, 1.1})});
    std::atomic<bool> cancel{true};
    tryRemedies(found, run, f, RunSetup{"newton", {}, rules, vec({0.3, 1.1})}, &cancel);
    for (const Finding& finding : found)
        if (finding.remedy && finding.remedy->outcome) {
            EXPECT_FALSE(finding.remedy->outcome->helped);
        }
}

// ---- thinned traces: rules read iteration numbers, not positions.

TEST(ThinnedTrace, RulesCopeWithGapsInIterationNumbers) {
    const FormulaObjective f(kPumpFlow, {"speed", "opening"});
    const Diagnosed full = diagnosed(f, vec({3.6, 0.3}), "gradient-descent", {{"line_search", "armijo"}}, 400, false);
    solve::Run thinned = full.run;
    thinned.trace.clear();
    for (const solve::IterationRecord& r : full.run.trace)
        if (r.iteration % 10 == 0 || r.iteration == full.run.trace.back().iteration || r.iteration < 3)
            thinned.trace.push_back(r);
    solve::StoppingRules rules;
    rules.maxIterations = 400;
    const Findings found =
        findFindings(thinned, f, RunSetup{"gradient-descent", {{"line_search", "armijo"}}, rules, vec({3.6, 0.3})});
    const Finding* budget = findById(found, FindingId::BudgetExhausted);
    const Finding* fullBudget = full.get(FindingId::BudgetExhausted);
    ASSERT_NE(budget, nullptr);
    ASSERT_NE(fullBudget, nullptr);
    // The per-iteration rate survives the thinning.
    EXPECT_NEAR(budget->number("rate"), fullBudget->number("rate"), 1e-2);
    EXPECT_GT(budget->number("rate"), 0.95);  // per iteration, not per kept record (0.99^10 = 0.90)
    for (const Finding& finding : found) {
        // Every iteration a finding names is one the thinned trace holds (or a range's ends).
        bool present = false;
        for (const auto& r : thinned.trace) present = present || r.iteration == finding.iterations.focus;
        EXPECT_TRUE(present) << toString(finding.id) << " focus " << finding.iterations.focus;
    }
}

// A running run (window stepping) gets only the findings its records can already show.
TEST(RunningRun, EndRulesWaitForTheEnd) {
    const FormulaObjective f(kTwoValves, {"valve_a", "valve_b"});
    solve::StoppingRules rules;
    auto made = solve::makeSolver("newton", f, vec({0.3, 1.1}), {}, rules);
    ASSERT_TRUE(made.solver);
    made.solver->begin();
    made.solver->step();
    made.solver->step();
    ASSERT_FALSE(made.solver->finished());
    const Findings found = findFindings(made.solver->run(), f, RunSetup{"newton", {}, rules, vec({0.3, 1.1})});
    EXPECT_EQ(findById(found, FindingId::SaddleEnd), nullptr);
    EXPECT_EQ(findById(found, FindingId::ConvergenceRate), nullptr);
    EXPECT_NE(findById(found, FindingId::UphillNewton), nullptr);
}

}  // namespace
}  // namespace sw::diagnose
