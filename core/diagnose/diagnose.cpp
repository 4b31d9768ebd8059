#include "core/diagnose/diagnose.h"

#include <map>
#include <tuple>

namespace sw::diagnose {

Findings findFindings(const solve::Run& run, const Objective& objective, const RunSetup& setup) {
    Findings findings;
    if (run.termination == solve::Termination::StoppedByCaller) return findings;  // the user stopped it
    const RunFacts facts = gatherFacts(run, objective, setup);
    auto add = [&](std::optional<Finding> f) {
        if (f) findings.push_back(std::move(*f));
    };
    add(ruleMethodFailed(facts));
    if (run.trace.empty()) return findings;
    add(ruleNonFinite(facts));
    add(ruleSaddleEnd(facts));
    add(ruleMaximumEnd(facts));
    add(ruleFlatDirection(facts));
    add(ruleUphillNewton(facts));
    add(rulePoorScaling(facts));
    // A valley that only the units make narrow is poor scaling, not a valley.
    // A run that blows up is explained by that, not by a valley it crossed on the way.
    add(ruleDivergence(facts));
    const Finding* scaling = findById(findings, FindingId::PoorScaling);
    const bool blewUp = findById(findings, FindingId::Divergence) || findById(findings, FindingId::NonFinite);
    if (!blewUp && (!scaling || scaling->number("scaled_condition_number") >= thresholds::kValleyCondition))
        add(ruleNarrowValley(facts));
    add(ruleLineSearchCollapse(facts));
    add(ruleRadiusCollapse(facts));
    // The more specific findings explain a stall already; stagnation is for the rest.
    const bool explained = findById(findings, FindingId::LineSearchCollapse) ||
                           findById(findings, FindingId::RadiusCollapse) || findById(findings, FindingId::PoorScaling) ||
                           findById(findings, FindingId::NarrowValley) || findById(findings, FindingId::Divergence) ||
                           findById(findings, FindingId::NonFinite);
    if (!explained) add(ruleStagnation(facts));
    // A limit reached while still progressing is budget-exhausted; without progress it is said
    // only when nothing else explains why the run stopped there.
    if (!findById(findings, FindingId::Divergence))
        if (std::optional<Finding> budget = ruleBudgetExhausted(facts))
            if (budget->number("progressing") > 0 || !hasProblem(findings)) add(std::move(budget));
    add(ruleConvergenceRate(facts));
    sortFindings(findings);
    return findings;
}

namespace {

// Two findings proposing the same change share one rerun.
using ChangeKey = std::tuple<int, std::string, solve::OptionValues, std::vector<double>, int, std::vector<double>>;

ChangeKey keyOf(const Change& c) {
    return {static_cast<int>(c.kind), c.method, c.options, std::vector<double>(c.scale.data(), c.scale.data() + c.scale.size()),
            c.maxIterations, std::vector<double>(c.start.data(), c.start.data() + c.start.size())};
}

}  // namespace

void tryRemedies(Findings& findings, const solve::Run& run, const Objective& objective, const RunSetup& setup,
                 const std::atomic<bool>* cancel) {
    std::map<ChangeKey, Outcome> tried;
    for (Finding& f : findings) {
        if (!f.remedy || f.remedy->outcome) continue;
        if (cancel && cancel->load()) return;
        const ChangeKey key = keyOf(f.remedy->change);
        auto it = tried.find(key);
        if (it == tried.end()) it = tried.emplace(key, tryChange(objective, setup, run, f.remedy->change, cancel)).first;
        f.remedy->outcome = it->second;
    }
}

Findings diagnose(const solve::Run& run, const Objective& objective, const RunSetup& setup, bool withRemedies,
                  const std::atomic<bool>* cancel) {
    Findings findings = findFindings(run, objective, setup);
    if (withRemedies) tryRemedies(findings, run, objective, setup, cancel);
    return findings;
}

}  // namespace sw::diagnose
