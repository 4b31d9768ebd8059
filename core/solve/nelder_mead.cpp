// Filled in by the next commits.
#include "core/solve/method.h"

namespace sw::solve {

std::vector<MethodRegistration> derivativeFreeMethods() { return {}; }

}  // namespace sw::solve
