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

}  // namespace sw::solve
