#pragma once
// Shared by the fuzz harnesses (tests/fuzz/fuzz_*.cpp). A harness checks more than "no crash":
// a wrong answer it can detect (a value that differs between two evaluations that must agree,
// a round trip that does not give the same thing back, an "internal error" for bad input) is a
// finding too, reported with finding() (message on stderr, then abort, which libFuzzer and
// ctest both see as a failure).
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

namespace sw::fuzz {

[[noreturn]] inline void finding(const std::string& what) {
    std::fprintf(stderr, "FINDING: %s\n", what.c_str());
    std::fflush(stderr);
    std::abort();
}

// Same number: equal (with -0 == 0), or both NaN.
inline bool sameNumber(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

// Same bits, except that any NaN equals any NaN (IEEE 754 leaves a NaN's payload open).
inline bool sameBits(double a, double b) {
    if (std::isnan(a) || std::isnan(b)) return std::isnan(a) && std::isnan(b);
    return std::memcmp(&a, &b, sizeof a) == 0;
}

inline std::string show(double v) {
    char buffer[40];
    std::snprintf(buffer, sizeof buffer, "%.17g", v);
    return buffer;
}

// Input bytes as text for messages: printable ASCII kept, the rest as \xNN, at most 300 bytes.
inline std::string printable(const std::string& text) {
    std::string out;
    for (std::size_t i = 0; i < text.size() && i < 300; ++i) {
        const unsigned char c = static_cast<unsigned char>(text[i]);
        if (c >= 0x20 && c < 0x7f) out += static_cast<char>(c);
        else {
            char buffer[8];
            std::snprintf(buffer, sizeof buffer, "\\x%02x", c);
            out += buffer;
        }
    }
    if (text.size() > 300) out += "...";
    return out;
}

}  // namespace sw::fuzz
