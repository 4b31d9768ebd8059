#pragma once
// What goes with every result that leaves the program (reports, JSON, exported tables):
// where it came from (program and version, the study's title, the objective) and the caution
// that results are only as good as their model and data.

#include "core/study/study.h"

#include <string>

namespace sw::study {

// The program's version, from the CMake project (e.g. "0.1.0").
const char* programVersion();

// One paragraph, no line breaks: verify before relying on a result; where safety is involved,
// defer to the applicable codes and to licensed practice.
const char* cautionText();

struct Provenance {
    std::string version = programVersion();
    std::string title;      // the study's title ("" without a study)
    std::string formula;    // formula mode: the objective
    std::string model;      // data-fit mode: "response = model" ...
    std::string loss;       // ... the loss id ...
    std::string data;       // ... and the data file as the study names it
};
Provenance provenanceOf(const Study& study);

// One line each, for a text header: "Saddlewise 0.1.0; study "Pump flow"; f = (x-1)^2 + ...",
// then "Caution: ..." (callers add their comment mark, e.g. "# " in a CSV file).
std::string provenanceLine(const Provenance& provenance);
std::string cautionLine();

}  // namespace sw::study
