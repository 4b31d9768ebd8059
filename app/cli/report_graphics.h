#pragma once
// What the `report` verb needs from Qt, kept behind two functions so the command line stays a
// Qt-free library: the window's views drawing the report's figures as SVG, and the PDF layout.
// A build with the window installs them (app/report/install.cpp, called from main.cpp); in a
// build without Qt (the headless preset) they stay empty, and the verb writes HTML without
// the plots (saying so in the report and on stderr) and refuses PDF with a clear message.

#include "core/report/document.h"
#include "core/report/study_run.h"

#include <nlohmann/json.hpp>

#include <functional>
#include <string>
#include <vector>

namespace sw::cli {

struct ReportGraphics {
    // The figures for a study's runs (results: the runs' JSON, for captions). Sets *note to
    // what is missing and why ("" when nothing is). Throws std::runtime_error when it cannot
    // draw at all (e.g. no offscreen platform plugin).
    std::function<std::vector<report::Figure>(const report::StudyRuns& runs, const nlohmann::json& results,
                                              std::string* note)>
        figures;
    // The document laid out as PDF bytes; throws std::runtime_error with a sentence on failure.
    std::function<std::string(const report::Document& document)> pdf;
};

void setReportGraphics(ReportGraphics graphics);
const ReportGraphics& reportGraphics();

}  // namespace sw::cli
