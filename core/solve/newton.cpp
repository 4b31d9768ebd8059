// Filled in by the next commits.
#include "core/solve/method.h"

namespace sw::solve {

std::vector<MethodRegistration> newtonMethods() { return {}; }

}  // namespace sw::solve
