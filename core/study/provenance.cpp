#include "core/study/provenance.h"

namespace sw::study {

#ifndef SW_VERSION
#error "SW_VERSION must be defined (core/CMakeLists.txt passes the project's version)"
#endif

const char* programVersion() { return SW_VERSION; }

const char* cautionText() {
    return "A result is only as good as its model and its data: it says what the optimizer found and how well "
           "the data determine it, not that the model is right. Verify it independently before relying on it, and "
           "where safety is involved defer to the applicable codes and standards and to licensed professional "
           "practice.";
}

Provenance provenanceOf(const Study& study) {
    Provenance p;
    p.title = study.title;
    if (study.fit) {
        p.model = study.fit->response + " = " + study.fit->model;
        p.loss = study.fit->loss;
        p.data = study.fit->dataPath;
    } else {
        p.formula = study.formula;
    }
    return p;
}

std::string provenanceLine(const Provenance& p) {
    std::string line = "Saddlewise " + p.version;
    if (!p.title.empty()) line += "; study \"" + p.title + "\"";
    if (!p.formula.empty()) line += "; f = " + p.formula;
    if (!p.model.empty()) line += "; model " + p.model + " (" + p.loss + " loss) on " + p.data;
    for (char& c : line)
        if (c == '\n' || c == '\r') c = ' ';  // one line whatever the title holds
    return line;
}

std::string cautionLine() { return std::string("Caution: ") + cautionText(); }

}  // namespace sw::study
