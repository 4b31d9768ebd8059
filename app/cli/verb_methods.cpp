// Placeholder until the verb is built; replaced by its owner.
#include "app/cli/cli.h"

#include <ostream>

namespace sw::cli {

Verb methodsVerb() {
    return {"methods", "(not built yet)", "(not built yet)",
            [](const std::vector<std::string>&, std::ostream&, std::ostream& err) {
                err << "saddlewise: the 'methods' verb is not built yet\n";
                return 1;
            }};
}

}  // namespace sw::cli
