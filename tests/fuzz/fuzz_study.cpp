// Fuzz harness: the study-file reader (core/study). The input is the file's text; the data
// file of a data-fit study is not read (verifyData = false; the CSV reader has its own
// harness), a formula study is read completely (its formula parsed and differentiated).
// Beyond "no crash": a refusal must be a StudyError with a place and a problem (never another
// exception: that would reach a user as "internal error"); a study that loads must save and
// load back to an equal study with identical text.
#include "core/study/study.h"
#include "tests/fuzz/fuzz_check.h"

#include <cstdint>
#include <string>

using sw::fuzz::finding;
using sw::fuzz::printable;

extern "C" int LLVMFuzzerInitialize(int*, char***) { return 0; }

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    sw::study::Study study;
    try {
        study = sw::study::fromJson(text, "/nonexistent-folder", false);
    } catch (const sw::study::StudyError& e) {
        if (e.place().empty() || e.problem().empty())
            finding("StudyError without a place or a problem (" + std::string(e.what()) + ") for " + printable(text));
        return 0;
    } catch (const std::exception& e) {
        finding(std::string("fromJson threw something other than StudyError: ") + e.what() + " for " + printable(text));
    }
    const std::string saved = sw::study::toJson(study);
    sw::study::Study back;
    try {
        back = sw::study::fromJson(saved, "/nonexistent-folder", false);
    } catch (const std::exception& e) {
        finding(std::string("a saved study does not load: ") + e.what() + "; saved " + printable(saved) + " from " +
                printable(text));
    }
    if (!(back == study)) finding("a study changes in a save and load: saved " + printable(saved) + " from " + printable(text));
    if (sw::study::toJson(back) != saved) finding("a saved study saves to other text: " + printable(saved));
    return 0;
}
