#pragma once
// Reading a whole text file for the table and study readers, with a stated size limit.
//
// Regular files, pipes ("--data <(cat f.csv)"), /dev/stdin and /proc files are all read as
// streams: a size from seeking is never trusted (it is 0 for a pipe and for /proc files).
// A directory, a missing file and a file over the limit are refused with a sentence. Reading
// stops at the first NUL byte (a text table or a study has none), so a device that never
// ends, such as /dev/zero, is refused at once; the caller names the NUL's line and column.

#include <cstdint>
#include <stdexcept>
#include <string>

namespace sw {

// The problem, as a sentence without the path (callers prefix it), e.g. "is a directory".
class TextFileError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Size limits (docs/robustness.md).
inline constexpr std::uintmax_t kMaxTableBytes = std::uintmax_t{1} << 30;  // 1 GiB of CSV text
inline constexpr std::uintmax_t kMaxStudyBytes = std::uintmax_t{16} << 20; // 16 MiB of study JSON

// Reads the file or stream at `path`: the whole text, or the text up to and including the
// first NUL byte. Throws TextFileError when it cannot be opened or read, is a directory, or
// holds more than maxBytes bytes.
std::string readTextFile(const std::string& path, std::uintmax_t maxBytes);

// "1 GiB", "16 MiB", "512 bytes": a limit for messages.
std::string byteSizeText(std::uintmax_t bytes);

// Line (1-based) and column (1-based, in UTF-8 characters) of a byte offset in text.
struct TextPlace {
    long line = 1;
    long column = 1;
};
TextPlace placeOfByte(const std::string& text, std::size_t byte);

}  // namespace sw
