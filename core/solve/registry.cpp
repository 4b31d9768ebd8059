// Every method family, in the order tables and menus show them.
#include "core/solve/method.h"

namespace sw::solve {

const std::vector<MethodRegistration>& registrations() {
    static const std::vector<MethodRegistration> all = [] {
        std::vector<MethodRegistration> list;
        for (auto family : {firstOrderMethods, newtonMethods, trustRegionMethods, quasiNewtonMethods,
                            conjugateGradientMethods, leastSquaresMethods, derivativeFreeMethods})
            for (MethodRegistration& r : family()) list.push_back(std::move(r));
        return list;
    }();
    return all;
}

const MethodRegistration* findRegistration(const std::string& id) {
    for (const MethodRegistration& r : registrations())
        if (r.info.id == id) return &r;
    return nullptr;
}

const std::vector<MethodInfo>& methods() {
    static const std::vector<MethodInfo> infos = [] {
        std::vector<MethodInfo> list;
        for (const MethodRegistration& r : registrations()) list.push_back(r.info);
        return list;
    }();
    return infos;
}

const MethodInfo* findMethod(const std::string& id) {
    const MethodRegistration* r = findRegistration(id);
    return r ? &r->info : nullptr;
}

std::string methodIdList() {
    std::string text;
    for (const MethodRegistration& r : registrations()) text += (text.empty() ? "" : ", ") + r.info.id;
    return text;
}

std::string stepKindWord(const std::string& methodId, const IterationRecord& record) {
    const StepKind kind = record.stepKind;
    if (kind == StepKind::None) return {};
    if (kind == StepKind::Simplex) {  // the note starts with the move: "reflect; simplex size ..."
        const std::string note = record.note.text();
        return note.substr(0, note.find(';'));
    }
    if (kind == StepKind::LevenbergMarquardt) return record.damping > 0 ? "damped" : "undamped";
    const MethodInfo* info = findMethod(methodId);
    const std::string family = info ? info->family : std::string();
    const bool restates = methodId == toString(kind) || (kind == StepKind::Gradient && methodId == "gradient-descent") ||
                          (kind == StepKind::Momentum && (methodId == "momentum" || methodId == "nesterov")) ||
                          (kind == StepKind::Adaptive && methodId == "adam") ||
                          (kind == StepKind::Newton && methodId == "damped-newton") ||
                          (kind == StepKind::QuasiNewton && family == "quasi-newton") ||
                          (kind == StepKind::ConjugateGradient && family == "conjugate-gradient");
    if (restates) return {};
    if (kind == StepKind::Gradient) return "steepest-descent fallback";
    return toString(kind);
}

}  // namespace sw::solve
